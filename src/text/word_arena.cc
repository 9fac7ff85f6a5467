#include "text/word_arena.h"

#include <cstring>

#include "text/ascii_words.h"
#include "text/utf8.h"

namespace kindred::text_internal {
namespace {

inline bool IsCut(const unsigned char* p, size_t i, size_t n) {
  return (p[i] == ' ' || p[i] == '\n') && (i == 0 || p[i - 1] < 0x80) &&
         (i + 1 == n || p[i + 1] < 0x80);
}

// The first byte >= 0x80 at or after `from`, or n.
size_t FindNonAscii(const unsigned char* p, size_t from, size_t n) {
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

}  // namespace

void AppendAsciiWords(std::string_view text, WordArena* arena) {
  const size_t n = text.size();
  const size_t old_text = arena->text.size();
  const size_t old_marks = arena->marks.size();
  arena->text.resize(old_text + n + 17);
  arena->marks.resize(old_marks + n / 2 + 2);
  const size_t words = FoldAsciiWords(
      reinterpret_cast<const unsigned char*>(text.data()), n,
      arena->text.data() + old_text, arena->marks.data() + old_marks);
  arena->text.resize(old_text + arena->marks[old_marks + words]);
  arena->marks.resize(old_marks + words);
  for (size_t i = old_marks; i < arena->marks.size(); ++i) {
    arena->marks[i] += static_cast<uint32_t>(old_text);
  }
}

absl::StatusOr<uint32_t> AppendIcuWords(std::string_view text, IcuWords& icu,
                                        WordArena* arena) {
  absl::StatusOr<uint32_t> replaced = icu.Normalize(text);
  if (!replaced.ok()) return replaced.status();
  const char16_t* units = icu.normalized().getBuffer();
  icu.ForEachWord([&](int32_t b, int32_t e) {
    arena->marks.push_back(static_cast<uint32_t>(arena->text.size()));
    AppendUtf8(units, b, e, &arena->text);
    arena->text.push_back(' ');
  });
  return replaced;
}

absl::StatusOr<uint32_t> AppendMixedWords(std::string_view text, IcuWords& icu,
                                          WordArena* arena) {
  const auto* p = reinterpret_cast<const unsigned char*>(text.data());
  const size_t n = text.size();
  uint32_t replaced = 0;
  size_t pos = 0;
  while (pos < n) {
    const size_t wide = FindNonAscii(p, pos, n);
    if (wide == n) {
      AppendAsciiWords(text.substr(pos), arena);
      break;
    }
    // The ASCII part before: up to the last cut whose right neighbour is
    // still before the non-ASCII byte.
    size_t start = pos;
    for (size_t i = wide; i-- > pos;) {
      if (i + 1 < wide && IsCut(p, i, n)) {
        AppendAsciiWords(text.substr(pos, i - pos), arena);
        start = i + 1;
        break;
      }
    }
    size_t end = wide + 1;
    while (end < n && !IsCut(p, end, n)) ++end;
    absl::StatusOr<uint32_t> part =
        AppendIcuWords(text.substr(start, end - start), icu, arena);
    if (!part.ok()) return part.status();
    replaced += *part;
    pos = end + 1;
  }
  return replaced;
}

}  // namespace kindred::text_internal
