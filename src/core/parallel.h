// kindred: splitting work across threads.
//
// ParallelFor runs a function over the index range [0, n) in contiguous
// chunks on `threads` threads (the calling thread is one of them) and returns
// when all are done. Results are deterministic as long as the function writes
// each index's result to its own slot; the chunking never affects what is
// computed, only who computes it.
#ifndef KINDRED_CORE_PARALLEL_H_
#define KINDRED_CORE_PARALLEL_H_

#include <cstddef>
#include <functional>

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

}  // namespace kindred

#endif  // KINDRED_CORE_PARALLEL_H_
