// The one-shot pipeline end to end through the library: the exhaustive mode
// against the brute-force oracle, LSH recall against the exhaustive mode, and
// thread-count independence, the lean form (band keys only, the documents of
// candidate pairs read again) against keeping every set.
#include "kindred/sweep.h"

#include <catch2/catch.hpp>
#include <cstdlib>
#include <filesystem>
#include <set>

#include "absl/strings/str_cat.h"
#include "kindred/errors.h"
#include "kindred/records.h"
#include "core/reload.h"
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

// Records of a sweep: pairs (with exact and estimated similarity) and groups.
std::string RecordsOf(const SweepResult& result) {
  std::string records;
  WritePairRecords(RecordFormat::kJsonLines, result.pairs, result.corpus.ids(), &records);
  WriteGroupRecords(RecordFormat::kJsonLines, result.groups, result.corpus.ids(),
                    KeepPolicy::kFirst, &records);
  return records;
}

TEST_CASE("A lean sweep gives the records of one that keeps every set", "[sweep]") {
  testing::TempDir dir;
  const std::string jsonl = dir.Write("corpus.jsonl", PlantedCorpus(4, 200, 250));
  // The same kind of corpus as a tree of text files, with blank lines
  // between JSON lines in the other file: ordinals must line up.
  std::string spaced;
  for (char c : PlantedCorpus(5, 80, 60)) {
    spaced.push_back(c);
    if (c == '\n') spaced += "\n  \n";
  }
  const std::string spaced_path = dir.Write("spaced.jsonl", spaced);
  SplitMix64 random(6);
  for (int f = 0; f < 60; ++f) {
    std::string text;
    for (int w = 0; w < 40; ++w) absl::StrAppend(&text, "w", random.Between(0, 60), " ");
    dir.Write(absl::StrCat("tree/", f % 7, "/doc", f, ".txt"), text);
    if (f % 3 == 0) dir.Write(absl::StrCat("tree/", f % 7, "/copy", f, ".txt"), text + "end");
  }
  for (const std::vector<std::string>& inputs :
       std::vector<std::vector<std::string>>{{jsonl}, {dir.File("tree"), spaced_path}}) {
    for (int threads : {1, 3}) {
      SweepOptions options;
      options.sign.threads = threads;
      options.sign.batch_documents = 29;
      auto lean_reader = CorpusReader::Open(inputs, InputOptions{});
      REQUIRE(lean_reader.ok());
      auto lean = RunSweep(**lean_reader, options);
      REQUIRE(lean.ok());
      CHECK(lean->corpus.lean());
      options.keep_sets = true;
      auto full_reader = CorpusReader::Open(inputs, InputOptions{});
      REQUIRE(full_reader.ok());
      auto full = RunSweep(**full_reader, options);
      REQUIRE(full.ok());
      CHECK(!full->corpus.lean());
      REQUIRE(!full->pairs.empty());
      CHECK(RecordsOf(*lean) == RecordsOf(*full));
      CHECK(lean->stats.candidates.candidate_pairs == full->stats.candidates.candidate_pairs);
      CHECK(lean->stats.sign.empty_documents == full->stats.sign.empty_documents);
    }
  }
}

TEST_CASE("Groups of identical sets give the records of a sweep over every document", "[sweep]") {
  // Exact copies, texts that differ but have one set (case, punctuation,
  // spacing), repeated empty documents, and near-duplicates of the copies;
  // with a small --max-bucket, the groups crowd buckets and the search runs
  // over their members.
  testing::TempDir dir;
  std::string lines;
  SplitMix64 random(12);
  for (int d = 0; d < 120; ++d) {
    std::string text;
    for (int w = 0; w < 30; ++w) absl::StrAppend(&text, "w", random.Between(0, 80), " ");
    const int copies = d % 5 == 0 ? 6 : (d % 3 == 0 ? 2 : 1);
    for (int c = 0; c < copies; ++c) {
      std::string variant = c % 2 == 0 ? text : absl::StrCat("  ", text, ". ");
      if (c == 3) variant += "tail words here";
      absl::StrAppend(&lines, "{\"id\":\"d", d, "-", c, "\",\"text\":\"", variant, "\"}\n");
    }
    if (d % 40 == 0) absl::StrAppend(&lines, "{\"id\":\"e", d, "\",\"text\":\" .\"}\n");
  }
  const std::string path = dir.Write("copies.jsonl", lines);
  for (uint64_t max_bucket : {kDefaultMaxBucket, uint64_t{4}}) {
    for (uint64_t memory : {uint64_t{0}, uint64_t{1} << 20}) {
      for (int threads : {1, 2}) {
        SweepOptions options;
        options.sign.threads = threads;
        options.sign.batch_documents = 17;
        options.max_bucket = max_bucket;
        options.memory = memory;
        options.scratch_dir = dir.path();
        const SweepResult grouped = Sweep(path, options);
        options.keep_sets = true;
        const SweepResult full = Sweep(path, options);
        REQUIRE(!full.pairs.empty());
        CHECK(grouped.corpus.groups_identical());
        CHECK(RecordsOf(grouped) == RecordsOf(full));
        CHECK(grouped.stats.candidates.candidate_pairs == full.stats.candidates.candidate_pairs);
        CHECK(grouped.stats.candidates.bucket_entries == full.stats.candidates.bucket_entries);
        CHECK(grouped.stats.candidates.largest_bucket == full.stats.candidates.largest_bucket);
        CHECK(grouped.stats.candidates.oversized_buckets ==
              full.stats.candidates.oversized_buckets);
        CHECK(grouped.stats.sign.empty_documents == full.stats.sign.empty_documents);
      }
    }
  }
}

TEST_CASE("A document changed between the two readings is an error", "[sweep]") {
  testing::TempDir dir;
  const std::string path = dir.Write("corpus.jsonl",
                                     "{\"id\":\"a\",\"text\":\"one two three four five six\"}\n"
                                     "{\"id\":\"b\",\"text\":\"one two three four five six\"}\n");
  SignatureSettings settings;
  auto reader = CorpusReader::Open({path}, InputOptions{});
  REQUIRE(reader.ok());
  SignedCorpus corpus = SignedCorpus::Lean(settings.perms, Banding{16, 8});
  SignStats stats;
  REQUIRE(SignCorpus(**reader, settings, SignOptions{}, &corpus, &stats).ok());
  SECTION("unchanged: both attach") {
    const std::vector<uint32_t> docs = {0, 1};
    REQUIRE(ReloadShingles((*reader)->ResolvedInputs(), (*reader)->options(), settings, docs, 2,
                           &corpus)
                .ok());
    CHECK(corpus.has_shingles(1));
    CHECK(corpus.shingle_count(1) == 2);
    CHECK(std::equal(corpus.signature(0).begin(), corpus.signature(0).end(),
                     corpus.signature(1).begin()));
  }
  SECTION("text changed") {
    dir.Write("corpus.jsonl",
              "{\"id\":\"a\",\"text\":\"one two three four five six\"}\n"
              "{\"id\":\"b\",\"text\":\"one two three four five seven\"}\n");
    const std::vector<uint32_t> docs = {1};
    const absl::Status status = ReloadShingles((*reader)->ResolvedInputs(), (*reader)->options(),
                                               settings, docs, 1, &corpus);
    REQUIRE(status.code() == absl::StatusCode::kInvalidArgument);
    CHECK_THAT(std::string(status.message()),
               Catch::Contains("corpus.jsonl:2") && Catch::Contains("\"b\" changed"));
  }
  SECTION("lines gone") {
    // A plain file's lines are read again at their offsets: the line is gone.
    dir.Write("corpus.jsonl", "{\"id\":\"a\",\"text\":\"one two three four five six\"}\n");
    const std::vector<uint32_t> docs = {0, 1};
    const absl::Status status = ReloadShingles((*reader)->ResolvedInputs(), (*reader)->options(),
                                               settings, docs, 1, &corpus);
    REQUIRE(status.code() == absl::StatusCode::kInvalidArgument);
    CHECK_THAT(std::string(status.message()),
               Catch::Contains("corpus.jsonl:2") && Catch::Contains("\"b\" changed"));
  }
  SECTION("replaced by a directory: an input error, whatever the errno") {
    // open() of a directory succeeds; reading it fails with EISDIR, whose
    // canonical code (FailedPrecondition) alone would read as an index made
    // with other settings.
    std::filesystem::remove(path);
    std::filesystem::create_directory(path);
    const std::vector<uint32_t> docs = {1};
    const absl::Status status = ReloadShingles((*reader)->ResolvedInputs(), (*reader)->options(),
                                               settings, docs, 1, &corpus);
    CHECK(KindOf(status) == ErrorKind::kBadInput);
    CHECK_THAT(std::string(status.message()), Catch::Contains("corpus.jsonl: cannot read"));
  }
}

TEST_CASE("Documents are read again at their offsets, or by reading the input again", "[sweep]") {
  testing::TempDir dir;
  const std::string lines =
      "{\"id\":\"a\",\"text\":\"one two three four five six\"}\n"
      "\n"
      "{\"id\":\"b\",\"text\":\"one two three four five six\"}\r\n"
      "{\"id\":\"c\",\"text\":\"one two three four five six\"}";
  const std::string plain = dir.Write("plain.jsonl", lines);
  SignatureSettings settings;
  for (const std::string& id_field : {std::string("id"), std::string("@line")}) {
    InputOptions options;
    options.id_field = id_field;
    auto reader = CorpusReader::Open({plain}, options);
    REQUIRE(reader.ok());
    SignedCorpus corpus = SignedCorpus::Lean(settings.perms, Banding{16, 8});
    SignStats stats;
    REQUIRE(SignCorpus(**reader, settings, SignOptions{}, &corpus, &stats).ok());
    REQUIRE(corpus.size() == 3);
    CHECK(corpus.origin(0).offset == 0);
    CHECK(corpus.origin(1).offset == lines.find("{\"id\":\"b\""));
    CHECK(corpus.origin(2).offset == lines.find("{\"id\":\"c\""));
    const std::vector<uint32_t> docs = {0, 1, 2};
    REQUIRE(ReloadShingles((*reader)->ResolvedInputs(), (*reader)->options(), settings, docs, 2,
                           &corpus)
                .ok());
    for (uint32_t doc : docs) CHECK(corpus.shingle_count(doc) == 2);
  }
  SECTION("a compressed input is read again as a stream") {
    const std::string packed = dir.File("packed.jsonl.gz");
    REQUIRE(std::system(("gzip -c " + plain + " > " + packed).c_str()) == 0);
    auto reader = CorpusReader::Open({packed}, InputOptions{});
    REQUIRE(reader.ok());
    SignedCorpus corpus = SignedCorpus::Lean(settings.perms, Banding{16, 8});
    SignStats stats;
    REQUIRE(SignCorpus(**reader, settings, SignOptions{}, &corpus, &stats).ok());
    CHECK(corpus.origin(1).offset == kUnknownOffset);
    const std::vector<uint32_t> docs = {1, 2};
    SECTION("unchanged") {
      REQUIRE(ReloadShingles((*reader)->ResolvedInputs(), (*reader)->options(), settings, docs, 1,
                             &corpus)
                  .ok());
      CHECK(corpus.has_shingles(1));
      CHECK(corpus.has_shingles(2));
    }
    SECTION("lines gone: counted, not named") {
      REQUIRE(std::system(("head -n 1 " + plain + " | gzip -c > " + packed).c_str()) == 0);
      const absl::Status status = ReloadShingles((*reader)->ResolvedInputs(), (*reader)->options(),
                                                 settings, docs, 1, &corpus);
      REQUIRE(status.code() == absl::StatusCode::kInvalidArgument);
      CHECK_THAT(std::string(status.message()), Catch::Contains("2 documents could not be found"));
    }
  }
}

TEST_CASE("Spilling under a tiny memory budget gives the same records", "[sweep]") {
  testing::TempDir dir;
  const std::string path = dir.Write("corpus.jsonl", PlantedCorpus(7, 1200, 900));
  std::string unspilled;
  for (int threads : {1, 3}) {
    SweepOptions options;
    options.sign.threads = threads;
    options.sign.batch_documents = 64;
    const SweepResult plain = Sweep(path, options);
    REQUIRE(plain.stats.spill_runs == 0);
    if (unspilled.empty()) unspilled = RecordsOf(plain);
    CHECK(RecordsOf(plain) == unspilled);
    options.memory = 16 << 10;  // 8 KiB of band keys: a run every other batch
    options.scratch_dir = dir.path();
    const SweepResult spilled = Sweep(path, options);
    CHECK(spilled.stats.spill_runs >= 10);
    CHECK(spilled.stats.spilled_bytes > 0);
    CHECK(RecordsOf(spilled) == unspilled);
    CHECK(spilled.stats.candidates.candidate_pairs == plain.stats.candidates.candidate_pairs);
    CHECK(spilled.stats.candidates.largest_bucket == plain.stats.candidates.largest_bucket);
  }
  // The scratch file was unlinked at once: nothing is left behind.
  CHECK(std::filesystem::directory_iterator(dir.path())->path().filename() == "corpus.jsonl");
}

TEST_CASE("A scratch directory that is missing fails the sweep cleanly", "[sweep]") {
  testing::TempDir dir;
  const std::string path = dir.Write("corpus.jsonl", PlantedCorpus(8, 300, 100));
  SweepOptions options;
  options.sign.batch_documents = 64;
  options.memory = 16 << 10;
  options.scratch_dir = dir.File("missing");
  auto reader = CorpusReader::Open({path}, InputOptions{});
  REQUIRE(reader.ok());
  auto result = RunSweep(**reader, options);
  REQUIRE(!result.ok());
  CHECK(result.status().code() == absl::StatusCode::kAborted);
  CHECK_THAT(std::string(result.status().message()), Catch::Contains("scratch directory"));
}

}  // namespace
}  // namespace kindred
