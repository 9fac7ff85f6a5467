// The one-shot pipeline end to end through the library: the exhaustive mode
// against the brute-force oracle, LSH recall against the exhaustive mode, and
// thread-count independence.
#include "kindred/sweep.h"

#include <catch2/catch.hpp>
#include <set>

#include "absl/strings/str_cat.h"
#include "kindred/records.h"
#include "kindred/shingles.h"
#include "testlib/oracle.h"
#include "testlib/similar_sets.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

using testing::SplitMix64;

// A corpus of unrelated random-word documents plus planted near-duplicates
// made by replacing a fraction of the words of an earlier document.
std::string PlantedCorpus(uint64_t seed, int originals, int copies) {
  SplitMix64 random(seed);
  std::vector<std::string> vocabulary;
  for (int w = 0; w < 3000; ++w) {
    std::string word;
    const int length = static_cast<int>(random.Between(3, 9));
    for (int c = 0; c < length; ++c) word.push_back(static_cast<char>('a' + random.Between(0, 25)));
    vocabulary.push_back(word);
  }
  std::vector<std::vector<int>> docs;
  for (int d = 0; d < originals; ++d) {
    std::vector<int> words(random.Between(150, 400));
    for (int& word : words) word = static_cast<int>(random.Between(0, vocabulary.size() - 1));
    docs.push_back(words);
  }
  const double edit_rates[] = {0.0, 0.005, 0.01, 0.015, 0.02, 0.03, 0.05, 0.08};
  for (int c = 0; c < copies; ++c) {
    std::vector<int> words = docs[random.Between(0, docs.size() - 1)];
    const double rate = edit_rates[random.Between(0, 7)];
    for (int& word : words) {
      if (random.Between(0, 99999) < rate * 100000) {
        word = static_cast<int>(random.Between(0, vocabulary.size() - 1));
      }
    }
    docs.push_back(words);
  }
  std::string jsonl;
  for (size_t d = 0; d < docs.size(); ++d) {
    std::string text;
    for (int word : docs[d]) absl::StrAppend(&text, text.empty() ? "" : " ", vocabulary[word]);
    absl::StrAppend(&jsonl, "{\"id\":\"doc", d, "\",\"text\":\"", text, "\"}\n");
  }
  return jsonl;
}

SweepResult Sweep(const std::string& path, SweepOptions options) {
  auto reader = CorpusReader::Open({path}, InputOptions{});
  REQUIRE(reader.ok());
  auto result = RunSweep(**reader, options);
  REQUIRE(result.ok());
  return *std::move(result);
}

std::vector<std::vector<uint64_t>> ShingleSetsOf(const SignedCorpus& corpus) {
  std::vector<std::vector<uint64_t>> sets;
  for (size_t doc = 0; doc < corpus.size(); ++doc) {
    const auto set = corpus.shingles(doc);
    sets.emplace_back(set.begin(), set.end());
  }
  return sets;
}

TEST_CASE("Exhaustive sweep finds exactly the oracle's pairs", "[sweep]") {
  testing::TempDir dir;
  const std::string path = dir.Write("corpus.jsonl", PlantedCorpus(1, 150, 120));
  SweepOptions options;
  options.exhaustive = true;
  options.sign.threads = 2;
  const SweepResult result = Sweep(path, options);
  const auto oracle = testing::AllPairsAtLeast(ShingleSetsOf(result.corpus), 0.8);
  REQUIRE(result.pairs.size() == oracle.size());
  REQUIRE(!oracle.empty());
  for (size_t i = 0; i < oracle.size(); ++i) {
    CHECK(result.pairs[i].a == oracle[i].a);
    CHECK(result.pairs[i].b == oracle[i].b);
    CHECK(result.pairs[i].jaccard == Approx(oracle[i].jaccard));
  }
}

TEST_CASE("LSH sweep keeps recall >= 0.99 above threshold + 0.05 and reports nothing below",
          "[sweep]") {
  testing::TempDir dir;
  const std::string path = dir.Write("corpus.jsonl", PlantedCorpus(2, 600, 900));
  for (SignerScheme scheme : {SignerScheme::kOnePermutation, SignerScheme::kClassic}) {
    for (double threshold : {0.5, 0.8}) {
      SweepOptions options;
      options.signature.scheme = scheme;
      options.match.threshold = threshold;
      options.sign.threads = 2;
      const SweepResult lsh = Sweep(path, options);
      options.exhaustive = true;
      const SweepResult exact = Sweep(path, options);
      std::set<std::pair<uint32_t, uint32_t>> found;
      for (const ScoredPair& pair : lsh.pairs) {
        CHECK(pair.jaccard >= threshold - 1e-9);
        found.insert({pair.a, pair.b});
      }
      size_t high = 0, high_found = 0;
      for (const ScoredPair& pair : exact.pairs) {
        if (pair.jaccard < threshold + 0.05) continue;
        ++high;
        high_found += found.count({pair.a, pair.b});
      }
      INFO(SignerSchemeName(scheme) << " t=" << threshold << ": " << high_found << " of " << high);
      REQUIRE(high >= 200);
      CHECK(static_cast<double>(high_found) >= 0.99 * high);
      // Every LSH pair is also an exhaustive pair.
      CHECK(found.size() <= exact.pairs.size());
    }
  }
}

TEST_CASE("Results and records are identical for any thread count", "[sweep]") {
  testing::TempDir dir;
  const std::string path = dir.Write("corpus.jsonl", PlantedCorpus(3, 300, 300));
  std::string first;
  for (int threads : {1, 2, 3, 7}) {
    SweepOptions options;
    options.sign.threads = threads;
    options.sign.batch_documents = 37;  // many batches
    const SweepResult result = Sweep(path, options);
    std::string records;
    WritePairRecords(RecordFormat::kJsonLines, result.pairs, result.corpus.ids(), &records);
    WriteGroupRecords(RecordFormat::kJsonLines, result.groups, result.corpus.ids(),
                      KeepPolicy::kFirst, &records);
    if (first.empty()) {
      first = records;
      REQUIRE(!first.empty());
    }
    CHECK(records == first);
  }
}

TEST_CASE("A repeated id is an error naming both places", "[sweep]") {
  testing::TempDir dir;
  const std::string path =
      dir.Write("corpus.jsonl",
                "{\"id\":\"x\",\"text\":\"one two\"}\n{\"id\":\"y\",\"text\":\"three\"}\n"
                "{\"id\":\"x\",\"text\":\"four\"}\n");
  auto reader = CorpusReader::Open({path}, InputOptions{});
  REQUIRE(reader.ok());
  auto result = RunSweep(**reader, SweepOptions{});
  REQUIRE(!result.ok());
  CHECK(result.status().code() == absl::StatusCode::kInvalidArgument);
  const std::string message(result.status().message());
  CHECK_THAT(message, Catch::Contains("corpus.jsonl:3") && Catch::Contains("duplicate id \"x\"") &&
                          Catch::Contains("corpus.jsonl:1"));
}

TEST_CASE("Empty documents are never anyone's duplicate", "[sweep]") {
  testing::TempDir dir;
  const std::string path = dir.Write(
      "corpus.jsonl",
      "{\"id\":\"e1\",\"text\":\"\"}\n{\"id\":\"e2\",\"text\":\"  ... !!\"}\n"
      "{\"id\":\"a\",\"text\":\"the same words here\"}\n{\"id\":\"b\",\"text\":\"The same "
      "words, here.\"}\n");
  for (bool exhaustive : {false, true}) {
    SweepOptions options;
    options.exhaustive = exhaustive;
    const SweepResult result = Sweep(path, options);
    CHECK(result.stats.sign.empty_documents == 2);
    REQUIRE(result.pairs.size() == 1);
    CHECK(result.corpus.id(result.pairs[0].a) == "a");
    CHECK(result.corpus.id(result.pairs[0].b) == "b");
    CHECK(result.pairs[0].jaccard == 1.0);
  }
}

}  // namespace
}  // namespace kindred
