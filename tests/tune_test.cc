// tune: the measures against their published formulas, the ranking order,
// and a run on the sample corpus checked against brute-force candidate
// counts and a real sweep with the recommended setting.
#include "kindred/tune.h"

#include <algorithm>
#include <catch2/catch.hpp>
#include <set>

#include "kindred/sweep.h"
#include "kindred/tune_report.h"

namespace kindred {
namespace {

const std::string kArchive = KINDRED_SOURCE_DIR "/sample_corpus/archive";
const std::string kLabels = KINDRED_SOURCE_DIR "/sample_corpus/labels.tsv";

OpenCorpus OpenArchive() {
  return [] { return CorpusReader::Open({kArchive}, InputOptions{}); };
}

TuneOptions SmallGrid(int threads) {
  TuneOptions options;
  options.grid.shingles = {{ShingleMode::kWord, 3}, {ShingleMode::kWord, 5}};
  options.grid.perms = {64, 128};
  options.grid.thresholds = {0.5, 0.6, 0.7, 0.8, 0.9};
  options.grid.bandings_per_threshold = 2;
  options.grid.extra_bandings = {{32, 4}};
  options.threads = threads;
  return options;
}

const TuneResult& SampleResult() {
  static const TuneResult result = [] {
    auto labels = ReadLabels(kLabels);
    REQUIRE(labels.ok());
    auto run = RunTune(OpenArchive(), *labels, kLabels, SmallGrid(2));
    if (!run.ok()) FAIL(run.status().message());
    return *run;
  }();
  return result;
}

TEST_CASE("precision, recall, F1 and F-beta follow the published formulas", "[tune]") {
  // F-beta = (1 + b^2) P R / (b^2 P + R) (van Rijsbergen 1979).
  LabelScore s;
  s.true_positives = 8;
  s.false_positives = 2;
  s.false_negatives = 4;
  s.true_negatives = 10;
  DeriveMeasures(2.0, &s);
  CHECK(s.precision == Approx(0.8));
  CHECK(s.recall == Approx(8.0 / 12));
  CHECK(s.f1 == Approx(2 * 0.8 * (8.0 / 12) / (0.8 + 8.0 / 12)));
  CHECK(s.fbeta == Approx(5 * 0.8 * (8.0 / 12) / (4 * 0.8 + 8.0 / 12)));
  LabelScore none;
  none.false_negatives = 3;
  DeriveMeasures(1.0, &none);
  CHECK(none.precision == 0);
  CHECK(none.recall == 0);
  CHECK(none.f1 == 0);
}

TEST_CASE(
    "ScoreLabels: a pair is predicted duplicate when a candidate at or "
    "above the threshold",
    "[tune]") {
  const std::vector<ResolvedPair> labelled = {
      {0, 1, true, 0}, {0, 2, true, 1}, {1, 2, false, 2}, {2, 3, false, 3}, {1, 3, true, 4}};
  // a, b, shared, |A|, |B|, jaccard, estimate: Jaccard 0.8, 0.8, 0.8, 0.4, 0.5.
  const std::vector<ScoredPair> measures = {{0, 1, 8, 9, 9, 0.8, 0},
                                            {0, 2, 8, 9, 9, 0.8, 0},
                                            {1, 2, 8, 9, 9, 0.8, 0},
                                            {2, 3, 4, 7, 7, 0.4, 0},
                                            {1, 3, 5, 7, 8, 0.5, 0}};
  const std::vector<uint8_t> candidate = {1, 0, 1, 1, 1};
  std::vector<uint32_t> wrong;
  const LabelScore s =
      ScoreLabels(labelled, measures, candidate, 0.5, Measure::kJaccard, 1, &wrong);
  // Predicted: pairs 0, 2 and 4 (pair 1 is no candidate, pair 3 is below).
  CHECK(s.true_positives == 2);
  CHECK(s.false_positives == 1);
  CHECK(s.false_negatives == 1);
  CHECK(s.true_negatives == 1);
  CHECK(wrong == std::vector<uint32_t>{1, 2});
}

TEST_CASE("ranking: the target first, then precision, then cost", "[tune]") {
  auto score = [](bool meets, double precision, double recall, double cost, uint32_t order) {
    SettingScore s;
    s.meets_target = meets;
    s.labels.precision = precision;
    s.labels.recall = recall;
    s.candidates_per_document = cost;
    s.grid_order = order;
    return s;
  };
  CHECK(RanksBefore(score(true, 0.5, 0.95, 9, 5), score(false, 1, 0.9, 0, 0)));
  CHECK(RanksBefore(score(true, 0.9, 0.95, 9, 5), score(true, 0.8, 1, 0, 0)));
  CHECK(RanksBefore(score(true, 0.9, 0.95, 1, 5), score(true, 0.9, 1, 2, 0)));
  CHECK(RanksBefore(score(false, 0.1, 0.9, 9, 5), score(false, 1, 0.8, 0, 0)));
  CHECK(RanksBefore(score(true, 0.9, 0.95, 1, 1), score(true, 0.9, 0.95, 1, 2)));
  CHECK_FALSE(RanksBefore(score(true, 0.9, 0.95, 1, 2), score(true, 0.9, 0.95, 1, 2)));
}

TEST_CASE("grid values parse; bad ones are errors", "[tune]") {
  CHECK(ParseShingleChoice("word:5").value() == ShingleChoice{ShingleMode::kWord, 5});
  CHECK(ParseShingleChoice("char:3").value() == ShingleChoice{ShingleMode::kChar, 3});
  for (const char* bad : {"word", "word:", "word:0", "word:65", "line:3", "char:x"}) {
    INFO(bad);
    CHECK_FALSE(ParseShingleChoice(bad).ok());
  }
  CHECK(ParseBanding("16x8").value() == Banding{16, 8});
  for (const char* bad : {"16", "x8", "16x", "0x8", "ax2"}) {
    INFO(bad);
    CHECK_FALSE(ParseBanding(bad).ok());
  }
  TuneOptions options;
  options.beta = 0;
  CHECK_FALSE(options.Validate().ok());
  options = TuneOptions{};
  options.grid.thresholds = {0.5, 1.5};
  CHECK(options.Validate().message() == "threshold 1.5 is out of range (0, 1]");
  options = TuneOptions{};
  options.grid.perms = {64, 128, 64};
  CHECK(options.Validate().message() == "perms 64 is listed twice");
  options = TuneOptions{};
  options.grid.shingles.push_back({ShingleMode::kWord, 3});
  CHECK(options.Validate().message() == "shingle setting word:3 is listed twice");
}

TEST_CASE("the sweep command line names every setting and quotes inputs", "[tune]") {
  TuneSetting setting{{ShingleMode::kWord, 5}, 128, {16, 8}, 0.8, 1, nullptr};
  TuneOptions options;
  const std::vector<std::string> inputs = {"archive", "my docs/it's.jsonl"};
  CHECK(SweepCommandLine(setting, options, inputs) ==
        "kindred sweep archive 'my docs/it'\\''s.jsonl' --shingle word -k 5 "
        "--perms 128 "
        "--threshold 0.8 --bands 16 --rows 8");
  options.measure = Measure::kContainment;
  options.scheme = SignerScheme::kClassic;
  setting.threshold = 0.85;
  CHECK(SweepCommandLine(setting, options, {inputs.data(), 1}) ==
        "kindred sweep archive --shingle word -k 5 --perms 128 --threshold "
        "0.85 --bands 16 "
        "--rows 8 --measure containment --signer classic");
}

TEST_CASE("sample corpus: every grid setting is evaluated and ranked in order", "[tune]") {
  const TuneResult& r = SampleResult();
  CHECK(r.documents == 147);
  CHECK(r.labelled.size() == 82);
  CHECK(r.signatures.size() == 4);
  // Per perms: 5 thresholds x (2 ranked + 32x4 unless it is one of them or
  // needs more than perms slots).
  size_t expected = 0;
  for (uint32_t perms : {64u, 128u}) {
    for (double t : {0.5, 0.6, 0.7, 0.8, 0.9}) {
      const auto ranked = RankBandings(t, perms);
      const bool extra_ranked =
          ranked[0].banding == Banding{32, 4} || ranked[1].banding == Banding{32, 4};
      expected += extra_ranked || perms < 128 ? 2 : 3;
    }
  }
  CHECK(r.ranking.size() == 2 * expected);
  CHECK(std::is_sorted(r.ranking.begin(), r.ranking.end(), RanksBefore));
}

TEST_CASE(
    "sample corpus: the recommendation meets its target at the best "
    "precision, cheapest",
    "[tune]") {
  const TuneResult& r = SampleResult();
  const SettingScore& best = r.recommended();
  REQUIRE(r.target_met);
  CHECK(best.labels.recall >= 0.95);
  for (const SettingScore& s : r.ranking) {
    if (!s.meets_target) continue;
    CHECK(s.labels.precision <= best.labels.precision);
    if (s.labels.precision == best.labels.precision) {
      CHECK(s.candidates_per_document >= best.candidates_per_document);
    }
  }
  // The histogram counts every candidate pair of the recommendation.
  const SimilarityHistogram& histogram = r.SignatureOf(best.setting).best_histogram;
  uint64_t total = 0;
  for (uint64_t count : histogram) total += count;
  CHECK(total == best.candidate_pairs);
}

// Signs the archive with `setting` and counts the pairs that share a band
// key by comparing every pair: the brute-force cost.
uint64_t BruteForceCandidates(const TuneSetting& setting, const TuneOptions& options,
                              SignedCorpus* corpus) {
  auto reader = OpenArchive()();
  SignStats stats;
  REQUIRE(SignCorpus(**reader, setting.Signature(options), SignOptions{}, corpus, &stats).ok());
  const Banding b = setting.banding;
  std::vector<std::vector<uint64_t>> keys(corpus->size(), std::vector<uint64_t>(b.bands));
  for (size_t d = 0; d < corpus->size(); ++d)
    BandKeys(corpus->signature(d), b, absl::MakeSpan(keys[d]));
  uint64_t pairs = 0;
  for (size_t i = 0; i < corpus->size(); ++i) {
    for (size_t j = i + 1; j < corpus->size(); ++j) {
      bool shared = false;
      for (uint32_t band = 0; band < b.bands; ++band) {
        shared |= keys[i][band] != kNoBandKey && keys[i][band] == keys[j][band];
      }
      pairs += shared;
    }
  }
  return pairs;
}

TEST_CASE("sample corpus: costs match a brute-force count; predictions match a sweep", "[tune]") {
  const TuneResult& r = SampleResult();
  const TuneOptions options = SmallGrid(1);
  for (size_t rank : {size_t{0}, size_t{1}, r.ranking.size() / 2, r.ranking.size() - 1}) {
    const SettingScore& s = r.ranking[rank];
    INFO(s.setting.ToString());
    SignedCorpus corpus(s.setting.perms);
    CHECK(BruteForceCandidates(s.setting, options, &corpus) == s.candidate_pairs);
    CHECK(s.candidates_per_document == Approx(s.candidate_pairs / 147.0));
    // A labelled pair is predicted duplicate exactly when a sweep with this
    // setting reports it.
    SweepOptions sweep;
    sweep.signature = s.setting.Signature(options);
    sweep.match = s.setting.Match(options);
    SweepResult result(s.setting.perms);
    MatchCorpus(corpus, sweep, &result);
    std::set<std::pair<uint32_t, uint32_t>> reported;
    for (const ScoredPair& pair : result.pairs) reported.insert({pair.a, pair.b});
    uint32_t tp = 0, fp = 0, fn = 0;
    for (const ResolvedPair& pair : r.labelled) {
      const bool predicted = reported.count({std::min(pair.a, pair.b), std::max(pair.a, pair.b)});
      tp += predicted && pair.duplicate;
      fp += predicted && !pair.duplicate;
      fn += !predicted && pair.duplicate;
    }
    CHECK(tp == s.labels.true_positives);
    CHECK(fp == s.labels.false_positives);
    CHECK(fn == s.labels.false_negatives);
    CHECK(s.wrong.size() == fp + fn);
  }
}

TEST_CASE("sample corpus: the thread count does not change the result", "[tune]") {
  auto labels = ReadLabels(kLabels);
  TuneOptions options = SmallGrid(1);
  options.grid.shingles = {{ShingleMode::kWord, 5}};
  options.grid.perms = {64};
  auto one = RunTune(OpenArchive(), *labels, kLabels, options);
  options.threads = 3;
  auto three = RunTune(OpenArchive(), *labels, kLabels, options);
  REQUIRE(one.ok());
  REQUIRE(three.ok());
  TuneReportInput a{&*one, &options, {"archive"}, "labels.tsv"};
  TuneReportInput b{&*three, &options, {"archive"}, "labels.tsv"};
  CHECK(FormatTuneJsonLines(a) == FormatTuneJsonLines(b));
}

TEST_CASE("labels naming documents outside the corpus", "[tune]") {
  auto labels = ParseLabels(
      "a\tb\tlabel\nodd/one-word.txt\tno/such.txt\tdistinct\n"
      "odd/one-word.txt\todd/empty.txt\tdistinct\n",
      "extra.tsv");
  REQUIRE(labels.ok());
  TuneOptions options = SmallGrid(1);
  options.grid.shingles = {{ShingleMode::kWord, 5}};
  options.grid.perms = {64};
  auto strict = RunTune(OpenArchive(), *labels, "extra.tsv", options);
  REQUIRE_FALSE(strict.ok());
  CHECK(strict.status().message() == "extra.tsv:2: id \"no/such.txt\" is not in the corpus");
  options.skip_unknown_ids = true;
  auto lenient = RunTune(OpenArchive(), *labels, "extra.tsv", options);
  REQUIRE(lenient.ok());
  CHECK(lenient->labelled.size() == 1);
  CHECK(lenient->warnings.size() == 1);
  // No duplicate is labelled: recall is 0 everywhere, precision 0 too.
  CHECK(lenient->recommended().labels.true_negatives == 1);
}

}  // namespace
}  // namespace kindred
