// Candidate pairs from LSH banding, against a brute-force comparison of band
// keys, and the handling of crowded buckets.
#include "kindred/candidates.h"

#include <catch2/catch.hpp>
#include <map>
#include <set>

#include "absl/strings/str_cat.h"
#include "kindred/groups.h"
#include "kindred/signer.h"
#include "testlib/similar_sets.h"

namespace kindred {
namespace {

using testing::SplitMix64;

// A corpus of `n` documents: clusters of random sets with shared cores, so
// that many pairs share some bands and many share none.
// `lean`: keep only the band keys of `lean` (see SignedCorpus::Lean).
SignedCorpus MakeCorpus(size_t n, uint64_t seed, Banding lean = {0, 0}) {
  SignatureSettings settings;
  const Signer signer(settings);
  SignedCorpus corpus =
      lean.bands != 0 ? SignedCorpus::Lean(settings.perms, lean) : SignedCorpus(settings.perms);
  SplitMix64 random(seed);
  std::vector<uint64_t> core;
  std::vector<uint32_t> signature(settings.perms);
  for (size_t doc = 0; doc < n; ++doc) {
    if (doc % 5 == 0) {
      core.clear();
      for (int i = 0; i < 200; ++i) core.push_back(random.Next());
    }
    std::vector<uint64_t> set = core;
    for (int i = 0; i < static_cast<int>(random.Between(0, 60)); ++i) set.push_back(random.Next());
    std::sort(set.begin(), set.end());
    set.erase(std::unique(set.begin(), set.end()), set.end());
    signer.Sign(set, absl::MakeSpan(signature));
    corpus.Add(absl::StrCat("d", doc), KeepFacts{}, DocumentOrigin{}, set, signature);
  }
  return corpus;
}

TEST_CASE("Candidates are exactly the pairs sharing a band key", "[candidates]") {
  // Over 1024 entries per band: the partitioned sort, not only std::sort.
  const SignedCorpus corpus = MakeCorpus(3000, 5);
  const Banding banding{16, 8};
  std::vector<std::vector<uint64_t>> keys(corpus.size(), std::vector<uint64_t>(banding.bands));
  for (size_t doc = 0; doc < corpus.size(); ++doc) {
    BandKeys(corpus.signature(doc), banding, absl::MakeSpan(keys[doc]));
  }
  std::vector<PackedPair> expected;
  for (uint32_t a = 0; a < corpus.size(); ++a) {
    for (uint32_t b = a + 1; b < corpus.size(); ++b) {
      for (uint32_t band = 0; band < banding.bands; ++band) {
        if (keys[a][band] == keys[b][band]) {
          expected.push_back(PackPair(a, b));
          break;
        }
      }
    }
  }
  REQUIRE(expected.size() > 100);
  // Bucket sizes by brute force: most keys are unique (buckets of one are
  // counted without being sorted), a few buckets hold a cluster.
  uint64_t entries = 0, largest = 0;
  for (uint32_t band = 0; band < banding.bands; ++band) {
    std::map<uint64_t, uint64_t> sizes;
    for (const auto& doc_keys : keys) {
      if (doc_keys[band] != kNoBandKey) largest = std::max(largest, ++sizes[doc_keys[band]]);
      entries += doc_keys[band] != kNoBandKey;
    }
  }
  REQUIRE(largest >= 2);
  for (int threads : {1, 2, 5}) {
    CandidateStats stats;
    CHECK(FindCandidatePairs(corpus, banding, threads, &stats) == expected);
    CHECK(stats.candidate_pairs == expected.size());
    CHECK(stats.oversized_buckets == 0);
    CHECK(stats.bucket_entries == entries);
    CHECK(stats.largest_bucket == largest);
  }
  // A lean corpus of the same documents keeps the keys and gives the same.
  const SignedCorpus lean = MakeCorpus(3000, 5, banding);
  CandidateStats stats;
  CHECK(FindCandidatePairs(lean, banding, 2, &stats) == expected);
}

TEST_CASE("Crowded buckets pair every member with the first only", "[candidates]") {
  // 300 copies of one template: every band is one bucket of 300 documents.
  SignatureSettings settings;
  const Signer signer(settings);
  SignedCorpus corpus(settings.perms);
  std::vector<uint64_t> set;
  SplitMix64 random(9);
  for (int i = 0; i < 100; ++i) set.push_back(random.Next());
  std::sort(set.begin(), set.end());
  std::vector<uint32_t> signature(settings.perms);
  signer.Sign(set, absl::MakeSpan(signature));
  for (int doc = 0; doc < 300; ++doc) {
    corpus.Add(absl::StrCat("t", doc), KeepFacts{}, DocumentOrigin{}, set, signature);
  }
  CandidateStats stats;
  const auto pairs = FindCandidatePairs(corpus, Banding{16, 8}, 2, &stats, /*max_bucket=*/50);
  CHECK(stats.oversized_buckets == 16);
  CHECK(stats.largest_bucket == 300);
  REQUIRE(pairs.size() == 299);  // (0, x) for every other member, not 300*299/2
  for (PackedPair pair : pairs) CHECK(PairFirst(pair) == 0);

  // The grouping still puts every copy in one group.
  std::vector<ScoredPair> scored;
  for (PackedPair pair : pairs) scored.push_back(ScoredPair{PairFirst(pair), PairSecond(pair)});
  const std::vector<KeepFacts> facts(300);
  const auto groups = GroupPairs(scored, facts, KeepPolicy::kFirst);
  REQUIRE(groups.size() == 1);
  CHECK(groups[0].members.size() == 300);

  // Under the cap, all pairs.
  CandidateStats uncapped;
  CHECK(FindCandidatePairs(corpus, Banding{16, 8}, 2, &uncapped, 1000).size() == 300 * 299 / 2);
  CHECK(uncapped.oversized_buckets == 0);
}

TEST_CASE("Empty documents are in no bucket", "[candidates]") {
  SignatureSettings settings;
  const Signer signer(settings);
  SignedCorpus corpus(settings.perms);
  std::vector<uint32_t> signature(settings.perms);
  signer.Sign({}, absl::MakeSpan(signature));
  for (int doc = 0; doc < 3; ++doc) {
    corpus.Add(absl::StrCat("e", doc), KeepFacts{}, DocumentOrigin{}, {}, signature);
  }
  CandidateStats stats;
  CHECK(FindCandidatePairs(corpus, Banding{16, 8}, 1, &stats).empty());
  CHECK(stats.bucket_entries == 0);
}

// Regression: an empty full corpus indexed the first key column of an empty
// vector (undefined behaviour, caught by the sanitizer suite).
TEST_CASE("An empty corpus has no candidates", "[candidates]") {
  SignatureSettings settings;
  for (const bool lean : {false, true}) {
    const SignedCorpus corpus = lean ? SignedCorpus::Lean(settings.perms, Banding{16, 8})
                                     : SignedCorpus(settings.perms);
    for (int threads : {1, 3}) {
      CandidateStats stats;
      CHECK(FindCandidatePairs(corpus, Banding{16, 8}, threads, &stats).empty());
      CHECK(stats.bucket_entries == 0);
    }
  }
}

}  // namespace
}  // namespace kindred
