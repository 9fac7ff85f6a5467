// kindred: the canonical text pipeline, steps 1 to 3 of the shingle definition.
//
// A document's bytes become words in three steps:
//   1. UTF-8 decoding in which every ill-formed sequence becomes one U+FFFD
//      ("maximal subpart" practice of the Unicode Standard, chapter 3, the
//      same count Python's bytes.decode("utf-8", "replace") gives); NUL bytes
//      are ordinary code points.
//   2. ICU's NFKC_Casefold normalization.
//   3. UAX #29 word segmentation (ICU word break iterator, root locale),
//      keeping the segments whose rule status is 100 or more (numbers,
//      letters, kana, ideographs) and dropping spaces and punctuation.
// Documents made only of ASCII bytes may take a hand-written fast path that
// gives exactly the tokens ICU gives.
//
// The functions here serve tests, `explain` and other modules; the signing
// hot path is kindred::Shingler (shingles.h), which does the same work without
// per-token allocation. Every function is thread-safe (each call builds or
// borrows its own ICU objects).
#ifndef KINDRED_TEXT_H_
#define KINDRED_TEXT_H_

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/statusor.h"

namespace kindred {

// What happened to one document on its way to shingles.
struct TextStats {
  // Ill-formed UTF-8 sequences replaced by U+FFFD.
  uint32_t invalid_utf8 = 0;
  // Kept word tokens (word mode) or code points of the whitespace-folded text
  // (char mode).
  uint32_t tokens = 0;
  // True when the document was all ASCII and took the fast path.
  bool ascii_path = false;
};

// Which tokenizer a call uses.
enum class TextPath : uint8_t {
  kAuto = 0,   // the ASCII fast path for all-ASCII input, ICU otherwise
  kIcu = 1,    // always ICU (the reference behaviour)
  kAscii = 2,  // always the fast path; the input must be all ASCII
};

// One kept word. `text` is normalized UTF-8 (the bytes that shingles join);
// [begin, end) are byte offsets in the ORIGINAL input covering the characters
// the word came from (whole characters; when normalization merges characters
// across a word edge, the span widens to cover them).
struct Token {
  std::string text;
  uint32_t begin = 0;
  uint32_t end = 0;
};

// True when every byte of `bytes` is below 0x80. Scans eight bytes at a time.
bool IsAscii(std::string_view bytes);

// Returns `bytes` as well-formed UTF-8: each ill-formed sequence (maximal
// subpart) is replaced by U+FFFD (EF BF BD). When `replaced` is not null it
// receives the number of replacements.
std::string RepairUtf8(std::string_view bytes, uint32_t* replaced = nullptr);

// Steps 1 and 2: the NFKC_Casefold form of the decoded input, as UTF-8.
// `stats`, when not null, receives invalid_utf8 (other fields untouched).
// Fails if ICU fails (Internal) or the input is 2 GiB or more (OutOfRange).
absl::StatusOr<std::string> NormalizeText(std::string_view utf8,
                                          TextStats* stats = nullptr);

// Steps 1 to 3: the kept word tokens in document order, with their spans.
// Inputs of 4 GiB or more (spans are 32-bit), or of 2 GiB or more on the ICU
// path, are OutOfRange. With TextPath::kAscii, non-ASCII input is
// InvalidArgument.
absl::StatusOr<std::vector<Token>> TokenizeWithSpans(
    std::string_view utf8, TextPath path = TextPath::kAuto);

// The Unicode and ICU versions this build segments and normalizes with, e.g.
// "Unicode 15.0, ICU 72.1". Index files record it: a change may change
// shingles.
std::string UnicodeVersionString();

}  // namespace kindred

#endif  // KINDRED_TEXT_H_
