// kindred: LSH banding of MinHash signatures.
//
// A signature of n slots is cut into `bands` bands of `rows` consecutive slots
// (bands * rows <= n; trailing slots are unused). Two documents become a
// candidate pair when all rows of at least one band agree. If each slot agrees
// with probability s (the Jaccard similarity), a pair becomes a candidate with
// probability 1 - (1 - s^r)^b (Leskovec, Rajaraman, Ullman, "Mining of
// Massive Datasets", ch. 3.4): the S-curve.
//
// Choosing (bands, rows) for a threshold t weighs two masses under the curve
// (common practice): the false positive mass FP = integral over [0, t] of
// P(s) ds (pairs below the threshold that still cost a verification) and the
// false negative mass FN = integral over [t, 1] of (1 - P(s)) ds (pairs at or
// above the threshold that are lost). Integrals are computed with the
// composite Simpson rule on 512 intervals per side.
//
// Recall comes first. Exact verification removes every false positive at the
// cost of one sorted-set intersection, but nothing recovers a false negative.
// So the defaults weigh a miss four times a false candidate, and settings are
// first required to meet a recall floor: P(s) >= min_recall (default 0.99)
// at the recall point s = min(t + 0.05, (t + 1) / 2). Settings that meet the
// floor always rank before settings that do not; the weighted cost orders
// each group.
//
// All functions are pure and thread-safe.
#ifndef KINDRED_BANDING_H_
#define KINDRED_BANDING_H_

#include <cstdint>
#include <optional>
#include <vector>

#include "absl/types/span.h"
#include "kindred/settings.h"

namespace kindred {

struct Banding {
  uint32_t bands = 0;
  uint32_t rows = 0;
  // Slots used: bands * rows.
  uint64_t slots() const { return uint64_t{bands} * rows; }
  friend bool operator==(const Banding&, const Banding&) = default;
};

// Default weights of the two masses (see the file comment for why).
inline constexpr double kDefaultFalseNegativeWeight = 4.0;
inline constexpr double kDefaultFalsePositiveWeight = 1.0;
// The recall floor: P(RecallPoint(t)) >= kDefaultMinRecall. 0 disables it.
inline constexpr double kDefaultMinRecall = 0.99;
// How far above the threshold the recall floor applies.
inline constexpr double kRecallMargin = 0.05;

// The similarity where the recall floor applies: min(t + 0.05, (t + 1) / 2).
double RecallPoint(double threshold);

// 1 - (1 - s^rows)^bands, for s in [0, 1]. Requires bands, rows >= 1.
double CandidateProbability(double s, uint32_t bands, uint32_t rows);

struct BandingCost {
  Banding banding;
  double false_negative_mass = 0;          // integral over [t, 1] of 1 - P(s)
  double false_positive_mass = 0;          // integral over [0, t] of P(s)
  double weighted = 0;                     // fn_weight * FN + fp_weight * FP
  double probability_at_threshold = 0;     // P(t)
  double probability_at_recall_point = 0;  // P(RecallPoint(t))
  bool meets_recall_floor = false;         // probability_at_recall_point >= min_recall
};

// The cost of one banding. Requires threshold in (0, 1], bands, rows >= 1,
// weights >= 0, min_recall in [0, 1].
BandingCost CostOf(Banding banding, double threshold,
                   double fn_weight = kDefaultFalseNegativeWeight,
                   double fp_weight = kDefaultFalsePositiveWeight,
                   double min_recall = kDefaultMinRecall);

// Every banding with bands * rows <= perms, best first: those meeting the
// recall floor first, then by weighted cost; ties (within 1e-12) go to fewer
// slots, then fewer rows. Requires threshold in (0, 1], perms >= 1, weights
// >= 0, min_recall in [0, 1]. Cost: about perms * ln(perms) * 1026 evaluations
// of the curve (a few ms for 128 perms).
std::vector<BandingCost> RankBandings(double threshold, uint32_t perms,
                                      double fn_weight = kDefaultFalseNegativeWeight,
                                      double fp_weight = kDefaultFalsePositiveWeight,
                                      double min_recall = kDefaultMinRecall);

// RankBandings(...)[0].banding: the automatic choice.
Banding ChooseBanding(double threshold, uint32_t perms,
                      double fn_weight = kDefaultFalseNegativeWeight,
                      double fp_weight = kDefaultFalsePositiveWeight,
                      double min_recall = kDefaultMinRecall);

// The one rule for a banding left open. Returns match.bands x match.rows
// when bands is not 0; otherwise `kept` when given (a banding in use that
// stays while the threshold it was chosen for does: an index's stored
// banding for a query that names no threshold), else
// ChooseBanding(match.threshold, perms). Requires perms >= 1 and a match
// that passed MatchSettings::Validate. A containment match with bands 0
// means the containment search instead, which has no banding: callers ask
// UsesContainmentSearch() (sweep.h) first.
Banding ResolveBanding(const MatchSettings& match, uint32_t perms,
                       std::optional<Banding> kept = std::nullopt);

// The key of a band that must never match: one of its slots is kEmptySlot.
// Real keys are never kNoBandKey (a hash equal to it is replaced by 1).
inline constexpr uint64_t kNoBandKey = 0;

// Band keys: out[i] = XXH3-64, seeded with i, of the little-endian bytes of
// slots [i * rows, (i + 1) * rows), or kNoBandKey when one of those slots is
// kEmptySlot (empty slots never agree, so the empty document is never a
// candidate). Requires out.size() == banding.bands, bands and rows >= 1,
// banding.slots() <= signature.size(). Borrows both spans for the call only;
// never allocates.
void BandKeys(absl::Span<const uint32_t> signature, Banding banding, absl::Span<uint64_t> out);

}  // namespace kindred

#endif  // KINDRED_BANDING_H_
