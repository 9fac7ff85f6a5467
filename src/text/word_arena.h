// Collecting a document's kept words into one buffer for word shingles, with
// the ASCII scanner on ASCII stretches of a mixed document and ICU on the
// rest. Internal to the library.
#ifndef KINDRED_TEXT_WORD_ARENA_H_
#define KINDRED_TEXT_WORD_ARENA_H_

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/statusor.h"
#include "text/icu_words.h"

namespace kindred::text_internal {

// The kept words of a document, normalized, each followed by one space;
// word i begins at marks[i]. A window of words is one contiguous run.
struct WordArena {
  std::string text;
  std::vector<uint32_t> marks;

  void Clear() {
    text.clear();
    marks.clear();
  }
};

// Appends the words of ASCII `text` (ASCII scanner).
void AppendAsciiWords(std::string_view text, WordArena* arena);

// Appends the words of `text` by ICU (decoding, NFKC_Casefold, UAX #29).
// Returns the number of U+FFFD replacements.
absl::StatusOr<uint32_t> AppendIcuWords(std::string_view text, IcuWords& icu,
                                        WordArena* arena);

// Appends the words of `text`, giving ICU only the pieces that hold non-ASCII
// bytes (SplitAtCuts in mixed_text.h says why the result is the same).
absl::StatusOr<uint32_t> AppendMixedWords(std::string_view text, IcuWords& icu,
                                          WordArena* arena);

// Appends the NFKC_Casefold form of `text` as UTF-8 to *out, the same way:
// ASCII pieces are casefolded directly. Returns the replacement count.
absl::StatusOr<uint32_t> AppendMixedNormalized(std::string_view text,
                                               IcuWords& icu, std::string* out);

}  // namespace kindred::text_internal

#endif  // KINDRED_TEXT_WORD_ARENA_H_
