// UTF-8 decoding with replacement, and UTF-16 to UTF-8 encoding, for the text
// pipeline. Internal to the library.
#ifndef KINDRED_TEXT_UTF8_H_
#define KINDRED_TEXT_UTF8_H_

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "unicode/unistr.h"

namespace kindred::text_internal {

// Decodes `bytes` into `out` (replacing its contents) as UTF-16. Each
// ill-formed sequence becomes one U+FFFD by the "maximal subpart" practice of
// the Unicode Standard (chapter 3, "U+FFFD Substitution of Maximal
// Subparts"), which is also what Python's bytes.decode("utf-8", "replace")
// does. Returns the number of replacements. When `unit_begin` is not null, it
// receives for each UTF-16 unit of `out` the byte offset in `bytes` of the
// sequence it came from, plus one final entry equal to bytes.size().
uint32_t DecodeUtf8(std::string_view bytes, icu::UnicodeString* out,
                    std::vector<uint32_t>* unit_begin = nullptr);

// Appends the UTF-8 form of the well-formed UTF-16 units [begin, end) of
// `units` to *out. A lone surrogate (never produced by DecodeUtf8 and
// normalization) is written as U+FFFD.
void AppendUtf8(const char16_t* units, int32_t begin, int32_t end,
                std::string* out);

// Appends the UTF-8 form of code point `c` (a Unicode scalar value).
void AppendCodePoint(char32_t c, std::string* out);

}  // namespace kindred::text_internal

#endif  // KINDRED_TEXT_UTF8_H_
