// Sorting a document's shingle hashes into a set. Internal to the library.
#ifndef KINDRED_TEXT_HASH_SORT_H_
#define KINDRED_TEXT_HASH_SORT_H_

#include <cstdint>
#include <vector>

namespace kindred::text_internal {

// Sorts *hashes ascending and removes repeats. Hashes are uniformly spread
// (seeded XXH3), so they are first distributed by their top bits into about
// one bucket per element (a counting pass and a scatter pass), and each
// bucket is then sorted on its own: expected linear time. Sets of 2^16 or
// more are first split by their top 12 bits, so that each scatter stays
// within the cache. A bucket that happens to be large is sorted with
// std::sort, so crafted input costs at most O(n log n). `scratch` and
// `counts` are reusable work space.
void SortUniqueHashes(std::vector<uint64_t>* hashes,
                      std::vector<uint64_t>* scratch,
                      std::vector<uint32_t>* counts);

}  // namespace kindred::text_internal

#endif  // KINDRED_TEXT_HASH_SORT_H_
