#include "kindred/band_key_table.h"

#include <algorithm>
#include <queue>
#include <utility>

#include "absl/strings/str_cat.h"
#include "core/record_codec.h"

namespace kindred {
namespace {

constexpr std::string_view kTag = "BKEY";
constexpr std::string_view kWhat = "band-key table";
constexpr size_t kRowBytes = 4 + 8 + 4;

}  // namespace

void SortBandKeys(BandKeyTable* table) { std::sort(table->records.begin(), table->records.end()); }

uint32_t BandKeyPartition(uint64_t key, uint32_t partitions) {
  // A 64-bit finalizer (the one of MurmurHash3, Appleby 2011) so that
  // partitions do not depend on the key's low bits alone, then the
  // multiply-shift reduction of the top 32 bits to [0, partitions).
  uint64_t x = key;
  x ^= x >> 33;
  x *= 0xff51afd7ed558ccdULL;
  x ^= x >> 33;
  x *= 0xc4ceb9fe1a85ec53ULL;
  x ^= x >> 33;
  return static_cast<uint32_t>(((x >> 32) * uint64_t{partitions}) >> 32);
}

std::vector<BandKeyTable> PartitionBandKeys(const BandKeyTable& table, uint32_t partitions) {
  std::vector<BandKeyTable> out(std::max<uint32_t>(partitions, 1));
  const uint32_t parts = static_cast<uint32_t>(out.size());
  // The partition of every row, counted first, so that each table is
  // reserved at its size instead of grown by doubling.
  std::vector<uint32_t> where(table.records.size());
  std::vector<size_t> sizes(parts, 0);
  for (size_t i = 0; i < table.records.size(); ++i) {
    where[i] = BandKeyPartition(table.records[i].key, parts);
    ++sizes[where[i]];
  }
  for (uint32_t p = 0; p < parts; ++p) out[p].records.reserve(sizes[p]);
  for (size_t i = 0; i < table.records.size(); ++i) {
    out[where[i]].records.push_back(table.records[i]);
  }
  return out;  // each keeps the table's order: sorted
}

BandKeyTable MergeBandKeys(absl::Span<const BandKeyTable> tables) {
  BandKeyTable out;
  size_t total = 0;
  for (const BandKeyTable& table : tables) total += table.records.size();
  out.records.reserve(total);
  // A k-way merge by a heap of (record, table) heads.
  using Head = std::pair<BandKeyRecord, size_t>;
  const auto later = [](const Head& x, const Head& y) {
    return y.first < x.first || (!(x.first < y.first) && y.second < x.second);
  };
  std::priority_queue<Head, std::vector<Head>, decltype(later)> heads(later);
  std::vector<size_t> next(tables.size(), 0);
  for (size_t t = 0; t < tables.size(); ++t) {
    if (!tables[t].records.empty()) heads.push({tables[t].records[0], t});
  }
  while (!heads.empty()) {
    const auto [record, t] = heads.top();
    heads.pop();
    out.records.push_back(record);
    if (++next[t] < tables[t].records.size()) heads.push({tables[t].records[next[t]], t});
  }
  return out;
}

std::string SerializeBandKeyTable(const BandKeyTable& table) {
  internal::RecordBuilder out(kTag);
  out.Reserve(8 + table.records.size() * kRowBytes);
  out.U64(table.records.size());
  for (const BandKeyRecord& record : table.records) {
    out.U32(record.band);
    out.U64(record.key);
    out.U32(record.document);
  }
  return std::move(out).Finish();
}

absl::StatusOr<BandKeyTable> ParseBandKeyTable(std::string_view bytes) {
  internal::RecordParser in(bytes, kTag, kWhat);
  BandKeyTable table;
  uint64_t count = 0;
  if (in.U64(&count)) {
    if (count != in.remaining() / kRowBytes || in.remaining() % kRowBytes != 0) {
      return in.Corrupt(absl::StrCat("counts ", count, " rows in ", in.remaining(), " bytes"));
    }
    table.records.resize(count);
    for (size_t i = 0; i < count; ++i) {
      BandKeyRecord& record = table.records[i];
      in.U32(&record.band);
      in.U64(&record.key);
      in.U32(&record.document);
      if (i > 0 && record < table.records[i - 1]) {
        return in.Corrupt(absl::StrCat("rows out of order at row ", i + 1));
      }
    }
  }
  if (absl::Status status = in.Finish(); !status.ok()) return status;
  return table;
}

}  // namespace kindred
