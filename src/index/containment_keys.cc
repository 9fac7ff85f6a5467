#include "index/containment_keys.h"

#include <algorithm>
#include <map>
#include <mutex>
#include <tuple>

#include "kindred/containment_candidates.h"

namespace kindred {

ContainmentKeys ContainmentKeysFor(double threshold, uint32_t min_size) {
  // Partition k holds min_size * 2^k .. min_size * 2^(k+1) - 1 shingles.
  uint32_t partitions = 1;
  while (uint64_t{min_size} << partitions <= kContainmentKeysLargestSize) ++partitions;
  return ContainmentKeys{threshold, min_size, partitions};
}

namespace index {

std::shared_ptr<const ContainmentPlan> PlanOf(const ContainmentKeys& keys, uint32_t perms) {
  using Key = std::tuple<double, uint32_t, uint32_t, uint32_t>;
  static std::mutex mu;
  static auto* plans = new std::map<Key, std::shared_ptr<const ContainmentPlan>>();
  const Key key{keys.threshold, keys.min_size, keys.partitions, perms};
  std::lock_guard<std::mutex> lock(mu);
  auto& plan = (*plans)[key];
  if (plan == nullptr) {
    ContainmentPlanOptions options;
    options.threshold = keys.threshold;
    options.perms = perms;
    options.min_size = keys.min_size;
    // The last partition's lower bound: exactly `partitions` partitions.
    options.largest_size = static_cast<uint32_t>(
        std::min<uint64_t>(UINT32_MAX, uint64_t{keys.min_size} << (keys.partitions - 1)));
    plan = std::make_shared<const ContainmentPlan>(options);
  }
  return plan;
}

std::vector<Banding> NeededBandings(const ContainmentPlan& plan, int partition) {
  std::map<uint32_t, uint32_t> most;  // rows -> bands
  const int count = static_cast<int>(plan.partitions().size());
  for (int other = 0; other < count; ++other) {
    const Banding b = plan.PairOf(std::min(partition, other), std::max(partition, other)).banding;
    uint32_t& bands = most[b.rows];
    bands = std::max(bands, b.bands);
  }
  std::vector<Banding> out;
  for (const auto& [rows, bands] : most) out.push_back(Banding{bands, rows});
  return out;
}

bool Proposes(const ContainmentPlan& plan, int i, int j, uint32_t rows, uint32_t band) {
  const Banding b = plan.PairOf(std::min(i, j), std::max(i, j)).banding;
  return b.rows == rows && band < b.bands;
}

}  // namespace index
}  // namespace kindred
