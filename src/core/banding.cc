#include "kindred/banding.h"

#include <xxhash.h>

#include <algorithm>
#include <array>
#include <bit>
#include <cassert>
#include <cmath>

#include "core/contract_internal.h"
#include "kindred/signer.h"

namespace kindred {
namespace {

// Composite Simpson rule: intervals per side of the threshold (even).
constexpr int kIntervals = 512;
constexpr double kTieTolerance = 1e-12;

// Values on the Simpson grid of [from, to].
using Grid = std::array<double, kIntervals + 1>;

// The Simpson grid points of [from, to].
Grid Points(double from, double to) {
  Grid points;
  const double step = (to - from) / kIntervals;
  for (int i = 0; i <= kIntervals; ++i) points[i] = i == kIntervals ? to : from + step * i;
  return points;
}

// s^rows at the grid points, for rows = 1, 2, ...: each call multiplies
// once more (a pow per point and row count was most of the start-up of a
// sweep).
class GridPowers {
 public:
  GridPowers(double from, double to) : points_(Points(from, to)) { powers_.fill(1.0); }

  // Advances to the next row count and returns the one-band miss
  // probability 1 - s^rows at each point.
  const Grid& NextMiss() {
    for (int i = 0; i <= kIntervals; ++i) {
      powers_[i] *= points_[i];
      miss_[i] = 1.0 - powers_[i];
    }
    return miss_;
  }

 private:
  Grid points_, powers_, miss_;
};

// Composite Simpson integral over [from, to] of the values on the grid.
double Integrate(const Grid& values, double from, double to) {
  double sum = 0;
  for (int i = 0; i <= kIntervals; ++i) {
    const double weight = (i == 0 || i == kIntervals) ? 1.0 : (i % 2 == 1 ? 4.0 : 2.0);
    sum += weight * values[i];
  }
  return sum * (to - from) / (3.0 * kIntervals);
}

// The expected false positive mass (integral of the candidate probability
// below the threshold) and false negative mass (integral of the miss
// probability above it) of rows with one-band miss probabilities
// `one_below` and `one_above` (on the grids below and above the threshold)
// for 1, 2, ... max_bands bands: calls cost(bands, fp, fn) for each. The
// miss probability of b + 1 bands is that of b bands times one band's, so
// each band count costs one pass over the grids (this runs before every
// sweep: it must be quick).
template <typename Cost>
void BandCosts(double threshold, const Grid& one_below, const Grid& one_above, uint32_t max_bands,
               Cost cost) {
  Grid miss_below, miss_above, hit_below;
  miss_below.fill(1.0);
  miss_above.fill(1.0);
  for (uint32_t bands = 1; bands <= max_bands; ++bands) {
    for (int i = 0; i <= kIntervals; ++i) {
      miss_below[i] *= one_below[i];
      miss_above[i] *= one_above[i];
      hit_below[i] = 1.0 - miss_below[i];
    }
    cost(bands, Integrate(hit_below, 0.0, threshold), Integrate(miss_above, threshold, 1.0));
  }
}

BandingCost MakeCost(Banding banding, double threshold, double fp_mass, double fn_mass,
                     double fn_weight, double fp_weight, double min_recall) {
  BandingCost cost;
  cost.banding = banding;
  cost.false_positive_mass = fp_mass;
  cost.false_negative_mass = fn_mass;
  cost.weighted = fn_weight * fn_mass + fp_weight * fp_mass;
  cost.probability_at_threshold = CandidateProbability(threshold, banding.bands, banding.rows);
  cost.probability_at_recall_point =
      CandidateProbability(RecallPoint(threshold), banding.bands, banding.rows);
  cost.meets_recall_floor = cost.probability_at_recall_point >= min_recall;
  return cost;
}

// Best first: meeting the recall floor, lower weighted cost, fewer slots,
// fewer rows.
bool Better(const BandingCost& a, const BandingCost& b) {
  if (a.meets_recall_floor != b.meets_recall_floor) return a.meets_recall_floor;
  if (std::abs(a.weighted - b.weighted) > kTieTolerance) return a.weighted < b.weighted;
  if (a.banding.slots() != b.banding.slots()) return a.banding.slots() < b.banding.slots();
  return a.banding.rows < b.banding.rows;
}

}  // namespace

double RecallPoint(double threshold) {
  return std::min(threshold + kRecallMargin, (threshold + 1.0) / 2.0);
}

double CandidateProbability(double s, uint32_t bands, uint32_t rows) {
  assert(bands >= 1 && rows >= 1);
  s = std::clamp(s, 0.0, 1.0);
  // 1 - (1 - s^r)^b, computed as -expm1(b * log1p(-s^r)) to keep precision
  // when s^r is tiny or the result is near 1.
  return -std::expm1(bands * std::log1p(-std::pow(s, static_cast<double>(rows))));
}

BandingCost CostOf(Banding banding, double threshold, double fn_weight, double fp_weight,
                   double min_recall) {
  BandingCost result;
  GridPowers below(0.0, threshold), above(threshold, 1.0);
  for (uint32_t rows = 1; rows < banding.rows; ++rows) below.NextMiss(), above.NextMiss();
  const Grid& one_below = below.NextMiss();
  const Grid& one_above = above.NextMiss();
  BandCosts(threshold, one_below, one_above, banding.bands,
            [&](uint32_t bands, double fp, double fn) {
              if (bands == banding.bands) {
                result = MakeCost(banding, threshold, fp, fn, fn_weight, fp_weight, min_recall);
              }
            });
  return result;
}

std::vector<BandingCost> RankBandings(double threshold, uint32_t perms, double fn_weight,
                                      double fp_weight, double min_recall) {
  internal::RequireContract(threshold > 0 && threshold <= 1 && perms >= 1,
                            "RankBandings needs a threshold in (0, 1] and perms >= 1");
  std::vector<BandingCost> ranked;
  GridPowers below(0.0, threshold), above(threshold, 1.0);
  for (uint32_t rows = 1; rows <= perms; ++rows) {
    const Grid& one_below = below.NextMiss();
    const Grid& one_above = above.NextMiss();
    BandCosts(threshold, one_below, one_above, perms / rows,
              [&](uint32_t bands, double fp, double fn) {
                ranked.push_back(
                    MakeCost({bands, rows}, threshold, fp, fn, fn_weight, fp_weight, min_recall));
              });
  }
  std::sort(ranked.begin(), ranked.end(), Better);
  return ranked;
}

Banding ChooseBanding(double threshold, uint32_t perms, double fn_weight, double fp_weight,
                      double min_recall) {
  return RankBandings(threshold, perms, fn_weight, fp_weight, min_recall).front().banding;
}

Banding ResolveBanding(const MatchSettings& match, uint32_t perms, std::optional<Banding> kept) {
  if (match.bands != 0) return Banding{match.bands, match.rows};
  if (kept.has_value()) return *kept;
  return ChooseBanding(match.threshold, perms);
}

void BandKeys(absl::Span<const uint32_t> signature, Banding banding, absl::Span<uint64_t> out) {
  internal::RequireContract(
      out.size() == banding.bands && banding.rows >= 1 && banding.slots() <= signature.size(),
      "BandKeys needs out.size() == bands, rows >= 1 and bands * rows "
      "<= signature.size()");
  const uint32_t rows = banding.rows;
  for (uint32_t band = 0; band < banding.bands; ++band) {
    const uint32_t* slots = signature.data() + size_t{band} * rows;
    if (std::find(slots, slots + rows, kEmptySlot) != slots + rows) {
      out[band] = kNoBandKey;
      continue;
    }
    static_assert(std::endian::native == std::endian::little,
                  "band keys hash the little-endian bytes of the slots");
    const uint64_t key = XXH3_64bits_withSeed(slots, size_t{rows} * sizeof(uint32_t), band);
    out[band] = key == kNoBandKey ? 1 : key;
  }
}

}  // namespace kindred
