// Parsing the names of the settings' enums (settings.h); the names
// themselves are in settings.cc.
#include "absl/strings/str_cat.h"
#include "kindred/settings.h"

namespace kindred {
namespace {

absl::Status Unknown(absl::string_view setting, absl::string_view expected, std::string_view name) {
  return absl::InvalidArgumentError(absl::StrCat(setting, ": expected ", expected, ", not \"",
                                                 absl::string_view(name.data(), name.size()),
                                                 "\""));
}

}  // namespace

absl::StatusOr<ShingleMode> ParseShingleMode(std::string_view name) {
  for (ShingleMode mode : {ShingleMode::kWord, ShingleMode::kChar}) {
    if (name == ShingleModeName(mode)) return mode;
  }
  return Unknown("shingle", "word or char", name);
}

absl::StatusOr<SignerScheme> ParseSignerScheme(std::string_view name) {
  for (SignerScheme scheme : {SignerScheme::kOnePermutation, SignerScheme::kClassic}) {
    if (name == SignerSchemeName(scheme)) return scheme;
  }
  return Unknown("signer", "oph or classic", name);
}

absl::StatusOr<Measure> ParseMeasure(std::string_view name) {
  for (Measure measure : {Measure::kJaccard, Measure::kContainment}) {
    if (name == MeasureName(measure)) return measure;
  }
  return Unknown("measure", "jaccard or containment", name);
}

}  // namespace kindred
