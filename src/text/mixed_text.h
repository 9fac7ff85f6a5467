// Cutting a mostly-ASCII document so that ICU sees only the stretches around
// its non-ASCII bytes. Internal to the library.
#ifndef KINDRED_TEXT_MIXED_TEXT_H_
#define KINDRED_TEXT_MIXED_TEXT_H_

#include <cstdint>
#include <cstring>
#include <string_view>

#include "absl/status/status.h"

namespace kindred::text_internal {

// A cut is an ASCII space or LF whose neighbours are both ASCII. UAX #29
// always breaks on both sides of it (WB3a, WB3b; WSegSpace joins only spaces,
// WB3d, and absorbs only Extend, Format or ZWJ, WB4, none of them ASCII) and
// no rule looks across it; ASCII characters have normalization boundaries on
// both sides. So the words, and the normalized text, of a document are those
// of pieces cut there, in order. Ill-formed UTF-8 sequences never span an
// ASCII byte, so replacement counts add up too.
inline bool IsCut(const unsigned char* p, size_t i, size_t n) {
  return (p[i] == ' ' || p[i] == '\n') && (i == 0 || p[i - 1] < 0x80) &&
         (i + 1 == n || p[i + 1] < 0x80);
}

// The first byte >= 0x80 at or after `from`, or n.
inline size_t FindNonAscii(const unsigned char* p, size_t from, size_t n) {
  while (from < n && !(p[from] & 0x80)) {
    if (from + 8 <= n) {
      uint64_t w;
      std::memcpy(&w, p + from, 8);
      if ((w & 0x8080808080808080ULL) == 0) {
        from += 8;
        continue;
      }
    }
    ++from;
  }
  return from;
}

// Splits `text` into consecutive pieces that cover it exactly: all-ASCII
// pieces, and pieces that hold non-ASCII bytes and begin and end at cuts (or
// at the ends of the text). Calls on_ascii(piece) or on_other(piece), each
// returning absl::Status, in text order; stops at the first error.
template <typename OnAscii, typename OnOther>
absl::Status SplitAtCuts(std::string_view text, OnAscii&& on_ascii,
                         OnOther&& on_other) {
  const auto* p = reinterpret_cast<const unsigned char*>(text.data());
  const size_t n = text.size();
  size_t pos = 0;
  while (pos < n) {
    const size_t wide = FindNonAscii(p, pos, n);
    if (wide == n) return on_ascii(text.substr(pos));
    // The other piece starts after the last cut whose right neighbour is
    // still before the non-ASCII byte, and ends before the next cut.
    size_t start = pos;
    for (size_t i = wide; i-- > pos;) {
      if (i + 1 < wide && IsCut(p, i, n)) {
        start = i + 1;
        break;
      }
    }
    if (start > pos) {
      if (absl::Status s = on_ascii(text.substr(pos, start - pos)); !s.ok()) {
        return s;
      }
    }
    size_t end = wide + 1;
    while (end < n && !IsCut(p, end, n)) ++end;
    if (absl::Status s = on_other(text.substr(start, end - start)); !s.ok()) {
      return s;
    }
    pos = end;
  }
  return absl::OkStatus();
}

}  // namespace kindred::text_internal

#endif  // KINDRED_TEXT_MIXED_TEXT_H_
