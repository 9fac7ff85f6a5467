// kindred: shingles, steps 4 to 6 of the canonical shingle definition.
//
// A document's normalized words (word mode) or its whitespace-folded
// normalized text (char mode) are cut into windows of k, each window's UTF-8
// bytes are hashed with seeded XXH3-64, and the document becomes the sorted
// set of distinct hashes:
//   - word k-shingles: every window of k consecutive kept tokens joined by one
//     U+0020; a document with 1..k-1 tokens has exactly one shingle (all its
//     tokens joined); a document with no tokens has none.
//   - char k-shingles: the normalized text with every run of White_Space
//     characters (ICU u_isUWhiteSpace; U+001C..U+001F are not White_Space)
//     replaced by one U+0020 and trimmed; every window of k consecutive code
//     points; a non-empty text shorter than k has one shingle, the whole text.
// See text.h for steps 1 to 3 (decoding, NFKC_Casefold, UAX #29 words).
#ifndef KINDRED_SHINGLES_H_
#define KINDRED_SHINGLES_H_

#include <cstdint>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "kindred/settings.h"
#include "kindred/text.h"

namespace kindred {

// Sorted ascending, distinct 64-bit shingle hashes.
using ShingleSet = std::vector<uint64_t>;

// XXH3-64 of the shingle's UTF-8 bytes with `seed` (XXH3_64bits_withSeed).
// Pure; thread-safe.
uint64_t HashShingle(std::string_view shingle_utf8, uint64_t seed);

// Turns one document's UTF-8 bytes into its shingle set, per the mode, k and
// seed of a SignatureSettings.
//
// Thread-compatible: a Shingler owns ICU objects and scratch buffers that it
// reuses from call to call (so the hot path does no per-shingle allocation);
// give each thread its own Shingler. Calls may come in any order and number.
class Shingler {
 public:
  // Fails with InvalidArgument when `settings` does not validate, or Internal
  // when ICU cannot build its normalizer or word break iterator. With
  // `ascii_fast_path` (the default), all-ASCII documents take a hand-written
  // scanner, and a document with some non-ASCII text gives ICU only the
  // stretches around it; with it false, every document takes the
  // ICU path. The results are the same (the fast paths are tested against
  // ICU); only the speed differs.
  static absl::StatusOr<std::unique_ptr<Shingler>> Create(
      const SignatureSettings& settings, bool ascii_fast_path = true);
  // `count` (>= 1) shinglers of `settings`, one per worker thread.
  static absl::StatusOr<std::vector<std::unique_ptr<Shingler>>> CreateMany(
      const SignatureSettings& settings, int count);

  ~Shingler();
  Shingler(const Shingler&) = delete;
  Shingler& operator=(const Shingler&) = delete;

  // Clears *out and fills it with the shingle set of `utf8`. Bad bytes never
  // fail a call: they become U+FFFD and are counted in *stats (when not null;
  // it is overwritten). Fails only if ICU fails (Internal) or the document is
  // too long (OutOfRange): 4 GiB or more, or a non-ASCII stretch of 2 GiB or
  // more (the most an ICU string holds). `out` must not be null.
  absl::Status Shingle(std::string_view utf8, ShingleSet* out,
                       TextStats* stats = nullptr);

  // Like Shingle, but leaves in *out the hash of every window in document
  // order, repeats kept: a bag, not a set. A MinHash signature needs no more
  // than that, so signing can skip the sort; SortShingles turns the bag into
  // the set Shingle gives. Fails like Shingle.
  absl::Status ShingleBag(std::string_view utf8, std::vector<uint64_t>* out,
                          TextStats* stats = nullptr);

  const SignatureSettings& settings() const { return settings_; }

 private:
  struct Impl;
  Shingler(const SignatureSettings& settings, bool ascii_fast_path,
           std::unique_ptr<Impl> impl);
  // Each appends the unsorted window hashes of one path to *out. The ASCII
  // ones return the number of tokens or code points; the others, for
  // documents that are not all ASCII, set *count to it and return the
  // replacement count.
  size_t ShingleAsciiWords(std::string_view text, ShingleSet* out);
  size_t ShingleAsciiChars(std::string_view text, ShingleSet* out);
  absl::StatusOr<uint32_t> ShingleOtherWords(std::string_view text,
                                             ShingleSet* out, uint32_t* count);
  absl::StatusOr<uint32_t> ShingleOtherChars(std::string_view text,
                                             ShingleSet* out, uint32_t* count);

  SignatureSettings settings_;
  bool ascii_fast_path_;
  std::unique_ptr<Impl> impl_;
};

// Turns a bag of shingle hashes (Shingler::ShingleBag) into a ShingleSet in
// place: sorted ascending, repeats removed. Expected linear time (hashes are
// spread evenly; crafted ones cost at most O(n log n)). Allocates scratch
// space of about the bag's size. Thread-safe.
void SortShingles(std::vector<uint64_t>* hashes);

// One shingle as text: exactly the bytes that get hashed, and the byte span
// [begin, end) of the original input it covers.
struct ShingleText {
  std::string text;
  uint32_t begin = 0;
  uint32_t end = 0;
};

// The shingles of `utf8` as text, in document order, duplicates kept. Hashing
// each with settings.seed and deduplicating gives Shingler's set. Slower than
// Shingler (it allocates per shingle); meant for `explain` and tests. Fails
// like Shingler::Create and Shingler::Shingle.
absl::StatusOr<std::vector<ShingleText>> ShingleTexts(
    std::string_view utf8, const SignatureSettings& settings,
    TextPath path = TextPath::kAuto);

}  // namespace kindred

#endif  // KINDRED_SHINGLES_H_
