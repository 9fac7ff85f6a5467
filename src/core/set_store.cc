#include "kindred/set_store.h"

#include <algorithm>
#include <utility>

#include "absl/strings/str_cat.h"
#include "core/record_codec.h"

namespace kindred {
namespace {

constexpr std::string_view kTag = "SETS";
constexpr std::string_view kWhat = "set store";

}  // namespace

void SetStore::Add(uint32_t document, absl::Span<const uint64_t> shingles,
                   absl::Span<const uint32_t> signature) {
  Entry& entry = entries_[document];
  entry.shingles.assign(shingles.begin(), shingles.end());
  entry.signature.assign(signature.begin(), signature.end());
}

absl::Span<const uint64_t> SetStore::shingles(uint32_t document) const {
  return entries_.at(document).shingles;
}

absl::Span<const uint32_t> SetStore::signature(uint32_t document) const {
  return entries_.at(document).signature;
}

std::vector<uint32_t> SetStore::documents() const {
  std::vector<uint32_t> out;
  out.reserve(entries_.size());
  for (const auto& [document, entry] : entries_) out.push_back(document);
  std::sort(out.begin(), out.end());
  return out;
}

void SetStore::Merge(const SetStore& other) {
  for (const auto& [document, entry] : other.entries_) entries_[document] = entry;
}

bool operator==(const SetStore& x, const SetStore& y) {
  if (x.perms_ != y.perms_ || x.entries_.size() != y.entries_.size()) return false;
  for (const auto& [document, entry] : x.entries_) {
    const auto it = y.entries_.find(document);
    if (it == y.entries_.end() || it->second.shingles != entry.shingles ||
        it->second.signature != entry.signature) {
      return false;
    }
  }
  return true;
}

std::string SerializeSetStore(const SetStore& store) {
  internal::RecordBuilder out(kTag);
  out.U32(store.perms());
  out.U64(store.size());
  for (const uint32_t document : store.documents()) {
    const auto shingles = store.shingles(document);
    out.U32(document);
    out.U32(static_cast<uint32_t>(shingles.size()));
    for (const uint64_t shingle : shingles) out.U64(shingle);
    for (const uint32_t slot : store.signature(document)) out.U32(slot);
  }
  return std::move(out).Finish();
}

absl::StatusOr<SetStore> ParseSetStore(std::string_view bytes) {
  internal::RecordParser in(bytes, kTag, kWhat);
  uint32_t perms = 0;
  uint64_t count = 0;
  if (!in.U32(&perms) || !in.U64(&count)) return in.Finish();
  SetStore store(perms);
  const size_t min_entry = 8 + 4 * size_t{perms};
  if (count > in.remaining() / min_entry) {
    return in.Corrupt(absl::StrCat("counts ", count, " sets in ", in.remaining(), " bytes"));
  }
  std::vector<uint64_t> shingles;
  std::vector<uint32_t> signature(perms);
  int64_t previous = -1;
  for (uint64_t i = 0; i < count; ++i) {
    uint32_t document = 0, size = 0;
    if (!in.U32(&document) || !in.U32(&size)) break;
    if (static_cast<int64_t>(document) <= previous) {
      return in.Corrupt(absl::StrCat("set ", i + 1, " is not in ascending document order"));
    }
    previous = document;
    if (size > in.remaining() / 8) return in.Corrupt(absl::StrCat("set ", i + 1, " is cut short"));
    shingles.resize(size);
    for (uint32_t s = 0; s < size; ++s) {
      in.U64(&shingles[s]);
      if (s > 0 && shingles[s] <= shingles[s - 1]) {
        return in.Corrupt(absl::StrCat("the set of document ", document,
                                       " is not sorted and repeat-free"));
      }
    }
    for (uint32_t& slot : signature) in.U32(&slot);
    store.Add(document, shingles, signature);
  }
  if (absl::Status status = in.Finish(); !status.ok()) return status;
  return store;
}

}  // namespace kindred
