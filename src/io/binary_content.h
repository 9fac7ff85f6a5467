// Internal: the rule that tells a binary file (a program, an image, a PDF)
// from text, applied to the first bytes of a document read from a file.
//
// Binary: the first kBinaryProbeBytes hold a NUL byte, or more than a tenth
// of them lie in ill-formed UTF-8 sequences (per the well-formed byte
// sequences table of the Unicode Standard, chapter 3; an incomplete
// sequence cut off at the end of the probe does not count). Text in a legacy
// 8-bit encoding with a few accented letters stays text; text mostly in
// such an encoding (Greek or Cyrillic in ISO 8859) counts as binary.
//
// Thread-safe (a pure function).
#ifndef KINDRED_IO_BINARY_CONTENT_H_
#define KINDRED_IO_BINARY_CONTENT_H_

#include <cstddef>
#include <string>
#include <string_view>

namespace kindred::io {

inline constexpr size_t kBinaryProbeBytes = 8 << 10;

// True when `text` (the whole document, or at least its first
// kBinaryProbeBytes) is binary; then *why (if not null) says which rule.
bool LooksBinary(std::string_view text, std::string* why);

// Bytes of ill-formed UTF-8 sequences in `bytes`, not counting an
// incomplete but so far valid sequence at the very end.
size_t IllFormedUtf8Bytes(std::string_view bytes);

}  // namespace kindred::io

#endif  // KINDRED_IO_BINARY_CONTENT_H_
