#include "kindred/settings.h"

#include "absl/strings/str_format.h"

namespace kindred {

const char* ShingleModeName(ShingleMode mode) {
  return mode == ShingleMode::kWord ? "word" : "char";
}

const char* SignerSchemeName(SignerScheme scheme) {
  return scheme == SignerScheme::kOnePermutation ? "oph" : "classic";
}

const char* MeasureName(Measure measure) {
  return measure == Measure::kJaccard ? "jaccard" : "containment";
}

absl::Status SignatureSettings::Validate() const {
  if (mode != ShingleMode::kWord && mode != ShingleMode::kChar) {
    return absl::InvalidArgumentError("unknown shingle mode");
  }
  if (k < 1 || k > 64) {
    return absl::InvalidArgumentError(
        absl::StrFormat("shingle size k=%u is out of range 1..64", k));
  }
  if (scheme != SignerScheme::kOnePermutation && scheme != SignerScheme::kClassic) {
    return absl::InvalidArgumentError("unknown signer scheme");
  }
  if (perms < 1 || perms > 4096) {
    return absl::InvalidArgumentError(
        absl::StrFormat("signature length perms=%u is out of range 1..4096", perms));
  }
  return absl::OkStatus();
}

std::string SignatureSettings::ToString() const {
  return absl::StrFormat("%s k=%u seed=0x%016x signer=%s perms=%u", ShingleModeName(mode), k, seed,
                         SignerSchemeName(scheme), perms);
}

absl::Status MatchSettings::Validate(const SignatureSettings& signature) const {
  if (!(threshold > 0.0 && threshold <= 1.0)) {
    return absl::InvalidArgumentError(
        absl::StrFormat("threshold %g is out of range (0, 1]", threshold));
  }
  if ((bands == 0) != (rows == 0)) {
    return absl::InvalidArgumentError("give both bands and rows, or neither");
  }
  if (bands != 0 && uint64_t{bands} * rows > signature.perms) {
    return absl::InvalidArgumentError(
        absl::StrFormat("bands x rows = %u x %u = %u exceeds the signature length %u", bands, rows,
                        uint64_t{bands} * rows, signature.perms));
  }
  if (min_contained_size == 0) {
    return absl::InvalidArgumentError("the least contained size must be at least 1 shingle");
  }
  return absl::OkStatus();
}

}  // namespace kindred
