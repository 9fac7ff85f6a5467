// Parsing the names of the settings' enums (settings.h); the names
// themselves are in settings.cc.
#include "absl/strings/str_cat.h"
#include "core/enum_names.h"
#include "kindred/settings.h"

namespace kindred {

absl::Status UnknownName(std::string_view setting, std::string_view expected,
                         std::string_view name) {
  const auto view = [](std::string_view s) { return absl::string_view(s.data(), s.size()); };
  return absl::InvalidArgumentError(absl::StrCat(view(setting), ": expected ", view(expected),
                                                 ", not \"", view(name), "\""));
}

absl::StatusOr<ShingleMode> ParseShingleMode(std::string_view name) {
  for (ShingleMode mode : {ShingleMode::kWord, ShingleMode::kChar}) {
    if (name == ShingleModeName(mode)) return mode;
  }
  return UnknownName("shingle", "word or char", name);
}

absl::StatusOr<SignerScheme> ParseSignerScheme(std::string_view name) {
  for (SignerScheme scheme : {SignerScheme::kOnePermutation, SignerScheme::kClassic}) {
    if (name == SignerSchemeName(scheme)) return scheme;
  }
  return UnknownName("signer", "oph or classic", name);
}

absl::StatusOr<Measure> ParseMeasure(std::string_view name) {
  for (Measure measure : {Measure::kJaccard, Measure::kContainment}) {
    if (name == MeasureName(measure)) return measure;
  }
  return UnknownName("measure", "jaccard or containment", name);
}

}  // namespace kindred
