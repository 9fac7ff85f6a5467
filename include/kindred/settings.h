// kindred: the settings that decide a signature, and the settings that decide
// which pairs are reported.
//
// SignatureSettings travel together: two signatures (or shingle sets) can be
// compared only when their SignatureSettings are equal. They are written into
// every index file and checked on open. MatchSettings may change from query to
// query without re-signing.
//
// Both structs are plain values: copy them freely; they are thread-compatible.
#ifndef KINDRED_SETTINGS_H_
#define KINDRED_SETTINGS_H_

#include <cstdint>
#include <string>
#include <string_view>

#include "absl/status/status.h"
#include "absl/status/statusor.h"

namespace kindred {

// How a document becomes shingles. Persisted in index files: the numeric
// values are frozen.
enum class ShingleMode : uint8_t {
  kWord = 0,  // k consecutive kept words joined by U+0020
  kChar = 1,  // k consecutive code points of the whitespace-folded text
};

// Which MinHash scheme fills a signature. Persisted: values are frozen.
enum class SignerScheme : uint8_t {
  // One permutation hashing with optimal densification (default; O(m + n)
  // per document for m shingles and n slots).
  kOnePermutation = 0,
  // Classic MinHash: n independent hash functions (O(m * n) per document).
  kClassic = 1,
};

// Default hash seed (common to XXH3 shingle hashing and the signer). Any value
// is valid; this one spells "kindred1" in ASCII.
inline constexpr uint64_t kDefaultSeed = 0x6b696e6472656431ULL;

struct SignatureSettings {
  // Word or character shingles. Default: words.
  ShingleMode mode = ShingleMode::kWord;
  // Shingle size in words or code points. Default 5; valid 1..64. Larger k
  // makes similarity stricter (one edit breaks k shingles).
  uint32_t k = 5;
  // Seed of the XXH3-64 shingle hash and of the signer's hash family.
  uint64_t seed = kDefaultSeed;
  // MinHash scheme. Default: one permutation hashing with densification.
  SignerScheme scheme = SignerScheme::kOnePermutation;
  // Signature length n (slots, "perms"). Default 128; valid 1..4096. The
  // standard error of the similarity estimate is sqrt(J(1-J)/n); memory is
  // 4 bytes per slot per document.
  uint32_t perms = 128;

  // OK, or InvalidArgument naming the first field out of range.
  absl::Status Validate() const;
  // One line, e.g. "word k=5 seed=0x6b696e6472656431 signer=oph perms=128".
  std::string ToString() const;

  friend bool operator==(const SignatureSettings&, const SignatureSettings&) = default;
};

// Which exact measure confirms a candidate pair.
enum class Measure : uint8_t {
  kJaccard = 0,      // |A n B| / |A u B|
  kContainment = 1,  // |A n B| / min(|A|, |B|): the smaller inside the larger
};

// The least size of the smaller set of a containment pair, in shingles, by
// default. A set of a few shingles is contained in thousands of others,
// truly and uselessly (a stock phrase, a signature line); 20 word 5-shingles
// are 24 words, about two sentences. A judgement of this project, not a
// published value.
inline constexpr uint32_t kDefaultMinContainedSize = 20;

struct MatchSettings {
  // A pair is reported when its exact measure is >= threshold. Default 0.8;
  // valid (0, 1].
  double threshold = 0.8;
  // LSH banding: `bands` bands of `rows` rows each, bands * rows <= perms.
  // 0 means "choose automatically for the threshold" (see banding.h).
  uint32_t bands = 0;
  uint32_t rows = 0;
  // The measure compared with the threshold. Both measures are reported.
  Measure measure = Measure::kJaccard;
  // Containment only: a pair is reported only when its smaller set has at
  // least this many shingles (>= 1). Jaccard ignores it.
  uint32_t min_contained_size = kDefaultMinContainedSize;

  absl::Status Validate(const SignatureSettings& signature) const;
};

// Names used in messages, options and files ("word"/"char", "oph"/"classic",
// "jaccard"/"containment").
const char* ShingleModeName(ShingleMode mode);
const char* SignerSchemeName(SignerScheme scheme);
const char* MeasureName(Measure measure);

// The inverses of the names above, for every front end (options, request
// fields, grids). An unknown name is InvalidArgument naming the setting as
// its option and request field are named: "shingle: expected word or char,
// not \"x\"", "signer: expected oph or classic, not \"x\"", "measure:
// expected jaccard or containment, not \"x\"".
absl::StatusOr<ShingleMode> ParseShingleMode(std::string_view name);
absl::StatusOr<SignerScheme> ParseSignerScheme(std::string_view name);
absl::StatusOr<Measure> ParseMeasure(std::string_view name);

}  // namespace kindred

#endif  // KINDRED_SETTINGS_H_
