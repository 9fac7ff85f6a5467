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
// memory and confirmed by the differential tests) change two of them: ':' is not MidLetter (so "a:b" is three segments) and '@' is ALetter
// (so "a@b" and a lone "@" are words). With that, a word is a run of letters
// (with '@'), digits and '_' (joined by WB5, WB8-WB10, WB13a, WB13b) in which
// a single '.' or '\'' may stand between two letters (WB6, WB7) and a single
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

// Returns the end of the word segment that starts at p[begin], which must be
// a letter, digit or '_'.
inline size_t AsciiWordEnd(const unsigned char* p, size_t begin, size_t n) {
  uint8_t prev = kAsciiClasses[p[begin]];
  size_t i = begin + 1;
  while (i < n) {
    const uint8_t c = kAsciiClasses[p[i]];
    if (IsWordClass(c)) {
      prev = c;
      ++i;
      continue;
    }
    if (c == kOther || i + 1 >= n) break;
    const uint8_t next = kAsciiClasses[p[i + 1]];
    const bool letters = prev == kLetter && next == kLetter && c == kMidNumLet;
    const bool digits = prev == kDigit && next == kDigit;
    if (!letters && !digits) break;
    prev = next;
    i += 2;
  }
  return i;
}

// Calls on_word(begin, end) for each kept word segment of the ASCII text
// p[0, n), in order.
template <typename OnWord>
inline void ForEachAsciiWord(const unsigned char* p, size_t n,
                             OnWord&& on_word) {
  size_t i = 0;
  while (i < n) {
    if (!IsWordClass(kAsciiClasses[p[i]])) {
      ++i;
      continue;
    }
    const size_t end = AsciiWordEnd(p, i, n);
    if (end - i >= 2 || p[i] != '_') on_word(i, end);
    i = end;
  }
}

}  // namespace kindred::text_internal

#endif  // KINDRED_TEXT_ASCII_WORDS_H_
