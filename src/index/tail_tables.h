// Lookup tables over the newest small segments of an index: those a
// long-lived writer (`kindred serve`) appends, one per group commit. A
// query looks up each band key once per segment; with thousands of small
// segments that cost grew with every commit. These tables hold the small
// segments' band keys in a few sorted runs (merged as they grow, so there
// are O(log n) of them) and their ids in a hash map, so a query costs a
// binary search per run and an id lookup one probe, however many small
// segments there are. Built in memory from the mapped segments; the file
// is unchanged.
//
// Thread-safety: Add() must not run concurrently with anything; the const
// methods may.
#ifndef KINDRED_INDEX_TAIL_TABLES_H_
#define KINDRED_INDEX_TAIL_TABLES_H_

#include <cstdint>
#include <optional>
#include <string_view>
#include <utility>
#include <vector>

#include "absl/container/flat_hash_map.h"
#include "index/segment.h"

namespace kindred::index {

class TailTables {
 public:
  using Entry = std::pair<uint64_t, uint32_t>;  // band key, document number

  // Adds the band keys and ids of `segment`, whose first document has the
  // number `first_doc`. Segments are added in order. The ids are borrowed
  // from the segment's mapping, which must outlive this object.
  void Add(const SegmentView& segment, uint32_t first_doc);

  // Sorted runs of (key, document), older runs first: every document of a
  // run precedes those of the runs after it.
  const std::vector<std::vector<Entry>>& runs() const { return runs_; }

  // The number of the newest document with `id` in the added segments.
  std::optional<uint32_t> Newest(std::string_view id) const;

 private:
  std::vector<std::vector<Entry>> runs_;
  absl::flat_hash_map<std::string_view, uint32_t> ids_;
};

}  // namespace kindred::index

#endif  // KINDRED_INDEX_TAIL_TABLES_H_
