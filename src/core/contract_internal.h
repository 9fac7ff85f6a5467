// Internal: checks of caller contracts that stay on in release builds.
//
// A broken contract (a span of the wrong size, settings that were never
// validated) is a bug in the caller. Going on would read or write out of
// bounds, so the process stops with a message naming the contract instead.
#ifndef KINDRED_CORE_CONTRACT_INTERNAL_H_
#define KINDRED_CORE_CONTRACT_INTERNAL_H_

#include <cstdio>
#include <cstdlib>

namespace kindred::internal {

// Stops the process with "kindred: broken contract: <what>" unless `holds`.
inline void RequireContract(bool holds, const char* what) {
  if (holds) [[likely]] {
    return;
  }
  std::fprintf(stderr, "kindred: broken contract: %s\n", what);
  std::abort();
}

}  // namespace kindred::internal

#endif  // KINDRED_CORE_CONTRACT_INTERNAL_H_
