// The byte-level pieces of the fast HTML5 tokenizer.
#include "io/html_scan.h"

#include <cstdint>
#include <cstring>

#include "absl/strings/ascii.h"
#include "absl/strings/match.h"
#include "io/html_entities.h"
#include "text/utf8.h"

#if defined(__SSE2__)
#include <emmintrin.h>
#endif

namespace kindred::io::html_scan {
namespace {

constexpr char kReplacement[] = "\xef\xbf\xbd";

inline bool IsSpecialByte(unsigned char c) {
  return c == '<' || c == '&' || (c < 0x20 && c != '\n' && c != '\t') || c == 0x7f || c == 0xc2 ||
         c >= 0xef;
}

// Windows-1252 meanings of numeric references to 0x80..0x9F (HTML
// Standard, "numeric character reference end state"); 0 keeps the code.
constexpr char16_t kC1Replacements[32] = {
    0x20AC, 0,      0x201A, 0x0192, 0x201E, 0x2026, 0x2020, 0x2021, 0x02C6, 0x2030, 0x0160,
    0x2039, 0x0152, 0,      0x017D, 0,      0,      0x2018, 0x2019, 0x201C, 0x201D, 0x2022,
    0x2013, 0x2014, 0x02DC, 0x2122, 0x0161, 0x203A, 0x0153, 0,      0x017E, 0x0178};

// `text` starts after "&#". Appends the referenced character and returns
// the bytes consumed after "&#", or 0 (nothing appended) when no digits
// follow. Sets *past_unicode when the value is past U+10FFFF (U+FFFD is
// appended, as the standard says; the reference parser wraps such values
// in a 32-bit integer instead, so the caller declines the page).
size_t AppendNumericReference(absl::string_view text, std::string* out, bool* past_unicode) {
  size_t i = 0;
  const bool hex = i < text.size() && (text[i] == 'x' || text[i] == 'X');
  if (hex) ++i;
  const size_t digits_start = i;
  uint32_t value = 0;
  bool too_big = false;
  for (; i < text.size(); ++i) {
    const char c = text[i];
    int digit;
    if (c >= '0' && c <= '9') {
      digit = c - '0';
    } else if (hex && (c | 0x20) >= 'a' && (c | 0x20) <= 'f') {
      digit = (c | 0x20) - 'a' + 10;
    } else {
      break;
    }
    value = value * (hex ? 16 : 10) + digit;
    if (value > 0x10FFFF) {
      too_big = true;
      value = 0x110000;
    }
  }
  if (i == digits_start) return 0;
  if (i < text.size() && text[i] == ';') ++i;
  if (too_big) *past_unicode = true;
  if (too_big || value == 0 || (value >= 0xD800 && value <= 0xDFFF)) {
    out->append(kReplacement, 3);
  } else if (value >= 0x80 && value <= 0x9F && kC1Replacements[value - 0x80] != 0) {
    text_internal::AppendCodePoint(kC1Replacements[value - 0x80], out);
  } else {
    text_internal::AppendCodePoint(value, out);
  }
  return i;
}

// `text` starts at a '&'. Appends what it stands for; returns the bytes
// consumed (at least 1). Sets *past_unicode as AppendNumericReference does.
size_t AppendReference(absl::string_view text, std::string* out, bool* past_unicode) {
  if (text.size() > 1 && text[1] == '#') {
    if (size_t used = AppendNumericReference(text.substr(2), out, past_unicode)) return used + 2;
    out->push_back('&');
    return 1;
  }
  absl::string_view value;
  if (size_t used = MatchNamedReference(text.substr(1), &value)) {
    out->append(value.data(), value.size());
    return used + 1;
  }
  out->push_back('&');
  return 1;
}

// `text[0]` is a special byte other than '<' and '&'. Appends it (or its
// replacement) and returns the bytes consumed.
size_t AppendSpecial(absl::string_view text, TextKind kind, std::string* out) {
  const unsigned char c = text[0];
  if (c == 0) {
    if (kind != TextKind::kData) out->append(kReplacement, 3);
    return 1;
  }
  if (c == '\r') {
    out->push_back('\n');
    return text.size() > 1 && text[1] == '\n' ? 2 : 1;
  }
  if (c == '\f') {
    out->push_back('\f');
    return 1;
  }
  if (c < 0x80) {  // other controls and DEL
    out->append(kReplacement, 3);
    return 1;
  }
  const size_t length = c < 0xe0 ? 2 : c < 0xf0 ? 3 : 4;
  const unsigned char c1 = text[1];
  bool invalid = false;
  if (c == 0xc2) {
    invalid = c1 <= 0x9f;  // U+0080..U+009F
  } else if (c == 0xef) {
    const unsigned char c2 = text[2];
    invalid = (c1 == 0xb7 && c2 >= 0x90 && c2 <= 0xaf) || (c1 == 0xbf && c2 >= 0xbe);
  } else if (length == 4) {
    invalid = (c1 & 0x0f) == 0x0f && static_cast<unsigned char>(text[2]) == 0xbf &&
              static_cast<unsigned char>(text[3]) >= 0xbe;
  }
  if (invalid) {
    out->append(kReplacement, 3);
  } else {
    out->append(text.data(), length);
  }
  return length;
}

}  // namespace

size_t FindTextSpecial(absl::string_view text, size_t from) {
  const unsigned char* p = reinterpret_cast<const unsigned char*>(text.data());
  size_t i = from;
  const size_t n = text.size();
#if defined(__SSE2__)
  const __m128i lt = _mm_set1_epi8('<'), amp = _mm_set1_epi8('&'), lf = _mm_set1_epi8('\n'),
                tab = _mm_set1_epi8('\t'), c1f = _mm_set1_epi8(0x1f), del = _mm_set1_epi8(0x7f),
                c2 = _mm_set1_epi8(static_cast<char>(0xc2)),
                ef = _mm_set1_epi8(static_cast<char>(0xef));
  for (; i + 16 <= n; i += 16) {
    const __m128i v = _mm_loadu_si128(reinterpret_cast<const __m128i*>(p + i));
    const __m128i control =
        _mm_andnot_si128(_mm_or_si128(_mm_cmpeq_epi8(v, lf), _mm_cmpeq_epi8(v, tab)),
                         _mm_cmpeq_epi8(_mm_min_epu8(v, c1f), v));
    const __m128i high =
        _mm_or_si128(_mm_cmpeq_epi8(v, c2), _mm_cmpeq_epi8(_mm_max_epu8(v, ef), v));
    const __m128i marks =
        _mm_or_si128(_mm_or_si128(_mm_cmpeq_epi8(v, lt), _mm_cmpeq_epi8(v, amp)),
                     _mm_or_si128(_mm_or_si128(control, high), _mm_cmpeq_epi8(v, del)));
    const int mask = _mm_movemask_epi8(marks);
    if (mask != 0) return i + __builtin_ctz(mask);
  }
#endif
  for (; i < n; ++i) {
    if (IsSpecialByte(p[i])) return i;
  }
  return n;
}

bool IsValidUtf8(absl::string_view bytes) {
  const unsigned char* p = reinterpret_cast<const unsigned char*>(bytes.data());
  const size_t n = bytes.size();
  size_t i = 0;
  while (i < n) {
    if (i + 8 <= n) {
      uint64_t word;
      std::memcpy(&word, p + i, 8);
      if ((word & 0x8080808080808080ull) == 0) {
        i += 8;
        continue;
      }
    }
    const unsigned char c = p[i];
    if (c < 0x80) {
      ++i;
      continue;
    }
    size_t length;
    unsigned char low = 0x80, high = 0xbf;  // bounds of the second byte
    if (c >= 0xc2 && c <= 0xdf) {
      length = 2;
    } else if (c >= 0xe0 && c <= 0xef) {
      length = 3;
      if (c == 0xe0) low = 0xa0;
      if (c == 0xed) high = 0x9f;
    } else if (c >= 0xf0 && c <= 0xf4) {
      length = 4;
      if (c == 0xf0) low = 0x90;
      if (c == 0xf4) high = 0x8f;
    } else {
      return false;
    }
    if (i + length > n || p[i + 1] < low || p[i + 1] > high) return false;
    for (size_t k = 2; k < length; ++k) {
      if ((p[i + k] & 0xc0) != 0x80) return false;
    }
    i += length;
  }
  return true;
}

bool AppendText(absl::string_view run, TextKind kind, std::string* out) {
  bool past_unicode = false;
  size_t i = 0;
  while (i < run.size()) {
    const size_t special = FindTextSpecial(run, i);
    out->append(run.data() + i, special - i);
    if (special == run.size()) break;
    const char c = run[special];
    if (c == '&' && kind != TextKind::kRawtext) {
      i = special + AppendReference(run.substr(special), out, &past_unicode);
    } else if (c == '&' || c == '<') {
      out->push_back(c);
      i = special + 1;
    } else {
      i = special + AppendSpecial(run.substr(special), kind, out);
    }
  }
  return !past_unicode;
}

}  // namespace kindred::io::html_scan
