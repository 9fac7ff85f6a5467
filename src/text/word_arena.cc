#include "text/word_arena.h"

#include "text/ascii_words.h"
#include "text/mixed_text.h"
#include "text/utf8.h"

namespace kindred::text_internal {
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
  uint32_t replaced = 0;
  absl::Status status = SplitAtCuts(
      text,
      [&](std::string_view piece) {
        AppendAsciiWords(piece, arena);
        return absl::OkStatus();
      },
      [&](std::string_view piece) {
        absl::StatusOr<uint32_t> part = AppendIcuWords(piece, icu, arena);
        if (!part.ok()) return part.status();
        replaced += *part;
        return absl::OkStatus();
      });
  if (!status.ok()) return status;
  return replaced;
}

absl::StatusOr<uint32_t> AppendMixedNormalized(std::string_view text,
                                               IcuWords& icu,
                                               std::string* out) {
  uint32_t replaced = 0;
  absl::Status status = SplitAtCuts(
      text,
      [&](std::string_view piece) {
        for (unsigned char c : piece) out->push_back(AsciiFold(c));
        return absl::OkStatus();
      },
      [&](std::string_view piece) {
        absl::StatusOr<uint32_t> part = icu.Normalize(piece);
        if (!part.ok()) return part.status();
        replaced += *part;
        const icu::UnicodeString& normalized = icu.normalized();
        AppendUtf8(normalized.getBuffer(), 0, normalized.length(), out);
        return absl::OkStatus();
      });
  if (!status.ok()) return status;
  return replaced;
}

}  // namespace kindred::text_internal
