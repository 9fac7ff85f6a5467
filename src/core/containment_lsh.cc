// The containment LSH plan: LSH Ensemble (Zhu, Nargesian, Pu, Miller,
// "LSH Ensemble: Internet-Scale Domain Search", PVLDB 9(12), VLDB 2016),
// section 5: size partitions, and per partition the banding that minimizes
// the false positive and false negative mass of the containment curve
// computed from the partition's size bounds. See containment_lsh.h.
#include "kindred/containment_lsh.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <limits>

#include "core/contract_internal.h"
#include "kindred/records.h"

namespace kindred {
namespace {

// Composite Simpson rule on each side of the threshold (even).
constexpr int kIntervals = 64;
constexpr double kTieTolerance = 1e-12;
using Grid = std::array<double, kIntervals + 1>;

double SimpsonWeight(int i) { return (i == 0 || i == kIntervals) ? 1.0 : (i % 2 == 1 ? 4.0 : 2.0); }

// s(c; q, x) at the Simpson points of [from, to].
Grid JaccardGrid(double from, double to, double q, double x) {
  Grid grid;
  const double step = (to - from) / kIntervals;
  for (int i = 0; i <= kIntervals; ++i) {
    grid[i] = JaccardAtContainment(i == kIntervals ? to : from + step * i, q, x);
  }
  return grid;
}

// Best first: meeting the recall floor, lower weighted cost, fewer slots,
// fewer rows (as banding.h ranks Jaccard bandings).
bool Better(const PartitionBanding& a, double a_cost, const PartitionBanding& b, double b_cost) {
  if (a.meets_recall_floor != b.meets_recall_floor) return a.meets_recall_floor;
  if (!a.meets_recall_floor &&
      std::abs(a.probability_at_recall_point - b.probability_at_recall_point) > kTieTolerance) {
    return a.probability_at_recall_point > b.probability_at_recall_point;
  }
  if (std::abs(a_cost - b_cost) > kTieTolerance) return a_cost < b_cost;
  if (a.banding.slots() != b.banding.slots()) return a.banding.slots() < b.banding.slots();
  return a.banding.rows < b.banding.rows;
}

// The best banding for sets of sizes q (smaller) and x (larger) at the bounds.
PartitionBanding ChooseFor(const ContainmentPlanOptions& options, double q, double x) {
  const double t = options.threshold;
  const Grid below = JaccardGrid(0.0, t, q, x);
  const Grid above = JaccardGrid(t, 1.0, q, x);
  Grid power_below, power_above;
  power_below.fill(1.0);
  power_above.fill(1.0);
  PartitionBanding best;
  double best_cost = std::numeric_limits<double>::infinity();
  bool have = false;
  for (uint32_t rows = 1; rows <= options.perms; ++rows) {
    Grid one_below, one_above, miss_below, miss_above;
    for (int i = 0; i <= kIntervals; ++i) {
      power_below[i] *= below[i];
      power_above[i] *= above[i];
      one_below[i] = 1.0 - power_below[i];
      one_above[i] = 1.0 - power_above[i];
    }
    miss_below.fill(1.0);
    miss_above.fill(1.0);
    for (uint32_t bands = 1; uint64_t{bands} * rows <= options.perms; ++bands) {
      double fp = 0, fn = 0;
      for (int i = 0; i <= kIntervals; ++i) {
        miss_below[i] *= one_below[i];
        miss_above[i] *= one_above[i];
        fp += SimpsonWeight(i) * (1.0 - miss_below[i]);
        fn += SimpsonWeight(i) * miss_above[i];
      }
      PartitionBanding candidate;
      candidate.banding = {bands, rows};
      candidate.false_positive_mass = fp * t / (3.0 * kIntervals);
      candidate.false_negative_mass = fn * (1.0 - t) / (3.0 * kIntervals);
      candidate.probability_at_threshold = ContainmentCandidateProbability(t, q, x, {bands, rows});
      candidate.probability_at_recall_point =
          ContainmentCandidateProbability(RecallPoint(t), q, x, {bands, rows});
      candidate.meets_recall_floor = candidate.probability_at_recall_point >= options.min_recall;
      const double cost = options.fn_weight * candidate.false_negative_mass +
                          options.fp_weight * candidate.false_positive_mass;
      if (!have || Better(candidate, cost, best, best_cost)) {
        best = candidate;
        best_cost = cost;
        have = true;
      }
    }
  }
  return best;
}

}  // namespace

double JaccardAtContainment(double containment, double small_size, double large_size) {
  const double shared = containment * small_size;
  return shared / (small_size + large_size - shared);
}

double ContainmentCandidateProbability(double containment, double small_size, double large_size,
                                       Banding banding) {
  return CandidateProbability(JaccardAtContainment(containment, small_size, large_size),
                              banding.bands, banding.rows);
}

ContainmentPlan::ContainmentPlan(const ContainmentPlanOptions& options) : options_(options) {
  internal::RequireContract(options.threshold > 0 && options.threshold <= 1 && options.perms >= 1 &&
                                options.min_size >= 1 && options.fn_weight >= 0 &&
                                options.fp_weight >= 0 && options.min_recall >= 0 &&
                                options.min_recall <= 1,
                            "ContainmentPlan options out of range");
  constexpr uint64_t kMax = std::numeric_limits<uint32_t>::max();
  uint64_t lower = options.min_size;
  for (;;) {
    const uint64_t upper = std::min(kMax, 2 * lower - 1);
    partitions_.push_back({static_cast<uint32_t>(lower), static_cast<uint32_t>(upper)});
    if (upper >= options.largest_size || upper == kMax) break;
    lower = upper + 1;
  }
  for (uint32_t small = 0; small < partitions_.size(); ++small) {
    for (uint32_t large = small; large < partitions_.size(); ++large) {
      PartitionBanding pair =
          ChooseFor(options, partitions_[small].lower, partitions_[large].upper);
      pair.small = small;
      pair.large = large;
      pairs_.push_back(pair);
    }
  }
}

int ContainmentPlan::PartitionOf(uint32_t size) const {
  if (size < options_.min_size) return -1;
  for (size_t k = 0; k < partitions_.size(); ++k) {
    if (size <= partitions_[k].upper) return static_cast<int>(k);
  }
  return static_cast<int>(partitions_.size()) - 1;
}

const PartitionBanding& ContainmentPlan::PairOf(uint32_t small, uint32_t large) const {
  const size_t n = partitions_.size();
  internal::RequireContract(small <= large && large < n, "PairOf needs small <= large < count");
  // Pairs are stored row by row: row `small` starts after the rows above it,
  // which hold n + (n - 1) + ... + (n - small + 1) pairs.
  const size_t row_start = small * n - (small * (small - 1)) / 2;
  return pairs_[row_start + (large - small)];
}

void AppendPartitionRecords(const ContainmentPlan& plan, std::string* out) {
  const std::vector<SizePartition>& parts = plan.partitions();
  RecordWriter row(RecordFormat::kJsonLines, {"record", "partition", "lower", "upper"}, out);
  for (size_t k = 0; k < parts.size(); ++k) {
    row.String("partition");
    row.Number(k);
    row.Number(parts[k].lower);
    row.Number(parts[k].upper);
    row.EndRow();
  }
}

}  // namespace kindred
