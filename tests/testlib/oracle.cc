#include "testlib/oracle.h"

#include <algorithm>
#include <iterator>

namespace kindred::testing {

std::vector<OraclePair> AllPairsAtLeast(const std::vector<std::vector<uint64_t>>& sets,
                                        double threshold) {
  std::vector<OraclePair> pairs;
  std::vector<uint64_t> common;
  for (uint32_t a = 0; a < sets.size(); ++a) {
    for (uint32_t b = a + 1; b < sets.size(); ++b) {
      if (sets[a].empty() && sets[b].empty()) continue;
      common.clear();
      std::set_intersection(sets[a].begin(), sets[a].end(), sets[b].begin(), sets[b].end(),
                            std::back_inserter(common));
      const double jaccard = static_cast<double>(common.size()) /
                             static_cast<double>(sets[a].size() + sets[b].size() - common.size());
      if (jaccard >= threshold - 1e-12) pairs.push_back({a, b, jaccard});
    }
  }
  return pairs;
}

}  // namespace kindred::testing
