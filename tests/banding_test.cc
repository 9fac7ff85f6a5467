// Tests of LSH banding.
//
// External references:
//  - The banding candidate probability 1 - (1 - s^r)^b (Leskovec, Rajaraman,
//    Ullman, "Mining of Massive Datasets", section 3.4.2).
//  - Closed-form integrals of the curve for b = 1 or r = 1 (elementary
//    calculus, worked below).
//  - Binomial confidence bands: textbook sampling theory, 4.5 sigma.
#include "kindred/banding.h"

#include <algorithm>
#include <catch2/catch.hpp>
#include <cmath>
#include <set>
#include <vector>

#include "kindred/settings.h"
#include "kindred/signer.h"
#include "testlib/similar_sets.h"

namespace kindred {
namespace {

using Catch::Matchers::WithinAbs;
using testing::MakeSetPair;
using testing::SplitMix64;

TEST_CASE("candidate probability follows 1-(1-s^r)^b", "[banding]") {
  // Worked by hand from the formula.
  CHECK_THAT(CandidateProbability(0.5, 1, 1), WithinAbs(0.5, 1e-15));
  CHECK_THAT(CandidateProbability(0.5, 2, 1), WithinAbs(0.75, 1e-15));           // 1 - 0.5^2
  CHECK_THAT(CandidateProbability(0.5, 1, 2), WithinAbs(0.25, 1e-15));           // 0.5^2
  CHECK_THAT(CandidateProbability(0.5, 2, 2), WithinAbs(0.4375, 1e-15));         // 1 - 0.75^2
  CHECK_THAT(CandidateProbability(0.5, 4, 3), WithinAbs(1695.0 / 4096, 1e-15));  // 1-(7/8)^4
  // 0.8^8 = 0.16777216 (exact); 1 - 0.83222784^16 = 0.9470487962 (computed
  // independently with Python's float arithmetic, /usr/bin/python3).
  CHECK_THAT(CandidateProbability(0.8, 16, 8), WithinAbs(0.9470487962, 1e-9));
  CHECK(CandidateProbability(0.0, 20, 5) == 0.0);
  CHECK(CandidateProbability(1.0, 20, 5) == 1.0);
  // Monotone in s, in bands; decreasing in rows.
  CHECK(CandidateProbability(0.6, 10, 5) < CandidateProbability(0.7, 10, 5));
  CHECK(CandidateProbability(0.6, 10, 5) < CandidateProbability(0.6, 11, 5));
  CHECK(CandidateProbability(0.6, 10, 5) > CandidateProbability(0.6, 10, 6));
}

TEST_CASE("the masses match closed-form integrals", "[banding]") {
  const double t = 0.8;
  for (uint32_t r : {1u, 2u, 5u, 10u}) {
    // b = 1: P(s) = s^r. FP = t^(r+1)/(r+1); FN = (1-t) - (1-t^(r+1))/(r+1).
    CAPTURE(r);
    const BandingCost cost = CostOf({1, r}, t, 1.0, 1.0);
    CHECK_THAT(cost.false_positive_mass, WithinAbs(std::pow(t, r + 1) / (r + 1), 1e-9));
    CHECK_THAT(cost.false_negative_mass,
               WithinAbs((1 - t) - (1 - std::pow(t, r + 1)) / (r + 1), 1e-9));
  }
  for (uint32_t b : {2u, 7u, 30u}) {
    // r = 1: P(s) = 1 - (1-s)^b. FN = (1-t)^(b+1)/(b+1);
    // FP = t - (1 - (1-t)^(b+1))/(b+1).
    CAPTURE(b);
    const BandingCost cost = CostOf({b, 1}, t, 2.0, 3.0);
    const double fn = std::pow(1 - t, b + 1) / (b + 1);
    const double fp = t - (1 - std::pow(1 - t, b + 1)) / (b + 1);
    CHECK_THAT(cost.false_negative_mass, WithinAbs(fn, 1e-9));
    CHECK_THAT(cost.false_positive_mass, WithinAbs(fp, 1e-9));
    CHECK_THAT(cost.weighted, WithinAbs(2.0 * fn + 3.0 * fp, 1e-8));
  }
}

// Observed candidate rate of `pairs` pairs of sets of Jaccard tenths/10,
// signed with `scheme` and banded with `banding`.
double ObservedCandidateRate(SignerScheme scheme, Banding banding, int tenths, int pairs,
                             uint64_t seed) {
  SignatureSettings settings;
  settings.scheme = scheme;
  settings.perms = 128;
  const Signer signer(settings);
  SplitMix64 random(seed);
  std::vector<uint64_t> keys_a(banding.bands), keys_b(banding.bands);
  int candidates = 0;
  for (int p = 0; p < pairs; ++p) {
    const uint64_t union_size = 10 * random.Between(30, 80);
    const auto pair = MakeSetPair(random, union_size, union_size * tenths / 10);
    BandKeys(signer.Sign(pair.a), banding, absl::MakeSpan(keys_a));
    BandKeys(signer.Sign(pair.b), banding, absl::MakeSpan(keys_b));
    bool shared = false;
    for (uint32_t i = 0; i < banding.bands; ++i) shared |= keys_a[i] == keys_b[i];
    candidates += shared;
  }
  return static_cast<double>(candidates) / pairs;
}

TEST_CASE("observed candidate rates match the S-curve", "[banding]") {
  // Pairs of known similarity s become candidates at the rate
  // 1 - (1 - s^r)^b within a binomial 4.5-sigma band (plus one pair of
  // slack for the discreteness of the count).
  struct Case {
    SignerScheme scheme;
    Banding banding;
    int pairs;
  };
  for (const Case& c : {Case{SignerScheme::kOnePermutation, {16, 8}, 2000},
                        Case{SignerScheme::kOnePermutation, {32, 4}, 2000},
                        Case{SignerScheme::kClassic, {16, 8}, 400}}) {
    for (int tenths : {3, 5, 6, 7, 8, 9}) {
      CAPTURE(SignerSchemeName(c.scheme), c.banding.bands, c.banding.rows, tenths);
      const double expected = CandidateProbability(tenths / 10.0, c.banding.bands, c.banding.rows);
      const double observed = ObservedCandidateRate(c.scheme, c.banding, tenths, c.pairs,
                                                    1000 + tenths + 10 * c.banding.rows);
      const double sigma = std::sqrt(expected * (1 - expected) / c.pairs);
      CHECK(std::abs(observed - expected) <= 4.5 * sigma + 1.0 / c.pairs);
    }
  }
}

TEST_CASE("RankBandings lists every banding once, best first", "[banding]") {
  for (uint32_t perms : {1u, 7u, 64u, 128u}) {
    CAPTURE(perms);
    const std::vector<BandingCost> ranked = RankBandings(0.7, perms);
    size_t expected_count = 0;
    for (uint32_t r = 1; r <= perms; ++r) expected_count += perms / r;
    REQUIRE(ranked.size() == expected_count);
    std::set<std::pair<uint32_t, uint32_t>> seen;
    for (size_t i = 0; i < ranked.size(); ++i) {
      const BandingCost& c = ranked[i];
      CHECK(c.banding.slots() <= perms);
      CHECK(seen.insert({c.banding.bands, c.banding.rows}).second);
      CHECK(c.false_positive_mass >= 0);
      CHECK(c.false_positive_mass <= 0.7 + 1e-12);
      CHECK(c.false_negative_mass >= 0);
      CHECK(c.false_negative_mass <= 0.3 + 1e-12);
      CHECK(c.meets_recall_floor == (c.probability_at_recall_point >= kDefaultMinRecall));
      if (i > 0) {
        const BandingCost& prev = ranked[i - 1];
        CHECK((prev.meets_recall_floor > c.meets_recall_floor ||
               (prev.meets_recall_floor == c.meets_recall_floor &&
                prev.weighted <= c.weighted + 1e-12)));
      }
    }
    CHECK(ChooseBanding(0.7, perms) == ranked.front().banding);
  }
}

TEST_CASE("without a recall floor the weights decide", "[banding]") {
  // Equal weights, no floor: the minimum of FN + FP over all bandings.
  const std::vector<BandingCost> ranked = RankBandings(0.8, 128, 1.0, 1.0, 0.0);
  for (const BandingCost& c : ranked) CHECK(ranked.front().weighted <= c.weighted + 1e-12);
  // Only misses count: the choice has the least miss mass, and among
  // near-ties (within 1e-12) the fewest slots.
  const std::vector<BandingCost> misses = RankBandings(0.8, 128, 1.0, 0.0, 0.0);
  for (const BandingCost& c : misses) {
    CHECK(misses.front().false_negative_mass <= c.false_negative_mass + 1e-12);
    if (c.weighted <= misses.front().weighted + 1e-12) {
      CHECK(misses.front().banding.slots() <= c.banding.slots());
    }
  }
  // Only false candidates count: the same with the false candidate mass.
  const std::vector<BandingCost> false_candidates = RankBandings(0.8, 128, 0.0, 1.0, 0.0);
  for (const BandingCost& c : false_candidates) {
    CHECK(false_candidates.front().false_positive_mass <= c.false_positive_mass + 1e-12);
  }
}

TEST_CASE("the automatic choice keeps recall 0.99 just above the threshold", "[banding]") {
  // The product bar: recall >= 0.99 for pairs 0.05 above the threshold at
  // t = 0.8 with 128 perms.
  const Banding chosen = ChooseBanding(0.8, 128);
  CHECK(CandidateProbability(0.85, chosen.bands, chosen.rows) >= 0.99);
  for (uint32_t perms : {32u, 64u, 128u, 256u}) {
    for (double t : {0.3, 0.5, 0.6, 0.7, 0.75, 0.8, 0.85, 0.9, 0.95, 1.0}) {
      CAPTURE(perms, t);
      const Banding b = ChooseBanding(t, perms);
      CHECK(b.slots() <= perms);
      CHECK(CandidateProbability(RecallPoint(t), b.bands, b.rows) >= 0.99);
    }
  }
  CHECK(RecallPoint(0.8) == Approx(0.85));
  CHECK(RecallPoint(0.96) == Approx(0.98));
  CHECK(RecallPoint(1.0) == 1.0);
}

TEST_CASE("band keys are deterministic and skip empty slots", "[banding]") {
  SignatureSettings settings;
  const Signer signer(settings);
  SplitMix64 random(5);
  std::vector<uint64_t> set(200);
  for (uint64_t& x : set) x = random.Next();
  std::sort(set.begin(), set.end());
  std::vector<uint32_t> sig = signer.Sign(set);
  const Banding banding{20, 6};  // 120 of 128 slots
  std::vector<uint64_t> keys(20), again(20), changed(20);
  BandKeys(sig, banding, absl::MakeSpan(keys));
  BandKeys(sig, banding, absl::MakeSpan(again));
  CHECK(keys == again);
  CHECK(std::count(keys.begin(), keys.end(), kNoBandKey) == 0);
  // Equal slots in different bands still give different keys (seeded by band).
  std::vector<uint32_t> constant(128, 42);
  BandKeys(constant, banding, absl::MakeSpan(changed));
  CHECK(std::set<uint64_t>(changed.begin(), changed.end()).size() == 20);
  // Changing one slot changes exactly its band's key; slots past the last
  // band are unused.
  sig[6 * 3 + 2] ^= 1;
  sig[127] ^= 1;
  BandKeys(sig, banding, absl::MakeSpan(changed));
  for (uint32_t i = 0; i < 20; ++i) CHECK((changed[i] != keys[i]) == (i == 3));
  // An empty slot makes its band keyless; the empty set has no keys at all.
  sig[0] = kEmptySlot;
  BandKeys(sig, banding, absl::MakeSpan(changed));
  CHECK(changed[0] == kNoBandKey);
  BandKeys(signer.Sign({}), banding, absl::MakeSpan(changed));
  CHECK(changed == std::vector<uint64_t>(20, kNoBandKey));
}

TEST_CASE("a banding left open is kept or chosen, a given one used", "[banding]") {
  MatchSettings match;
  match.threshold = 0.6;
  const Banding chosen = ChooseBanding(0.6, 128);
  CHECK(ResolveBanding(match, 128) == chosen);
  CHECK(ResolveBanding(match, 128, Banding{5, 3}) == Banding{5, 3});
  match.bands = 10;
  match.rows = 12;
  CHECK(ResolveBanding(match, 128) == Banding{10, 12});
  CHECK(ResolveBanding(match, 128, Banding{5, 3}) == Banding{10, 12});
}

}  // namespace
}  // namespace kindred
