// Property: building an index and adding the rest of a corpus in several
// batches reports exactly the pairs that one sweep over the whole corpus
// finds (same banding, same threshold), and sweeping the index afterwards
// gives the same pairs and groups. Checked also against the brute-force
// oracle: no reported pair is below the threshold.
#include <catch2/catch.hpp>

#include "absl/strings/str_cat.h"
#include "kindred/index.h"
#include "kindred/index_match.h"
#include "kindred/index_writer.h"
#include "kindred/sweep.h"
#include "testlib/index_fixture.h"
#include "testlib/oracle.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

using testing::Slice;

struct Pair {
  uint32_t a, b, shared;
  double jaccard, estimate;
  friend bool operator==(const Pair&, const Pair&) = default;
  friend bool operator<(const Pair& x, const Pair& y) {
    return std::tie(x.a, x.b) < std::tie(y.a, y.b);
  }
};

std::vector<Pair> SweepPairs(const SignedCorpus& corpus, const IndexSettings& settings) {
  SweepOptions options;
  options.signature = settings.signature;
  options.match.threshold = settings.threshold;
  options.match.bands = settings.bands;
  options.match.rows = settings.rows;
  SweepResult result(settings.signature.perms);
  MatchCorpus(corpus, options, &result);
  std::vector<Pair> pairs;
  for (const ScoredPair& p : result.pairs) {
    pairs.push_back({p.a, p.b, p.shared, p.jaccard, p.estimate});
  }
  return pairs;
}

// Builds from the first cut (its own pairs from sweeping the new index),
// adds the others; collects every reported match as a pair of positions in
// `corpus`.
std::vector<Pair> IncrementalPairs(const SignedCorpus& corpus, const IndexSettings& settings,
                                   const std::vector<size_t>& cuts, const std::string& path,
                                   int threads) {
  REQUIRE(CreateIndex(path, settings, Slice(corpus, 0, cuts[0])).ok());
  std::vector<Pair> pairs;
  {
    auto reader = IndexReader::Open(path);
    REQUIRE(reader.ok());
    auto swept = SweepIndex(**reader, MatchSettings{settings.threshold}, KeepPolicy::kFirst, 1);
    REQUIRE(swept.ok());
    for (const ScoredPair& p : swept->pairs) {
      pairs.push_back({p.a, p.b, p.shared, p.jaccard, p.estimate});
    }
  }
  for (size_t c = 0; c + 1 < cuts.size(); ++c) {
    SignedCorpus batch = Slice(corpus, cuts[c], cuts[c + 1]);
    auto writer = IndexWriter::Open(path);
    REQUIRE(writer.ok());
    IndexMatchOptions options{{settings.threshold}, threads, false};
    auto matches = MatchAgainstIndex((*writer)->reader(), batch, options);
    REQUIRE(matches.ok());
    for (const IndexMatch& m : *matches) {
      uint32_t query = static_cast<uint32_t>(cuts[c]) + m.query();
      uint32_t other = m.in_index ? m.other() : static_cast<uint32_t>(cuts[c]) + m.other();
      pairs.push_back({std::min(query, other), std::max(query, other), m.pair.shared,
                       m.pair.jaccard, m.pair.estimate});
    }
    REQUIRE((*writer)->Append(batch, DuplicateIdPolicy::kError).ok());
  }
  std::sort(pairs.begin(), pairs.end());
  return pairs;
}

TEST_CASE("build + add in batches matches one sweep over the union", "[property]") {
  IndexSettings settings = testing::TestIndexSettings(32, 16, 2);
  settings.threshold = 0.6;
  for (uint64_t seed : {31, 32, 33}) {
    CAPTURE(seed);
    SignedCorpus corpus =
        testing::SignTexts(testing::MakeTexts(seed, 90, 40, "p"), settings.signature);
    std::vector<Pair> expected = SweepPairs(corpus, settings);
    REQUIRE(expected.size() >= 10);  // the corpus has near-duplicates to find
    std::vector<std::vector<size_t>> splits = {
        {0, 90}, {30, 90}, {10, 40, 41, 70, 90}, {1, 2, 3, 50, 89, 90}};
    for (const auto& cuts : splits) {
      testing::TempDir dir;
      for (int threads : {1, 3}) {
        std::string path = dir.File(absl::StrCat("p", threads, ".kin"));
        REQUIRE(IncrementalPairs(corpus, settings, cuts, path, threads) == expected);
      }
      // Sweeping the finished index (no corpus re-read) gives the same pairs.
      auto reader = IndexReader::Open(dir.File("p1.kin"));
      REQUIRE(reader.ok());
      auto swept = SweepIndex(**reader, MatchSettings{settings.threshold}, KeepPolicy::kLongest, 2);
      REQUIRE(swept.ok());
      std::vector<Pair> from_index;
      for (const ScoredPair& p : swept->pairs) {
        from_index.push_back({p.a, p.b, p.shared, p.jaccard, p.estimate});
      }
      REQUIRE(from_index == expected);
      REQUIRE_FALSE(swept->groups.empty());
    }
    // Oracle: every reported pair really is at or above the threshold.
    std::vector<std::vector<uint64_t>> sets;
    for (size_t i = 0; i < corpus.size(); ++i) {
      sets.emplace_back(corpus.shingles(i).begin(), corpus.shingles(i).end());
    }
    auto oracle = testing::AllPairsAtLeast(sets, settings.threshold);
    for (const Pair& p : expected) {
      REQUIRE(std::any_of(oracle.begin(), oracle.end(), [&](const testing::OraclePair& o) {
        return o.a == p.a && o.b == p.b && o.jaccard == Approx(p.jaccard);
      }));
    }
  }
}

}  // namespace
}  // namespace kindred
