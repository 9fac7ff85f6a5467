// kindred: splitting work across threads.
//
// ParallelFor runs a function over the index range [0, n) in contiguous
// chunks on `threads` threads (the calling thread is one of them) and returns
// when all are done. Results are deterministic as long as the function writes
// each index's result to its own slot; the chunking never affects what is
// computed, only who computes it. ParallelSort sorts on the same threads.
#ifndef KINDRED_CORE_PARALLEL_H_
#define KINDRED_CORE_PARALLEL_H_

#include <algorithm>
#include <cstddef>
#include <functional>
#include <vector>

namespace kindred {

// Number of threads to use when the user did not say: the hardware
// concurrency, at least 1.
int DefaultThreadCount();

// Calls body(begin, end, worker) for disjoint chunks covering [0, n), with
// `worker` in [0, threads). Chunks are handed out dynamically (about 8 per
// thread) so uneven work balances. body must be safe to call concurrently
// from different threads on different chunks. threads <= 1 runs inline.
void ParallelFor(size_t n, int threads,
                 const std::function<void(size_t begin, size_t end, int worker)>& body);

// Sorts [first, last) by `less` on up to `threads` threads: pieces of at
// least kParallelSortPiece elements are sorted on their own threads, then
// neighbours are merged, in rounds. Requires that elements `less` finds
// equivalent are equal (a strict order of distinct elements), so the result
// is what std::sort gives, whatever the thread count.
inline constexpr size_t kParallelSortPiece = size_t{1} << 14;

template <typename Iterator, typename Less>
void ParallelSort(Iterator first, Iterator last, Less less, int threads) {
  const auto n = static_cast<size_t>(last - first);
  const size_t pieces = std::min<size_t>(std::max(1, threads), n / kParallelSortPiece + 1);
  if (pieces <= 1) {
    std::sort(first, last, less);
    return;
  }
  std::vector<size_t> bounds(pieces + 1);
  for (size_t p = 0; p <= pieces; ++p) bounds[p] = n * p / pieces;
  ParallelFor(pieces, threads, [&](size_t begin, size_t end, int) {
    for (size_t p = begin; p < end; ++p) std::sort(first + bounds[p], first + bounds[p + 1], less);
  });
  for (size_t width = 1; width < pieces; width *= 2) {
    const size_t merges = (pieces + 2 * width - 1) / (2 * width);
    ParallelFor(merges, threads, [&](size_t begin, size_t end, int) {
      for (size_t m = begin; m < end; ++m) {
        const size_t low = 2 * width * m;
        const size_t middle = std::min(pieces, low + width);
        const size_t high = std::min(pieces, low + 2 * width);
        if (middle == high) continue;
        std::inplace_merge(first + bounds[low], first + bounds[middle], first + bounds[high], less);
      }
    });
  }
}

}  // namespace kindred

#endif  // KINDRED_CORE_PARALLEL_H_
