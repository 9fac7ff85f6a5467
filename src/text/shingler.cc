// XXH3 inlined into this file (same function, same values as the library).
#define XXH_INLINE_ALL
#include <xxhash.h>

#include <algorithm>
#include <limits>
#include <utility>

#include "absl/status/status.h"
#include "absl/strings/str_format.h"
#include "kindred/shingles.h"
#include "text/ascii_words.h"
#include "text/hash_sort.h"
#include "text/icu_words.h"
#include "text/utf8.h"
#include "text/word_arena.h"
#include "unicode/uchar.h"
#include "unicode/utf16.h"

namespace kindred {

using text_internal::IcuWords;

uint64_t HashShingle(std::string_view shingle_utf8, uint64_t seed) {
  return XXH3_64bits_withSeed(shingle_utf8.data(), shingle_utf8.size(), seed);
}

void SortShingles(std::vector<uint64_t>* hashes) {
  std::vector<uint64_t> scratch;
  std::vector<uint32_t> counts;
  text_internal::SortUniqueHashes(hashes, &scratch, &counts);
}

namespace {

// A grow-only array whose contents are not initialized.
template <typename T>
class ScratchArray {
 public:
  T* Reserve(size_t n) {
    if (n > capacity_) {
      data_.reset();  // before allocating: never hold both
      data_.reset(new T[n]);
      capacity_ = n;
    }
    return data_.get();
  }

  // Frees the array if it is over `bytes`.
  void Trim(size_t bytes) {
    if (capacity_ * sizeof(T) > bytes) data_.reset(), capacity_ = 0;
  }

 private:
  std::unique_ptr<T[]> data_;
  size_t capacity_ = 0;
};

}  // namespace

// Scratch state reused from document to document. In word mode the arena
// holds the kept tokens, each followed by one space, and marks[i] is where
// token i begins (plus a final entry, the arena's length); a window of tokens
// is then one contiguous run of the arena. In char mode the arena holds the
// folded text and marks[i] is where code point i begins (plus the arena's
// length); the ASCII path has no marks since there code point i is byte i.
struct Shingler::Impl {
  std::unique_ptr<IcuWords> icu;
  text_internal::WordArena words;  // word mode, documents not all ASCII
  std::string normalized;          // char mode, documents not all ASCII
  std::string arena;               // char mode, documents not all ASCII
  std::vector<uint32_t> marks;     // char mode, documents not all ASCII
  ScratchArray<char> ascii_arena;
  ScratchArray<uint32_t> ascii_marks;
  std::vector<uint64_t> sort_scratch;
  std::vector<uint32_t> sort_counts;

  // After a huge document, gives back the scratch memory it needed, keeping
  // what ordinary documents use.
  void TrimScratch() {
    constexpr size_t kKeepBytes = size_t{16} << 20;
    ascii_arena.Trim(kKeepBytes);
    ascii_marks.Trim(kKeepBytes);
    TrimVector(&words.text, kKeepBytes);
    TrimVector(&words.marks, kKeepBytes);
    TrimVector(&normalized, kKeepBytes);
    TrimVector(&arena, kKeepBytes);
    TrimVector(&marks, kKeepBytes);
    TrimVector(&sort_scratch, kKeepBytes);
    TrimVector(&sort_counts, kKeepBytes);
    icu->Trim(kKeepBytes);
  }

  template <typename Container>
  static void TrimVector(Container* c, size_t bytes) {
    if (c->capacity() * sizeof((*c)[0]) > bytes) Container().swap(*c);
  }
};

Shingler::Shingler(const SignatureSettings& settings, bool ascii_fast_path,
                   std::unique_ptr<Impl> impl)
    : settings_(settings),
      ascii_fast_path_(ascii_fast_path),
      impl_(std::move(impl)) {}

Shingler::~Shingler() = default;

absl::StatusOr<std::unique_ptr<Shingler>> Shingler::Create(
    const SignatureSettings& settings, bool ascii_fast_path) {
  if (absl::Status s = settings.Validate(); !s.ok()) return s;
  absl::StatusOr<std::unique_ptr<IcuWords>> icu = IcuWords::Create();
  if (!icu.ok()) return icu.status();
  auto impl = std::make_unique<Impl>();
  impl->icu = *std::move(icu);
  return std::unique_ptr<Shingler>(
      new Shingler(settings, ascii_fast_path, std::move(impl)));
}

absl::StatusOr<std::vector<std::unique_ptr<Shingler>>> Shingler::CreateMany(
    const SignatureSettings& settings, int count) {
  std::vector<std::unique_ptr<Shingler>> shinglers;
  for (int i = 0; i < count; ++i) {
    auto shingler = Create(settings);
    if (!shingler.ok()) return shingler.status();
    shinglers.push_back(*std::move(shingler));
  }
  return shinglers;
}

namespace {

// ASCII White_Space (PropList.txt): TAB, LF, VT, FF, CR and SPACE.
inline bool IsAsciiWhiteSpace(unsigned char c) {
  return c == ' ' || (c >= 0x09 && c <= 0x0D);
}

// Writes the casefolded, whitespace-folded text to `out` (room for
// text.size() bytes); returns its length.
size_t AsciiCharArena(std::string_view text, char* out) {
  char* const start = out;
  bool pending_space = false;
  for (unsigned char c : text) {
    if (IsAsciiWhiteSpace(c)) {
      pending_space = out != start;
      continue;
    }
    if (pending_space) *out++ = ' ', pending_space = false;
    *out++ = text_internal::AsciiFold(c);
  }
  return out - start;
}

// The code point starting at utf8[i] of well-formed UTF-8, and its length.
inline char32_t CodePointAt(const std::string& utf8, size_t i, int* length) {
  const auto* p = reinterpret_cast<const unsigned char*>(utf8.data()) + i;
  if (p[0] < 0xE0) {
    *length = 2;
    return ((p[0] & 0x1F) << 6) | (p[1] & 0x3F);
  }
  if (p[0] < 0xF0) {
    *length = 3;
    return ((p[0] & 0x0F) << 12) | ((p[1] & 0x3F) << 6) | (p[2] & 0x3F);
  }
  *length = 4;
  return ((p[0] & 0x07) << 18) | ((p[1] & 0x3F) << 12) | ((p[2] & 0x3F) << 6) |
         (p[3] & 0x3F);
}

// Folds the normalized, well-formed UTF-8 text into `arena` (White_Space runs
// become one space, trimmed) and records where each code point begins in
// `marks`, plus a final entry, the arena's length.
void FoldUtf8Chars(const std::string& text, std::string* arena,
                   std::vector<uint32_t>* marks) {
  bool pending_space = false;
  for (size_t i = 0; i < text.size();) {
    int length = 1;
    const auto lead = static_cast<unsigned char>(text[i]);
    const bool space = lead < 0x80
                           ? IsAsciiWhiteSpace(lead)
                           : u_isUWhiteSpace(CodePointAt(text, i, &length));
    if (space) {
      pending_space = !arena->empty();
    } else {
      if (pending_space) {
        marks->push_back(static_cast<uint32_t>(arena->size()));
        arena->push_back(' ');
        pending_space = false;
      }
      marks->push_back(static_cast<uint32_t>(arena->size()));
      arena->append(text, i, length);
    }
    i += length;
  }
  marks->push_back(static_cast<uint32_t>(arena->size()));
}

// Hashes the word windows of an arena of `tokens` tokens (see Impl).
void HashWordWindows(const char* arena, const uint32_t* marks, size_t tokens,
                     uint32_t k, uint64_t seed, ShingleSet* out) {
  if (tokens == 0) return;
  if (tokens < k) {
    out->push_back(XXH3_64bits_withSeed(arena, marks[tokens] - 1, seed));
    return;
  }
  out->reserve(tokens - k + 1);
  for (size_t i = 0; i + k <= tokens; ++i) {
    const uint32_t begin = marks[i];
    const uint32_t end = marks[i + k] - 1;  // without the trailing space
    out->push_back(XXH3_64bits_withSeed(arena + begin, end - begin, seed));
  }
}

// Hashes the code point windows of an arena of `points` code points; null
// `marks` means code point i is byte i.
void HashCharWindows(const char* arena, const uint32_t* marks, size_t points,
                     uint32_t k, uint64_t seed, ShingleSet* out) {
  if (points == 0) return;
  if (points < k) {
    const size_t length = marks == nullptr ? points : marks[points];
    out->push_back(XXH3_64bits_withSeed(arena, length, seed));
    return;
  }
  out->reserve(points - k + 1);
  for (size_t i = 0; i + k <= points; ++i) {
    const size_t begin = marks == nullptr ? i : marks[i];
    const size_t end = marks == nullptr ? i + k : marks[i + k];
    out->push_back(XXH3_64bits_withSeed(arena + begin, end - begin, seed));
  }
}

}  // namespace

absl::Status Shingler::Shingle(std::string_view utf8, ShingleSet* out,
                               TextStats* stats) {
  absl::Status status = ShingleBag(utf8, out, stats);
  if (status.ok()) {
    text_internal::SortUniqueHashes(out, &impl_->sort_scratch,
                                    &impl_->sort_counts);
  }
  impl_->TrimScratch();
  return status;
}

absl::Status Shingler::ShingleBag(std::string_view utf8,
                                  std::vector<uint64_t>* out,
                                  TextStats* stats) {
  out->clear();
  if (utf8.size() >= std::numeric_limits<uint32_t>::max()) {
    return absl::OutOfRangeError(absl::StrFormat(
        "document of %u bytes is over the 4 GiB limit", utf8.size()));
  }
  TextStats local;
  local.ascii_path = ascii_fast_path_ && IsAscii(utf8);
  const bool words = settings_.mode == ShingleMode::kWord;
  if (local.ascii_path) {
    local.tokens = static_cast<uint32_t>(words ? ShingleAsciiWords(utf8, out)
                                               : ShingleAsciiChars(utf8, out));
  } else if (words) {
    absl::StatusOr<uint32_t> replaced =
        ShingleOtherWords(utf8, out, &local.tokens);
    if (!replaced.ok()) return replaced.status();
    local.invalid_utf8 = *replaced;
  } else {
    absl::StatusOr<uint32_t> replaced =
        ShingleOtherChars(utf8, out, &local.tokens);
    if (!replaced.ok()) return replaced.status();
    local.invalid_utf8 = *replaced;
  }
  impl_->TrimScratch();
  if (stats != nullptr) *stats = local;
  return absl::OkStatus();
}

size_t Shingler::ShingleAsciiWords(std::string_view text, ShingleSet* out) {
  const auto* p = reinterpret_cast<const unsigned char*>(text.data());
  char* arena = impl_->ascii_arena.Reserve(text.size() + 17);
  uint32_t* marks = impl_->ascii_marks.Reserve(text.size() / 2 + 2);
  const size_t tokens =
      text_internal::FoldAsciiWords(p, text.size(), arena, marks);
  HashWordWindows(arena, marks, tokens, settings_.k, settings_.seed, out);
  return tokens;
}

size_t Shingler::ShingleAsciiChars(std::string_view text, ShingleSet* out) {
  char* arena = impl_->ascii_arena.Reserve(text.size());
  const size_t points = AsciiCharArena(text, arena);
  HashCharWindows(arena, nullptr, points, settings_.k, settings_.seed, out);
  return points;
}

absl::StatusOr<uint32_t> Shingler::ShingleOtherWords(std::string_view text,
                                                     ShingleSet* out,
                                                     uint32_t* tokens) {
  text_internal::WordArena& arena = impl_->words;
  arena.Clear();
  absl::StatusOr<uint32_t> replaced =
      ascii_fast_path_
          ? text_internal::AppendMixedWords(text, *impl_->icu, &arena)
          : text_internal::AppendIcuWords(text, *impl_->icu, &arena);
  if (!replaced.ok()) return replaced.status();
  *tokens = static_cast<uint32_t>(arena.marks.size());
  arena.marks.push_back(static_cast<uint32_t>(arena.text.size()));
  HashWordWindows(arena.text.data(), arena.marks.data(), *tokens, settings_.k,
                  settings_.seed, out);
  return replaced;
}

absl::StatusOr<uint32_t> Shingler::ShingleOtherChars(std::string_view text,
                                                     ShingleSet* out,
                                                     uint32_t* points) {
  std::string& normalized = impl_->normalized;
  normalized.clear();
  absl::StatusOr<uint32_t> replaced;
  if (ascii_fast_path_) {
    replaced =
        text_internal::AppendMixedNormalized(text, *impl_->icu, &normalized);
  } else {
    replaced = impl_->icu->Normalize(text);
    const icu::UnicodeString& whole = impl_->icu->normalized();
    if (replaced.ok()) {
      text_internal::AppendUtf8(whole.getBuffer(), 0, whole.length(),
                                &normalized);
    }
  }
  if (!replaced.ok()) return replaced.status();
  impl_->arena.clear();
  impl_->marks.clear();
  FoldUtf8Chars(normalized, &impl_->arena, &impl_->marks);
  *points = static_cast<uint32_t>(impl_->marks.size() - 1);
  HashCharWindows(impl_->arena.data(), impl_->marks.data(), *points,
                  settings_.k, settings_.seed, out);
  return replaced;
}

}  // namespace kindred
