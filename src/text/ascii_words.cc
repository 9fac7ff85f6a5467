#include "text/ascii_words.h"

#include <bit>
#include <cstring>

#if defined(__SSE2__)
#include <emmintrin.h>
#endif

namespace kindred::text_internal {
namespace {

#if defined(__SSE2__)

// Bit i set when byte i of the 16 is a letter, digit, '_' or '@' (the word
// classes of ascii_words.h); the input is ASCII, so signed compares work.
inline uint32_t WordBits16(__m128i v) {
  const __m128i lower = _mm_or_si128(v, _mm_set1_epi8(0x20));
  const __m128i letter =
      _mm_and_si128(_mm_cmpgt_epi8(lower, _mm_set1_epi8('a' - 1)),
                    _mm_cmpgt_epi8(_mm_set1_epi8('z' + 1), lower));
  const __m128i digit =
      _mm_and_si128(_mm_cmpgt_epi8(v, _mm_set1_epi8('0' - 1)),
                    _mm_cmpgt_epi8(_mm_set1_epi8('9' + 1), v));
  const __m128i other = _mm_or_si128(_mm_cmpeq_epi8(v, _mm_set1_epi8('_')),
                                     _mm_cmpeq_epi8(v, _mm_set1_epi8('@')));
  return static_cast<uint32_t>(
      _mm_movemask_epi8(_mm_or_si128(_mm_or_si128(letter, digit), other)));
}

// Bit i set when byte i is '.', '\'', ',' or ';' (MidNumLet, Single_Quote,
// MidNum).
inline uint32_t MidBits16(__m128i v) {
  const __m128i a = _mm_or_si128(_mm_cmpeq_epi8(v, _mm_set1_epi8('.')),
                                 _mm_cmpeq_epi8(v, _mm_set1_epi8('\'')));
  const __m128i b = _mm_or_si128(_mm_cmpeq_epi8(v, _mm_set1_epi8(',')),
                                 _mm_cmpeq_epi8(v, _mm_set1_epi8(';')));
  return static_cast<uint32_t>(_mm_movemask_epi8(_mm_or_si128(a, b)));
}

void Masks64(const unsigned char* block, uint64_t* word, uint64_t* mid) {
  uint64_t w = 0, m = 0;
  for (int i = 0; i < 4; ++i) {
    const __m128i v =
        _mm_loadu_si128(reinterpret_cast<const __m128i*>(block + 16 * i));
    w |= uint64_t{WordBits16(v)} << (16 * i);
    m |= uint64_t{MidBits16(v)} << (16 * i);
  }
  *word = w, *mid = m;
}

// Copies p[0, length) casefolded to out, 16 bytes at a time; may read and
// write up to 15 bytes past `length` (the caller guarantees both are there).
inline void FoldCopy16(const unsigned char* p, size_t length, char* out) {
  for (size_t i = 0; i < length; i += 16) {
    const __m128i v = _mm_loadu_si128(reinterpret_cast<const __m128i*>(p + i));
    const __m128i upper =
        _mm_and_si128(_mm_cmpgt_epi8(v, _mm_set1_epi8('A' - 1)),
                      _mm_cmpgt_epi8(_mm_set1_epi8('Z' + 1), v));
    const __m128i folded =
        _mm_add_epi8(v, _mm_and_si128(upper, _mm_set1_epi8(0x20)));
    _mm_storeu_si128(reinterpret_cast<__m128i*>(out + i), folded);
  }
}

#else

void Masks64(const unsigned char* block, uint64_t* word, uint64_t* mid) {
  uint64_t w = 0, m = 0;
  for (int i = 0; i < 64; ++i) {
    const uint8_t c = kAsciiClasses[block[i]];
    w |= uint64_t{IsWordClass(c)} << i;
    m |= uint64_t{c == kMidNum || c == kMidNumLet} << i;
  }
  *word = w, *mid = m;
}

#endif

// True when the mid character p[j] joins its neighbours into one word
// (WB6/WB7 between letters, WB11/WB12 between digits).
inline bool MidJoins(const unsigned char* p, size_t j, size_t n) {
  if (j == 0 || j + 1 >= n) return false;
  const uint8_t prev = kAsciiClasses[p[j - 1]];
  const uint8_t next = kAsciiClasses[p[j + 1]];
  const uint8_t mid = kAsciiClasses[p[j]];
  return (prev == kLetter && next == kLetter && mid == kMidNumLet) ||
         (prev == kDigit && next == kDigit);
}

// Writes the output side of the scan: one word [begin, end) of p.
template <bool kSpans>
struct WordWriter {
  const unsigned char* p;
  size_t n;
  char* out_start;
  char* out;
  uint32_t* word_begin;
  uint32_t* span_begin;
  uint32_t* span_end;
  size_t words = 0;

  void Add(size_t begin, size_t end) {
    const size_t length = end - begin;
    if (length == 1 && p[begin] == '_') return;  // status 0
#if defined(__SSE2__)
    if (begin + ((length + 15) & ~size_t{15}) <= n) {
      FoldCopy16(p + begin, length, out);
    } else {
      for (size_t i = 0; i < length; ++i) out[i] = AsciiFold(p[begin + i]);
    }
#else
    for (size_t i = 0; i < length; ++i) out[i] = AsciiFold(p[begin + i]);
#endif
    word_begin[words] = static_cast<uint32_t>(out - out_start);
    if constexpr (kSpans) {
      span_begin[words] = static_cast<uint32_t>(begin);
      span_end[words] = static_cast<uint32_t>(end);
    }
    out += length;
    *out++ = ' ';
    ++words;
  }
};

template <bool kSpans>
size_t Scan(const unsigned char* p, size_t n, WordWriter<kSpans>& writer) {
  bool in_word = false;
  size_t word_start = 0;
  unsigned char tail[64];
  for (size_t base = 0; base < n; base += 64) {
    const unsigned char* block = p + base;
    if (n - base < 64) {  // the last, partial block: pad with NUL (Other)
      std::memset(tail, 0, sizeof(tail));
      std::memcpy(tail, block, n - base);
      block = tail;
    }
    uint64_t word, mid;
    Masks64(block, &word, &mid);
    for (uint64_t m = mid; m != 0; m &= m - 1) {
      const int j = std::countr_zero(m);
      if (MidJoins(p, base + j, n)) word |= uint64_t{1} << j;
    }
    const uint64_t before = (word << 1) | uint64_t{in_word};
    uint64_t starts = word & ~before;
    uint64_t ends = ~word & before;
    while (true) {
      if (in_word) {
        if (ends == 0) break;
        writer.Add(word_start, base + std::countr_zero(ends));
        ends &= ends - 1;
        in_word = false;
      } else {
        if (starts == 0) break;
        word_start = base + std::countr_zero(starts);
        starts &= starts - 1;
        in_word = true;
      }
    }
  }
  if (in_word) writer.Add(word_start, n);
  writer.word_begin[writer.words] =
      static_cast<uint32_t>(writer.out - writer.out_start);
  return writer.words;
}

}  // namespace

size_t FoldAsciiWords(const unsigned char* p, size_t n, char* out,
                      uint32_t* word_begin) {
  WordWriter<false> writer{p, n, out, out, word_begin, nullptr, nullptr};
  return Scan(p, n, writer);
}

size_t FoldAsciiWordsWithSpans(const unsigned char* p, size_t n, char* out,
                               uint32_t* word_begin, uint32_t* span_begin,
                               uint32_t* span_end) {
  WordWriter<true> writer{p, n, out, out, word_begin, span_begin, span_end};
  return Scan(p, n, writer);
}

}  // namespace kindred::text_internal
