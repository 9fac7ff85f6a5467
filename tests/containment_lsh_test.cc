// Tests of the containment LSH (LSH Ensemble) and its candidate search.
//
// External references:
//  - LSH Ensemble (Zhu, Nargesian, Pu, Miller, VLDB 2016), section 4: a pair
//    of sizes q <= x and containment c has Jaccard c q / (q + x - c q), and a
//    MinHash banding of b bands of r rows proposes it with probability
//    1 - (1 - s^r)^b (the banding curve: Leskovec, Rajaraman, Ullman,
//    "Mining of Massive Datasets", section 3.4.2).
//  - Binomial confidence bands: textbook sampling theory, 4.5 sigma.
#include "kindred/containment_lsh.h"

#include <algorithm>
#include <catch2/catch.hpp>
#include <cmath>
#include <string>
#include <vector>

#include "kindred/containment_candidates.h"
#include "kindred/signer.h"
#include "testlib/similar_sets.h"

namespace kindred {
namespace {

using Catch::Matchers::WithinAbs;
using testing::SplitMix64;

TEST_CASE("Jaccard at a containment follows c q / (q + x - c q)", "[containment]") {
  // Worked by hand: c = 1, q = 10, x = 100: 10 / 100.
  CHECK_THAT(JaccardAtContainment(1.0, 10, 100), WithinAbs(0.1, 1e-15));
  // Equal sizes, half shared: 5 / 15.
  CHECK_THAT(JaccardAtContainment(0.5, 10, 10), WithinAbs(1.0 / 3, 1e-15));
  CHECK(JaccardAtContainment(0.0, 10, 100) == 0.0);
  // Banding of the Jaccard value: 1 - (1 - 0.1^2)^3 = 1 - 0.99^3.
  CHECK_THAT(ContainmentCandidateProbability(1.0, 10, 100, {3, 2}),
             WithinAbs(1 - 0.99 * 0.99 * 0.99, 1e-12));
}

TEST_CASE("partitions double in size from the lower bound", "[containment]") {
  ContainmentPlanOptions options;
  options.threshold = 0.7;
  options.min_size = 20;
  options.largest_size = 100;
  const ContainmentPlan plan(options);
  REQUIRE(plan.partitions().size() == 3);
  CHECK(plan.partitions()[0].lower == 20);
  CHECK(plan.partitions()[0].upper == 39);
  CHECK(plan.partitions()[1].lower == 40);
  CHECK(plan.partitions()[2].upper == 159);
  CHECK(plan.PartitionOf(19) == -1);
  CHECK(plan.PartitionOf(20) == 0);
  CHECK(plan.PartitionOf(40) == 1);
  CHECK(plan.PartitionOf(100000) == 2);
  REQUIRE(plan.pairs().size() == 6);
  for (uint32_t i = 0; i < 3; ++i) {
    for (uint32_t j = i; j < 3; ++j) {
      CHECK(plan.PairOf(i, j).small == i);
      CHECK(plan.PairOf(i, j).large == j);
    }
  }
}

TEST_CASE(
    "each partition pair's banding meets the recall floor at its bounds "
    "when it can",
    "[containment]") {
  for (double t : {0.5, 0.7, 0.9}) {
    ContainmentPlanOptions options;
    options.threshold = t;
    options.largest_size = 50000;
    const ContainmentPlan plan(options);
    for (const PartitionBanding& pair : plan.pairs()) {
      CAPTURE(t, pair.small, pair.large, pair.banding.bands, pair.banding.rows);
      CHECK(pair.banding.slots() <= options.perms);
      const double q = plan.partitions()[pair.small].lower;
      const double x = plan.partitions()[pair.large].upper;
      const double at_recall = ContainmentCandidateProbability(RecallPoint(t), q, x, pair.banding);
      CHECK_THAT(pair.probability_at_recall_point, WithinAbs(at_recall, 1e-12));
      // Bounds up to a size ratio of 8 can always be served by 128 perms: at
      // t = 0.5, s(0.55; 1, 8) = 0.0655 and 1 - (1 - 0.0655)^128 > 0.9998.
      if (x / q <= 8) CHECK(pair.meets_recall_floor);
      if (!pair.meets_recall_floor) CHECK(pair.banding == (Banding{options.perms, 1}));
      // The bounds are the worst case: any q, x inside the partitions do
      // better.
      const double q_inside = plan.partitions()[pair.small].upper;
      const double x_inside = plan.partitions()[pair.large].lower;
      if (q_inside <= x_inside) {
        CHECK(ContainmentCandidateProbability(RecallPoint(t), q_inside, x_inside, pair.banding) >=
              at_recall);
      }
    }
  }
}

// `count` distinct random shingle hashes.
std::vector<uint64_t> RandomHashes(SplitMix64& random, size_t count) {
  std::vector<uint64_t> values(count);
  for (uint64_t& value : values) value = random.Next();
  return values;
}

// A corpus of `pairs` controlled pairs: document 2k (q shingles) lies with
// containment c = shared / q inside document 2k + 1 (x shingles).
SignedCorpus ControlledPairs(SignerScheme scheme, uint32_t q, uint32_t x, uint32_t shared,
                             int pairs, uint64_t seed) {
  SignatureSettings settings;
  settings.scheme = scheme;
  const Signer signer(settings);
  SignedCorpus corpus(settings.perms);
  SplitMix64 random(seed);
  for (int p = 0; p < pairs; ++p) {
    std::vector<uint64_t> small = RandomHashes(random, q);
    std::vector<uint64_t> large(small.begin(), small.begin() + shared);
    const std::vector<uint64_t> rest = RandomHashes(random, x - shared);
    large.insert(large.end(), rest.begin(), rest.end());
    for (auto* set : {&small, &large}) {
      std::sort(set->begin(), set->end());
      corpus.Add(std::to_string(corpus.size()), KeepFacts{}, DocumentOrigin{}, *set,
                 signer.Sign(*set));
    }
  }
  return corpus;
}

TEST_CASE(
    "observed candidate rates by containment match the LSH Ensemble "
    "probability",
    "[containment]") {
  // Each case: sizes q <= x of two partitions, the plan's banding for them,
  // and containments where the predicted rate is between 0.05 and 0.95 (so
  // the check can fail both ways). Observed within 4.5 sigma plus one pair.
  struct Case {
    SignerScheme scheme;
    double threshold;
    uint32_t q, x;
  };
  const int kPairs = 400;
  for (const Case& c :
       {Case{SignerScheme::kClassic, 0.7, 300, 1500}, Case{SignerScheme::kClassic, 0.5, 600, 4000},
        Case{SignerScheme::kOnePermutation, 0.7, 300, 1500},
        Case{SignerScheme::kOnePermutation, 0.9, 500, 700},
        Case{SignerScheme::kOnePermutation, 0.5, 600, 4000}}) {
    ContainmentPlanOptions options;
    options.threshold = c.threshold;
    options.largest_size = c.x;
    const ContainmentPlan plan(options);
    const Banding banding = plan.PairOf(plan.PartitionOf(c.q), plan.PartitionOf(c.x)).banding;
    int tested = 0;
    for (uint32_t shared = c.q / 20; shared <= c.q; shared += c.q / 20) {
      const double containment = static_cast<double>(shared) / c.q;
      const double expected = ContainmentCandidateProbability(containment, c.q, c.x, banding);
      if (expected < 0.05 || expected > 0.95) continue;
      ++tested;
      CAPTURE(SignerSchemeName(c.scheme), c.threshold, c.q, c.x, containment, banding.bands,
              banding.rows, expected);
      const SignedCorpus corpus = ControlledPairs(c.scheme, c.q, c.x, shared, kPairs, shared);
      ContainmentCandidateStats stats;
      const std::vector<PackedPair> found = FindContainmentCandidates(corpus, plan, 2, &stats);
      int hits = 0;
      for (PackedPair pair : found) {
        hits += PairSecond(pair) == PairFirst(pair) + 1 && PairFirst(pair) % 2 == 0;
      }
      const double observed = static_cast<double>(hits) / kPairs;
      CAPTURE(observed);
      const double sigma = std::sqrt(expected * (1 - expected) / kPairs);
      CHECK(std::abs(observed - expected) <= 4.5 * sigma + 1.0 / kPairs);
    }
    CHECK(tested >= 2);
  }
}

TEST_CASE("containment candidates leave out small sets and cap crowded buckets", "[containment]") {
  SignatureSettings settings;
  const Signer signer(settings);
  SignedCorpus corpus(settings.perms);
  SplitMix64 random(7);
  const std::vector<uint64_t> big = [&] {
    auto values = RandomHashes(random, 400);
    std::sort(values.begin(), values.end());
    return values;
  }();
  corpus.Add("big", KeepFacts{}, DocumentOrigin{}, big, signer.Sign(big));
  // Ten small sets inside the big one: five of 10 shingles (under the bound
  // of 20), and five copies of its first 30.
  for (uint32_t size : {10u, 10u, 10u, 10u, 10u, 30u, 30u, 30u, 30u, 30u}) {
    const size_t from = size == 10 ? 100 + corpus.size() * 10 : 0;
    std::vector<uint64_t> part(big.begin() + from, big.begin() + from + size);
    corpus.Add(std::to_string(corpus.size()), KeepFacts{}, DocumentOrigin{}, part,
               signer.Sign(part));
  }
  ContainmentPlanOptions options;
  options.threshold = 0.9;
  const ContainmentPlan plan = PlanForCorpus(corpus, options);
  ContainmentCandidateStats stats;
  const std::vector<PackedPair> found = FindContainmentCandidates(corpus, plan, 1, &stats);
  CHECK(stats.below_min_size == 5);
  for (PackedPair pair : found) {
    CHECK(corpus.shingle_count(PairFirst(pair)) >= 20);
    CHECK(corpus.shingle_count(PairSecond(pair)) >= 20);
  }
  // The five of 30 are each found inside the big one.
  for (uint32_t doc = 6; doc <= 10; ++doc) {
    CHECK(std::binary_search(found.begin(), found.end(), PackPair(0, doc)));
  }
  // The copies are found with one another too.
  CHECK(std::binary_search(found.begin(), found.end(), PackPair(6, 10)));
  // With a cap of 2, buckets of three or more pair their members with the
  // first only: every bucket of the copies holds all five (and the big one
  // under the bandings of their partition with its), so each copy is paired
  // with the big one and with the first copy only: fewer pairs, counted.
  ContainmentCandidateStats capped;
  const std::vector<PackedPair> few = FindContainmentCandidates(corpus, plan, 1, &capped, 2);
  CHECK(capped.oversized_buckets > 0);
  CHECK(few.size() < found.size());
  CHECK(std::includes(found.begin(), found.end(), few.begin(), few.end()));
  for (PackedPair pair : few) CHECK((PairFirst(pair) == 0 || PairFirst(pair) == 6));
  CHECK(!std::binary_search(few.begin(), few.end(), PackPair(7, 8)));
}

TEST_CASE("containment candidates do not depend on the thread count", "[containment]") {
  const SignedCorpus corpus = ControlledPairs(SignerScheme::kOnePermutation, 200, 900, 150, 60, 3);
  ContainmentPlanOptions options;
  options.threshold = 0.6;
  const ContainmentPlan plan = PlanForCorpus(corpus, options);
  ContainmentCandidateStats one, three;
  CHECK(FindContainmentCandidates(corpus, plan, 1, &one) ==
        FindContainmentCandidates(corpus, plan, 3, &three));
  CHECK(one.candidate_pairs == three.candidate_pairs);
  CHECK(one.bucket_entries == three.bucket_entries);
}

}  // namespace
}  // namespace kindred
