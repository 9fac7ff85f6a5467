// The small pieces of tune.h: names, parsing, scoring one threshold, the
// ranking order and the sweep command line.
#include <algorithm>
#include <cmath>

#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "absl/strings/str_join.h"
#include "kindred/sweep.h"
#include "kindred/tune.h"

namespace kindred {
namespace {

absl::StatusOr<uint32_t> ParseCount(absl::string_view text, std::string_view what) {
  uint32_t value = 0;
  if (!absl::SimpleAtoi(text, &value) || value == 0) {
    return absl::InvalidArgumentError(
        absl::StrCat(std::string(what), ": \"", std::string(text), "\" is not a positive integer"));
  }
  return value;
}

// Quotes `word` for a POSIX shell when it holds anything but safe bytes.
std::string ShellQuote(std::string_view word) {
  const bool safe = !word.empty() && word.find_first_not_of(
                                         "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ"
                                         "0123456789_./:=+,@%-") == std::string_view::npos;
  if (safe) return std::string(word);
  std::string quoted = "'";
  for (char c : word) {
    if (c == '\'') {
      quoted += "'\\''";
    } else {
      quoted.push_back(c);
    }
  }
  return quoted + "'";
}

}  // namespace

std::string ShingleChoice::ToString() const { return absl::StrCat(ShingleModeName(mode), ":", k); }

absl::StatusOr<ShingleChoice> ParseShingleChoice(std::string_view text) {
  const size_t colon = text.find(':');
  ShingleChoice choice;
  absl::StatusOr<ShingleMode> mode = ParseShingleMode(text.substr(0, colon));
  if (!mode.ok() || colon == std::string_view::npos) {
    return absl::InvalidArgumentError(
        absl::StrCat("shingle setting \"", std::string(text), "\": expected word:K or char:K"));
  }
  choice.mode = *mode;
  const std::string k(text.substr(colon + 1));
  absl::StatusOr<uint32_t> value = ParseCount(k, "shingle size");
  if (!value.ok()) return value.status();
  if (*value > 64) {
    return absl::InvalidArgumentError(absl::StrCat("shingle size ", *value, " is over 64"));
  }
  choice.k = *value;
  return choice;
}

absl::StatusOr<Banding> ParseBanding(std::string_view text) {
  const size_t x = text.find('x');
  if (x == std::string_view::npos) {
    return absl::InvalidArgumentError(
        absl::StrCat("banding \"", std::string(text), "\": expected BANDSxROWS, e.g. 16x8"));
  }
  absl::StatusOr<uint32_t> bands = ParseCount(std::string(text.substr(0, x)), "bands");
  if (!bands.ok()) return bands.status();
  absl::StatusOr<uint32_t> rows = ParseCount(std::string(text.substr(x + 1)), "rows");
  if (!rows.ok()) return rows.status();
  return Banding{*bands, *rows};
}

absl::Status TuneOptions::Validate() const {
  if (grid.shingles.empty() || grid.perms.empty() || grid.thresholds.empty()) {
    return absl::InvalidArgumentError(
        "the grid needs at least one shingle setting, perms and threshold");
  }
  for (uint32_t perms : grid.perms) {
    if (perms < 1 || perms > 4096) {
      return absl::InvalidArgumentError(absl::StrCat("perms ", perms, " is out of range 1..4096"));
    }
  }
  for (double t : grid.thresholds) {
    if (!(t > 0 && t <= 1)) {
      return absl::InvalidArgumentError(absl::StrFormat("threshold %g is out of range (0, 1]", t));
    }
  }
  for (size_t i = 0; i < grid.shingles.size(); ++i) {
    for (size_t j = 0; j < i; ++j) {
      if (grid.shingles[i] == grid.shingles[j]) {
        return absl::InvalidArgumentError(
            absl::StrCat("shingle setting ", grid.shingles[i].ToString(), " is listed twice"));
      }
    }
  }
  for (size_t i = 0; i < grid.perms.size(); ++i) {
    if (std::find(grid.perms.begin(), grid.perms.begin() + i, grid.perms[i]) !=
        grid.perms.begin() + i) {
      return absl::InvalidArgumentError(absl::StrCat("perms ", grid.perms[i], " is listed twice"));
    }
  }
  if (min_contained_size < 1) {
    return absl::InvalidArgumentError("the least contained size must be >= 1");
  }
  if (measure == Measure::kContainment && !grid.extra_bandings.empty()) {
    return absl::InvalidArgumentError(
        "bandings cannot be listed with the containment measure: its plan chooses a banding "
        "per pair of size partitions");
  }
  if (grid.bandings_per_threshold < 1) {
    return absl::InvalidArgumentError("bandings per threshold must be >= 1");
  }
  if (!(target_recall >= 0 && target_recall <= 1)) {
    return absl::InvalidArgumentError(
        absl::StrFormat("target recall %g is out of range [0, 1]", target_recall));
  }
  if (!(beta > 0 && std::isfinite(beta))) {
    return absl::InvalidArgumentError(absl::StrFormat("beta %g must be > 0", beta));
  }
  return absl::OkStatus();
}

SignatureSettings TuneSetting::Signature(const TuneOptions& options) const {
  SignatureSettings settings;
  settings.mode = shingle.mode;
  settings.k = shingle.k;
  settings.seed = options.seed;
  settings.scheme = options.scheme;
  settings.perms = perms;
  return settings;
}

MatchSettings TuneSetting::Match(const TuneOptions& options) const {
  MatchSettings match;
  match.threshold = threshold;
  match.bands = banding.bands;
  match.rows = banding.rows;
  match.measure = options.measure;
  match.min_contained_size = options.min_contained_size;
  return match;
}

std::string TuneSetting::SearchName() const {
  if (plan != nullptr) return absl::StrCat("plan/", plan->partitions().size());
  return absl::StrFormat("%ux%u", banding.bands, banding.rows);
}

std::string TuneSetting::ToString() const {
  return absl::StrFormat("%s perms=%u %s t=%.2f", shingle.ToString(), perms, SearchName(),
                         threshold);
}

void DeriveMeasures(double beta, LabelScore* s) {
  const double predicted = static_cast<double>(s->true_positives) + s->false_positives;
  const double positives = static_cast<double>(s->true_positives) + s->false_negatives;
  s->precision = predicted > 0 ? s->true_positives / predicted : 0;
  s->recall = positives > 0 ? s->true_positives / positives : 0;
  const auto f = [s](double b) {
    const double b2 = b * b;
    const double denominator = b2 * s->precision + s->recall;
    return denominator > 0 ? (1 + b2) * s->precision * s->recall / denominator : 0.0;
  };
  s->f1 = f(1.0);
  s->fbeta = f(beta);
}

size_t HistogramBin(double similarity) {
  const double scaled = std::floor(similarity * 20 + 1e-9);
  return static_cast<size_t>(std::clamp(scaled, 0.0, 19.0));
}

LabelScore ScoreLabels(absl::Span<const ResolvedPair> labelled,
                       absl::Span<const ScoredPair> measures, absl::Span<const uint8_t> candidate,
                       double threshold, Measure measure, double beta, std::vector<uint32_t>* wrong,
                       uint32_t min_contained_size) {
  MatchSettings match;
  match.threshold = threshold;
  match.measure = measure;
  match.min_contained_size = min_contained_size;
  LabelScore score;
  for (size_t i = 0; i < labelled.size(); ++i) {
    const bool predicted = candidate[i] && PassesThreshold(measures[i], match);
    if (predicted && labelled[i].duplicate) ++score.true_positives;
    if (predicted && !labelled[i].duplicate) ++score.false_positives;
    if (!predicted && labelled[i].duplicate) ++score.false_negatives;
    if (!predicted && !labelled[i].duplicate) ++score.true_negatives;
    if (wrong != nullptr && predicted != labelled[i].duplicate) wrong->push_back(i);
  }
  DeriveMeasures(beta, &score);
  return score;
}

bool RanksBefore(const SettingScore& x, const SettingScore& y) {
  if (x.meets_target != y.meets_target) return x.meets_target;
  const LabelScore& a = x.labels;
  const LabelScore& b = y.labels;
  if (x.meets_target) {
    if (a.precision != b.precision) return a.precision > b.precision;
    if (x.candidates_per_document != y.candidates_per_document) {
      return x.candidates_per_document < y.candidates_per_document;
    }
    if (a.recall != b.recall) return a.recall > b.recall;
  } else {
    if (a.recall != b.recall) return a.recall > b.recall;
    if (a.precision != b.precision) return a.precision > b.precision;
    if (x.candidates_per_document != y.candidates_per_document) {
      return x.candidates_per_document < y.candidates_per_document;
    }
  }
  if (x.setting.perms != y.setting.perms) return x.setting.perms < y.setting.perms;
  return x.grid_order < y.grid_order;
}

std::string SweepCommandLine(const TuneSetting& setting, const TuneOptions& options,
                             absl::Span<const std::string> inputs) {
  std::vector<std::string> words = {"kindred", "sweep"};
  for (const std::string& input : inputs) words.push_back(ShellQuote(input));
  words.push_back(absl::StrCat("--shingle ", ShingleModeName(setting.shingle.mode)));
  words.push_back(absl::StrCat("-k ", setting.shingle.k));
  words.push_back(absl::StrCat("--perms ", setting.perms));
  words.push_back(absl::StrFormat("--threshold %g", setting.threshold));
  if (setting.plan == nullptr) {
    words.push_back(absl::StrCat("--bands ", setting.banding.bands));
    words.push_back(absl::StrCat("--rows ", setting.banding.rows));
  }
  if (options.measure != Measure::kJaccard) {
    words.push_back(absl::StrCat("--measure ", MeasureName(options.measure)));
  }
  if (options.measure == Measure::kContainment &&
      options.min_contained_size != kDefaultMinContainedSize) {
    words.push_back(absl::StrCat("--min-contained-size ", options.min_contained_size));
  }
  if (options.scheme != SignerScheme::kOnePermutation) {
    words.push_back(absl::StrCat("--signer ", SignerSchemeName(options.scheme)));
  }
  if (options.seed != kDefaultSeed) words.push_back(absl::StrCat("--seed ", options.seed));
  return absl::StrJoin(words, " ");
}

}  // namespace kindred
