// kindred: the containment LSH (which bandings propose containment pairs).
//
// Containment of the smaller set Q in the larger set X is |Q n X| / |Q|. A
// chapter inside a book has containment near 1 and Jaccard near 0, so
// Jaccard banding misses it. For sets of sizes q <= x and containment c,
// the Jaccard similarity is
//     s(c; q, x) = c q / (q + x - c q),
// so a MinHash slot agrees with probability s(c; q, x) and a banding of b
// bands of r rows proposes the pair with probability
//     P(c; q, x) = 1 - (1 - s(c; q, x)^r)^b.
//
// LSH Ensemble (Zhu, Nargesian, Pu, Miller, "LSH Ensemble: Internet-Scale
// Domain Search", PVLDB 9(12), VLDB 2016) makes this usable: partition the
// sets by size, and choose bands and rows per partition for the containment
// threshold, from the partition's size bounds, by minimizing the false
// positive and false negative mass of P(c) over containment. One MinHash
// signature per set serves every partition: the band keys of any banding
// are computed from it.
//
// Here, for an all-pairs search where every set is both query and indexed:
//  - Partitions have fixed geometric size bounds: partition k holds the sets
//    of min_size * 2^k to min_size * 2^(k+1) - 1 shingles. (The paper's
//    equi-depth partitions depend on the corpus; fixed bounds make the plan a
//    function of the settings alone.) Sets smaller than min_size take part in
//    no containment pair (see kDefaultMinContainedSize).
//  - Every pair of partitions (i <= j: the smaller set in i, the larger in j)
//    has its own banding, chosen for the least Jaccard a pair of those
//    partitions can have at a given containment: q = lower(i), x = upper(j)
//    (s grows with q and falls with x). The curve at the bounds is a lower
//    bound on the curve of every pair of the two partitions.
//  - The choice follows banding.h: the banding must meet the recall floor,
//    P(RecallPoint(t)) >= min_recall at the bounds, and among those the
//    least weighted mass wins (FN = integral over [t, 1] of 1 - P(c), FP =
//    integral over [0, t] of P(c)). When no banding meets the floor (sizes
//    too far apart for the signature length), the one with the highest
//    probability at the recall point is taken, and the plan says so.
//
// All functions are pure; a ContainmentPlan is immutable and may be shared
// by any number of threads.
#ifndef KINDRED_CONTAINMENT_LSH_H_
#define KINDRED_CONTAINMENT_LSH_H_

#include <cstdint>
#include <string>
#include <vector>

#include "kindred/banding.h"
#include "kindred/settings.h"  // kDefaultMinContainedSize

namespace kindred {

// s(c; q, x) = c q / (q + x - c q) for sizes q <= x (see the file comment).
// Requires c in [0, 1], 1 <= q <= x.
double JaccardAtContainment(double containment, double small_size, double large_size);

// P(c; q, x) = 1 - (1 - s(c; q, x)^r)^b. Requires bands, rows >= 1,
// c in [0, 1], 1 <= q <= x.
double ContainmentCandidateProbability(double containment, double small_size, double large_size,
                                       Banding banding);

// A size partition: sets of lower..upper shingles (both inclusive).
struct SizePartition {
  uint32_t lower = 0;
  uint32_t upper = 0;
};

// The banding of one pair of partitions and its figures at the bounds
// (q = partitions[small].lower, x = partitions[large].upper).
struct PartitionBanding {
  uint32_t small = 0;  // partition of the smaller set
  uint32_t large = 0;  // partition of the larger set (>= small)
  Banding banding;
  double probability_at_threshold = 0;     // P(t) at the bounds
  double probability_at_recall_point = 0;  // P(RecallPoint(t)) at the bounds
  double false_negative_mass = 0;          // integral over [t, 1] of 1 - P(c)
  double false_positive_mass = 0;          // integral over [0, t] of P(c)
  bool meets_recall_floor = false;
};

struct ContainmentPlanOptions {
  double threshold = 0.8;                        // containment threshold t, in (0, 1]
  uint32_t perms = 128;                          // signature length; bands * rows <= perms
  uint32_t min_size = kDefaultMinContainedSize;  // >= 1
  uint32_t largest_size = 1;                     // the largest set to cover (>= 1)
  double fn_weight = kDefaultFalseNegativeWeight;
  double fp_weight = kDefaultFalsePositiveWeight;
  double min_recall = kDefaultMinRecall;
};

class ContainmentPlan {
 public:
  // Requires threshold in (0, 1], perms >= 1, min_size >= 1, weights >= 0,
  // min_recall in [0, 1]. Makes at least one partition; the last one covers
  // largest_size. Cost: a few ms per pair of partitions for 128 perms
  // (about 80 pairs for sizes 20..50,000).
  explicit ContainmentPlan(const ContainmentPlanOptions& options);

  const ContainmentPlanOptions& options() const { return options_; }
  const std::vector<SizePartition>& partitions() const { return partitions_; }
  // Every pair of partitions, ordered by (small, large).
  const std::vector<PartitionBanding>& pairs() const { return pairs_; }

  // The partition of a set of `size` shingles, or -1 when size < min_size.
  // Sizes above the last partition's upper bound belong to the last one
  // (their pairs are then planned for a smaller x than theirs: call with a
  // largest_size that covers the corpus).
  int PartitionOf(uint32_t size) const;
  // The banding of a smaller set in `small` and a larger set in `large`.
  // Requires small <= large < partitions().size().
  const PartitionBanding& PairOf(uint32_t small, uint32_t large) const;

 private:
  ContainmentPlanOptions options_;
  std::vector<SizePartition> partitions_;
  std::vector<PartitionBanding> pairs_;
};

// Appends one JSON Lines record per size partition of `plan` to `out`
// ({"record":"partition","partition":K,"lower":L,"upper":U}), as `plan` and
// `tune` print them.
void AppendPartitionRecords(const ContainmentPlan& plan, std::string* out);

}  // namespace kindred

#endif  // KINDRED_CONTAINMENT_LSH_H_
