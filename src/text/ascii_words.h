// The ASCII fast path of word segmentation: a hand-written scanner that gives
// exactly the kept segments ICU's root word break iterator gives for ASCII
// text. Internal to the library.
//
// For ASCII, NFKC_Casefold only maps A-Z to a-z. The UAX #29 word break
// properties of ASCII (Unicode 15.0 WordBreakProperty.txt) are
//   ALetter: A-Z a-z           Numeric: 0-9          ExtendNumLet: _
//   MidLetter: ':'              MidNum: ',' ';'       MidNumLet: '.'
//   Single_Quote: '\''          Double_Quote: '"'     WSegSpace: ' '
//   CR, LF, Newline (VT, FF)    everything else: Other
// and ICU's root rules (which follow the CLDR root tailoring, recalled from
// memory and confirmed by the differential tests) change two of them: ':' is
// not MidLetter (so "a:b" is three segments) and '@' is ALetter (so "a@b" and a
// lone "@" are words). With that, a word is a run of letters (with '@'), digits
// and '_' (joined by WB5, WB8-WB10, WB13a, WB13b) in which a single '.' or '\''
// may stand between two letters (WB6, WB7) and a single
// ',', ';', '.' or '\'' between two digits (WB11, WB12). ICU gives a word rule
// status 100 or more except for a lone "_", whose status is 0. Every other
// segment (spaces, CR LF, punctuation, controls) has status 0 and is
// dropped. Double_Quote matters only after Hebrew letters (WB7b, WB7c), so in
// ASCII text it is Other.
#ifndef KINDRED_TEXT_ASCII_WORDS_H_
#define KINDRED_TEXT_ASCII_WORDS_H_

#include <array>
#include <cstddef>
#include <cstdint>

namespace kindred::text_internal {

enum AsciiClass : uint8_t {
  kOther = 0,
  kLetter = 1,
  kDigit = 2,
  kUnderscore = 3,
  kMidNum = 4,     // ',' ';'
  kMidNumLet = 5,  // '.' '\''
};

inline constexpr std::array<uint8_t, 256> MakeAsciiClasses() {
  std::array<uint8_t, 256> t{};
  for (int c = 'a'; c <= 'z'; ++c) t[c] = kLetter;
  for (int c = 'A'; c <= 'Z'; ++c) t[c] = kLetter;
  for (int c = '0'; c <= '9'; ++c) t[c] = kDigit;
  t['_'] = kUnderscore;
  t['@'] = kLetter;  // ICU root tailoring
  t[','] = kMidNum;
  t[';'] = kMidNum;
  t['.'] = kMidNumLet;
  t['\''] = kMidNumLet;
  return t;
}

inline constexpr std::array<uint8_t, 256> kAsciiClasses = MakeAsciiClasses();

// NFKC_Casefold of an ASCII byte: A-Z become a-z, everything else is itself.
inline char AsciiFold(unsigned char c) {
  return static_cast<char>(c + ((static_cast<unsigned>(c - 'A') < 26u) << 5));
}

// True for letters, digits and '_', the classes that chain into words.
inline bool IsWordClass(uint8_t cls) {
  return static_cast<uint8_t>(cls - 1) < 3;
}

// Writes the kept words of the ASCII text p[0, n) to `out`, casefolded and
// each followed by one space, the offset in `out` where word i begins to
// word_begin[i], and the length written to word_begin[words]. With kSpans, also
// writes each word's span in p to span_begin[i] and span_end[i]. Returns the
// number of words.
//
// Requires room for n + 1 bytes in `out`, n / 2 + 2 entries in word_begin
// and n / 2 + 1 in the span arrays
// (every word but the last is followed in p by at least one byte that is not
// part of a word, and a word of one byte is never followed directly by
// another word).
//
// This is the plain byte-at-a-time scanner; FoldAsciiWords below gives the
// same result faster.
template <bool kSpans>
inline size_t FoldAsciiWordsScalar(const unsigned char* p, size_t n, char* out,
                                   uint32_t* word_begin, uint32_t* span_begin,
                                   uint32_t* span_end) {
  const char* const out_start = out;
  size_t words = 0;
  size_t i = 0;
  while (true) {
    while (i < n && !IsWordClass(kAsciiClasses[p[i]])) ++i;
    if (i >= n) break;
    const size_t begin = i;
    char* const word_start = out;
    uint8_t prev = kOther;
    while (true) {
      uint8_t c;
      while (i < n && IsWordClass(c = kAsciiClasses[p[i]])) {
        *out++ = AsciiFold(p[i++]);
        prev = c;
      }
      // A '.', '\'', ',' or ';' joins only when a matching class follows.
      if (i + 1 >= n) break;
      const uint8_t mid = kAsciiClasses[p[i]];
      const uint8_t next = kAsciiClasses[p[i + 1]];
      const bool letters =
          prev == kLetter && next == kLetter && mid == kMidNumLet;
      const bool digits = prev == kDigit && next == kDigit &&
                          (mid == kMidNum || mid == kMidNumLet);
      if (!letters && !digits) break;
      *out++ = static_cast<char>(p[i++]);
    }
    if (i - begin == 1 && p[begin] == '_') {  // a lone "_" has status 0
      out = word_start;
      continue;
    }
    *out++ = ' ';
    word_begin[words] = static_cast<uint32_t>(word_start - out_start);
    if constexpr (kSpans) {
      span_begin[words] = static_cast<uint32_t>(begin);
      span_end[words] = static_cast<uint32_t>(i);
    }
    ++words;
  }
  word_begin[words] = static_cast<uint32_t>(out - out_start);
  return words;
}

// Same contract and result as FoldAsciiWordsScalar, except that `out` needs
// room for n + 17 bytes (whole 16-byte stores may run past a word). Classifies
// 64 bytes at a time with SSE2 where the target has it.
size_t FoldAsciiWords(const unsigned char* p, size_t n, char* out,
                      uint32_t* word_begin);
size_t FoldAsciiWordsWithSpans(const unsigned char* p, size_t n, char* out,
                               uint32_t* word_begin, uint32_t* span_begin,
                               uint32_t* span_end);

}  // namespace kindred::text_internal

#endif  // KINDRED_TEXT_ASCII_WORDS_H_
