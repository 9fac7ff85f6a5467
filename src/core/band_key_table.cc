#include "kindred/band_key_table.h"

#include <algorithm>
#include <bit>
#include <utility>

#include "absl/strings/str_cat.h"
#include "core/record_codec.h"
#include "kindred/banding.h"

namespace kindred {
namespace {

constexpr std::string_view kTag = "BKEY";
constexpr std::string_view kWhat = "band-key table";
// Version 2 is written; versions 1 and 2 are read (RECORDS.md).
constexpr uint32_t kVersion = 2;
constexpr size_t kRowBytes = 4 + 8 + 4;  // version 1

// Bytes for numbers up to `value` (1 to 4).
int WidthOf(uint32_t value) {
  int width = 1;
  while (width < 4 && (value >> (8 * width)) != 0) ++width;
  return width;
}

// The low bytes of a key difference written as they are, the rest as a
// varint: the most whole bytes under the band's mean difference (at most 7),
// so that what is left of a difference mostly fits one varint byte.
int LowBytesFor(uint64_t mean) {
  int low = 0;
  while (low < 7 && (mean >> (8 * (low + 1))) != 0) ++low;
  return low;
}

// The group of `band` in a version 2 payload: `count` (>= 1) rows sorted
// by (key, document), row i being at(i), documents from `base` in `width`
// bytes.
template <typename At>
void WriteGroup(uint32_t band, size_t count, const At& at, uint32_t base, int width,
                internal::RecordBuilder* out) {
  // The differences from 0 through the band's keys add up to its last key.
  const int low = LowBytesFor(at(count - 1).key / count);
  out->Varint(band);
  out->Varint(count);
  out->U8(static_cast<uint8_t>(low));
  // Rows are put together in a buffer and appended a few thousand bytes at
  // a time (a row takes at most 10 + 7 + 4 bytes).
  char buffer[4096];
  char* next = buffer;
  uint64_t previous = 0;
  for (size_t i = 0; i < count; ++i) {
    if (next > buffer + sizeof(buffer) - 24) {
      out->Raw(std::string_view(buffer, next - buffer));
      next = buffer;
    }
    const BandKeyRecord& row = at(i);
    const uint64_t difference = row.key - previous;
    previous = row.key;
    uint64_t high = difference >> (8 * low);
    for (; high >= 0x80; high >>= 7) *next++ = static_cast<char>(high | 0x80);
    *next++ = static_cast<char>(high);
    for (int b = 0; b < low; ++b) *next++ = static_cast<char>(difference >> (8 * b));
    const uint32_t document = row.document - base;
    for (int b = 0; b < width; ++b) *next++ = static_cast<char>(document >> (8 * b));
  }
  out->Raw(std::string_view(buffer, next - buffer));
}

// The start of a version 2 payload: count, base, width (returned).
int WriteStart(uint64_t count, uint32_t base, uint32_t top, internal::RecordBuilder* out) {
  const int width = count == 0 ? 0 : WidthOf(top - base);
  out->Reserve(13 + count * (2 + 6 + width));
  out->U64(count);
  out->U32(count == 0 ? 0 : base);
  out->U8(static_cast<uint8_t>(width));
  return width;
}

// The version 2 payload of `count` sorted rows, row i being at(i).
template <typename At>
void WriteRows(size_t count, const At& at, internal::RecordBuilder* out) {
  uint32_t base = UINT32_MAX, top = 0;
  for (size_t i = 0; i < count; ++i) {
    base = std::min(base, at(i).document);
    top = std::max(top, at(i).document);
  }
  const int width = WriteStart(count, base, top, out);
  for (size_t begin = 0; begin < count;) {
    const uint32_t band = at(begin).band;
    size_t end = begin + 1;
    while (end < count && at(end).band == band) ++end;
    WriteGroup(
        band, end - begin, [&](size_t i) -> const BandKeyRecord& { return at(begin + i); }, base,
        width, out);
    begin = end;
  }
}

// The rows of column `band` into *rows (replacing what it held), sorted by
// (key, document). A counting sort on the keys' top bits, then a sort of
// each bucket: band keys are hashes, so a bucket holds a few rows.
void SortedBand(const BandKeyColumns& keys, uint32_t band, std::vector<uint32_t>* ends,
                std::vector<BandKeyRecord>* rows) {
  const absl::Span<const uint64_t> column = keys.columns[band];
  const auto has = [&](size_t i) { return column[i] != kNoBandKey && keys.present[i] != 0; };
  const int bits = std::clamp(static_cast<int>(std::bit_width(column.size())) - 3, 1, 16);
  const int shift = 64 - bits;
  ends->assign((size_t{1} << bits) + 1, 0);
  for (size_t i = 0; i < column.size(); ++i) {
    if (has(i)) ++(*ends)[(column[i] >> shift) + 1];
  }
  for (size_t b = 1; b < ends->size(); ++b) (*ends)[b] += (*ends)[b - 1];
  rows->resize(ends->back());
  for (size_t i = 0; i < column.size(); ++i) {
    if (has(i)) {
      (*rows)[(*ends)[column[i] >> shift]++] = {band, column[i],
                                                keys.first + static_cast<uint32_t>(i)};
    }
  }
  // Now (*ends)[b] is the end of bucket b; documents ascend within a bucket.
  size_t begin = 0;
  for (size_t b = 0; b + 1 < ends->size(); ++b) {
    std::sort(rows->begin() + begin, rows->begin() + (*ends)[b]);
    begin = (*ends)[b];
  }
}

// Version 1: fixed 16-byte rows.
absl::Status ReadRowsV1(internal::RecordParser& in, BandKeyTable* table) {
  uint64_t count = 0;
  if (!in.U64(&count)) return absl::OkStatus();  // Finish() says why
  if (count != in.remaining() / kRowBytes || in.remaining() % kRowBytes != 0) {
    return in.Corrupt(absl::StrCat("counts ", count, " rows in ", in.remaining(), " bytes"));
  }
  table->records.resize(count);
  for (size_t i = 0; i < count; ++i) {
    BandKeyRecord& record = table->records[i];
    in.U32(&record.band);
    in.U64(&record.key);
    in.U32(&record.document);
    if (i > 0 && record < table->records[i - 1]) {
      return in.Corrupt(absl::StrCat("rows out of order at row ", i + 1));
    }
  }
  return absl::OkStatus();
}

// Version 2: bands in groups, keys by differences, documents from a base.
absl::Status ReadRowsV2(internal::RecordParser& in, BandKeyTable* table) {
  uint64_t count = 0;
  uint32_t base = 0;
  uint8_t width = 0;
  if (!(in.U64(&count) && in.U32(&base) && in.U8(&width))) return absl::OkStatus();
  if (count == 0 ? (width != 0 || base != 0) : (width < 1 || width > 4)) {
    return in.Corrupt(absl::StrCat("documents of ", width, " bytes in ", count, " rows"));
  }
  if (count > in.remaining() / (1 + width)) {
    return in.Corrupt(absl::StrCat("counts ", count, " rows in ", in.remaining(), " bytes"));
  }
  table->records.resize(count);
  const auto out_of_order = [&in](size_t row) {
    return in.Corrupt(absl::StrCat("rows out of order at row ", row + 1));
  };
  for (size_t i = 0; i < count;) {
    uint64_t band = 0, rows = 0;
    uint8_t low = 0;
    if (!(in.Varint(&band) && in.Varint(&rows) && in.U8(&low))) return absl::OkStatus();
    if (band > UINT32_MAX || (i > 0 && band <= table->records[i - 1].band)) return out_of_order(i);
    if (rows == 0 || rows > count - i || low > 7) {
      return in.Corrupt(absl::StrCat("a band of ", rows, " rows with ", low, " low bytes at row ",
                                     i + 1, " of ", count));
    }
    uint64_t key = 0;
    for (const size_t end = i + rows; i < end; ++i) {
      uint64_t high = 0, bits = 0, document = 0;
      if (!(in.Varint(&high) && in.Low(low, &bits) && in.Low(width, &document))) {
        return absl::OkStatus();
      }
      if (low > 0 && (high >> (64 - 8 * low)) != 0) return out_of_order(i);
      const uint64_t difference = (high << (8 * low)) | bits;
      document += base;
      BandKeyRecord& record = table->records[i];
      record = {static_cast<uint32_t>(band), key + difference, static_cast<uint32_t>(document)};
      if (difference > ~key || document > UINT32_MAX ||
          (difference == 0 && i > 0 && record < table->records[i - 1])) {
        return out_of_order(i);
      }
      key += difference;
    }
  }
  return absl::OkStatus();
}

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
  // Not a k-way merge (a heap step per row, bound by its branches): the rows
  // are scattered by (band, top bits of the key) into buckets of about
  // eight, which keys made by hashing fill evenly, and each bucket is
  // sorted. The order is the total order of the rows, so the result is the
  // merge's whatever the buckets hold (skewed keys only cost time).
  BandKeyTable out;
  size_t total = 0;
  uint32_t bands = 0;
  for (const BandKeyTable& table : tables) {
    total += table.records.size();
    if (!table.records.empty()) bands = std::max(bands, table.records.back().band + 1);
  }
  if (total == 0) return out;
  int bits = 0;
  while (bits < 22 && (uint64_t{bands} << (bits + 1)) * 8 <= total) ++bits;
  const auto bucket = [bits](const BandKeyRecord& row) -> size_t {
    const size_t high = bits == 0 ? 0 : static_cast<size_t>(row.key >> (64 - bits));
    return (static_cast<size_t>(row.band) << bits) | high;
  };
  std::vector<size_t> start((size_t{bands} << bits) + 1, 0);
  for (const BandKeyTable& table : tables) {
    for (const BandKeyRecord& row : table.records) ++start[bucket(row) + 1];
  }
  for (size_t b = 1; b < start.size(); ++b) start[b] += start[b - 1];
  out.records.resize(total);
  std::vector<size_t> fill(start.begin(), start.end() - 1);
  for (const BandKeyTable& table : tables) {
    for (const BandKeyRecord& row : table.records) out.records[fill[bucket(row)]++] = row;
  }
  for (size_t b = 0; b + 1 < start.size(); ++b) {
    if (start[b + 1] - start[b] > 1) {
      std::sort(out.records.begin() + start[b], out.records.begin() + start[b + 1]);
    }
  }
  return out;
}

std::string SerializeBandKeyTable(const BandKeyTable& table) {
  internal::RecordBuilder out(kTag, kVersion);
  WriteRows(
      table.records.size(), [&](size_t i) -> const BandKeyRecord& { return table.records[i]; },
      &out);
  return std::move(out).Finish();
}

std::vector<std::string> SerializeBandKeyPartitions(const BandKeyTable& table,
                                                    uint32_t partitions) {
  const uint32_t parts = std::max<uint32_t>(partitions, 1);
  // Each partition's rows as indices into the table (in the table's order),
  // encoded from there: no copy of the rows themselves.
  std::vector<std::vector<uint32_t>> rows(parts);
  if (parts == 1) {
    rows[0].resize(table.records.size());
    for (size_t i = 0; i < rows[0].size(); ++i) rows[0][i] = static_cast<uint32_t>(i);
  } else {
    for (auto& part : rows) part.reserve(table.records.size() / parts * 9 / 8 + 16);
    for (size_t i = 0; i < table.records.size(); ++i) {
      rows[BandKeyPartition(table.records[i].key, parts)].push_back(static_cast<uint32_t>(i));
    }
  }
  std::vector<std::string> out;
  out.reserve(parts);
  for (const std::vector<uint32_t>& part : rows) {
    internal::RecordBuilder bytes(kTag, kVersion);
    WriteRows(
        part.size(), [&](size_t i) -> const BandKeyRecord& { return table.records[part[i]]; },
        &bytes);
    out.push_back(std::move(bytes).Finish());
  }
  return out;
}

BandKeyTable BandKeyTableOf(const BandKeyColumns& keys) {
  BandKeyTable table;
  size_t present = 0;
  for (const uint8_t p : keys.present) present += p != 0;
  table.records.reserve(present * keys.columns.size());
  std::vector<uint32_t> ends;
  std::vector<BandKeyRecord> rows;
  for (uint32_t band = 0; band < keys.columns.size(); ++band) {
    SortedBand(keys, band, &ends, &rows);
    table.records.insert(table.records.end(), rows.begin(), rows.end());
  }
  return table;
}

std::vector<std::string> SerializeBandKeyColumns(const BandKeyColumns& keys, uint32_t partitions) {
  const uint32_t parts = std::max<uint32_t>(partitions, 1);
  const auto has = [&](uint32_t band, size_t i) {
    return keys.columns[band][i] != kNoBandKey && keys.present[i] != 0;
  };
  // Each partition's count and least and greatest document, for its start.
  std::vector<uint64_t> counts(parts, 0);
  std::vector<uint32_t> base(parts, UINT32_MAX), top(parts, 0);
  for (uint32_t band = 0; band < keys.columns.size(); ++band) {
    for (size_t i = 0; i < keys.present.size(); ++i) {
      if (!has(band, i)) continue;
      const uint32_t p = BandKeyPartition(keys.columns[band][i], parts);
      const uint32_t document = keys.first + static_cast<uint32_t>(i);
      ++counts[p];
      base[p] = std::min(base[p], document);
      top[p] = std::max(top[p], document);
    }
  }
  std::vector<internal::RecordBuilder> out;
  std::vector<int> width(parts);
  for (uint32_t p = 0; p < parts; ++p) {
    out.emplace_back(kTag, kVersion);
    width[p] = WriteStart(counts[p], base[p], top[p], &out[p]);
  }
  // Band by band: its rows sorted, then each partition's group.
  std::vector<uint32_t> ends;
  std::vector<BandKeyRecord> rows;
  std::vector<std::vector<uint32_t>> groups(parts);
  for (uint32_t band = 0; band < keys.columns.size(); ++band) {
    SortedBand(keys, band, &ends, &rows);
    for (auto& group : groups) group.clear();
    for (size_t r = 0; r < rows.size(); ++r) {
      groups[BandKeyPartition(rows[r].key, parts)].push_back(static_cast<uint32_t>(r));
    }
    for (uint32_t p = 0; p < parts; ++p) {
      if (groups[p].empty()) continue;
      WriteGroup(
          band, groups[p].size(),
          [&](size_t i) -> const BandKeyRecord& { return rows[groups[p][i]]; }, base[p], width[p],
          &out[p]);
    }
  }
  std::vector<std::string> bytes;
  bytes.reserve(parts);
  for (internal::RecordBuilder& builder : out) bytes.push_back(std::move(builder).Finish());
  return bytes;
}

absl::StatusOr<BandKeyTable> ParseBandKeyTable(std::string_view bytes) {
  internal::RecordParser in(bytes, kTag, kWhat, 1, kVersion);
  BandKeyTable table;
  absl::Status rows = in.version() == 1 ? ReadRowsV1(in, &table) : ReadRowsV2(in, &table);
  if (!in.status().ok()) return in.status();
  if (!rows.ok()) return rows;
  if (absl::Status status = in.Finish(); !status.ok()) return status;
  return table;
}

}  // namespace kindred
