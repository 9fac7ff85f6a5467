// kindred: the set store, a record of what verification reads.
//
// The exact shingle set (sorted, repeat-free 64-bit hashes; shingles.h) and
// the MinHash signature of each of some documents, by document number:
// those of the documents in candidate pairs, which verification compares.
//
// The serialized form is documented in src/core/RECORDS.md: entries in
// ascending document order whatever the order they were added in.
// Thread-compatible: const methods may be called concurrently.
#ifndef KINDRED_SET_STORE_H_
#define KINDRED_SET_STORE_H_

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "absl/container/flat_hash_map.h"
#include "absl/status/statusor.h"
#include "absl/types/span.h"

namespace kindred {

class SetStore {
 public:
  explicit SetStore(uint32_t perms = 0) : perms_(perms) {}

  uint32_t perms() const { return perms_; }
  size_t size() const { return entries_.size(); }
  // Stores a copy of document `document`'s set and signature (which has
  // perms() slots), replacing any stored before.
  void Add(uint32_t document, absl::Span<const uint64_t> shingles,
           absl::Span<const uint32_t> signature);
  bool contains(uint32_t document) const { return entries_.contains(document); }
  // Require contains(document).
  absl::Span<const uint64_t> shingles(uint32_t document) const;
  absl::Span<const uint32_t> signature(uint32_t document) const;
  // The stored documents, ascending.
  std::vector<uint32_t> documents() const;
  // Adds every entry of `other` (same perms) to this store.
  void Merge(const SetStore& other);

  friend bool operator==(const SetStore& x, const SetStore& y);

 private:
  struct Entry {
    std::vector<uint64_t> shingles;
    std::vector<uint32_t> signature;
  };
  uint32_t perms_;
  absl::flat_hash_map<uint32_t, Entry> entries_;
};

std::string SerializeSetStore(const SetStore& store);
// Errors: BadInput when `bytes` are not a whole, intact set store, or a set
// is not sorted and repeat-free.
absl::StatusOr<SetStore> ParseSetStore(std::string_view bytes);

}  // namespace kindred

#endif  // KINDRED_SET_STORE_H_
