// Internal: the byte-level pieces of the HTML5 tokenizer (WHATWG HTML
// Standard, section 13.2.5) that the fast HTML-to-text path uses: finding
// the next byte of a text run that needs attention (SSE2 on x86-64, a
// portable loop elsewhere), appending a text run with character references
// decoded, and finding the ends of tags, comments and raw text elements.
//
// Input is valid UTF-8. Like the reference parser (Gumbo 0.10), the text
// is appended with CR LF and CR turned into LF and with the code points the
// standard calls invalid in the input stream (controls other than tab, LF,
// FF and CR; U+007F..U+009F; noncharacters) replaced by U+FFFD.
//
// Thread-safety: plain functions.
#ifndef KINDRED_IO_HTML_SCAN_H_
#define KINDRED_IO_HTML_SCAN_H_

#include <cstddef>
#include <string>

#include "absl/strings/string_view.h"

namespace kindred::io::html_scan {

inline constexpr size_t kNotFound = absl::string_view::npos;

inline bool IsSpace(char c) { return c == ' ' || c == '\n' || c == '\t' || c == '\f' || c == '\r'; }
inline bool IsAlpha(char c) { return ((c | 0x20) >= 'a' && (c | 0x20) <= 'z'); }

// The index of the first byte of `text` at or after `from` that is '<',
// '&', a control other than tab and LF, 0x7F, 0xC2 or 0xEF..0xFF (lead
// bytes of sequences that may need replacing); text.size() if none.
size_t FindTextSpecial(absl::string_view text, size_t from);

// Whether `bytes` is well-formed UTF-8 (the Unicode Standard, table 3-7).
bool IsValidUtf8(absl::string_view bytes);

// How a text run is appended.
enum class TextKind {
  kData,     // character references decoded, NUL dropped (text in "in body")
  kRcdata,   // character references decoded, NUL -> U+FFFD (title, textarea)
  kRawtext,  // as is, NUL -> U+FFFD (iframe, xmp, noembed, noframes)
};

// Appends `run` (with no '<' for kData) to *out by `kind`. Returns false
// when the run holds a numeric character reference past U+10FFFF: it is
// appended as U+FFFD, as the standard says, but the reference parser (Gumbo
// 0.10) wraps the value in a 32-bit integer, so the fast path declines such
// a page rather than differ.
bool AppendText(absl::string_view run, TextKind kind, std::string* out);

// `html[i]` is just after a tag's name. Skips its attributes: returns the
// index just after the closing '>', or kNotFound when the input ends first
// (the tag is then dropped). *self_closing is set for a "/>" end.
size_t SkipAttributes(absl::string_view html, size_t i, bool* self_closing);

// `attributes` is the source of a tag from the end of its name to its '>'.
// Sets *value to the raw value (character references not decoded) of the
// first attribute named `name` (lower case; names compared ignoring case)
// and returns true, or returns false when there is none.
bool AttributeValue(absl::string_view attributes, absl::string_view name, absl::string_view* value);

// `html[i]` is the '<' of "<!--". Returns the index just after the
// comment (html.size() when it runs to the end).
size_t CommentEnd(absl::string_view html, size_t i);

// `html[i]` is the first byte of the contents of a RAWTEXT or RCDATA
// element named `name` (lower case). Returns the index of the '<' of its
// appropriate end tag ("</name" then space, '/' or '>'), or kNotFound.
size_t RawTextEnd(absl::string_view html, size_t i, absl::string_view name);

// The same for script data, with its escaped and double-escaped states.
size_t ScriptDataEnd(absl::string_view html, size_t i);

}  // namespace kindred::io::html_scan

#endif  // KINDRED_IO_HTML_SCAN_H_
