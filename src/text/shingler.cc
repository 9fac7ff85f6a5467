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
  std::string arena;               // char mode, ICU path
  std::vector<uint32_t> marks;     // char mode, ICU path
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

void IcuCharArena(const icu::UnicodeString& text, std::string* arena,
                  std::vector<uint32_t>* marks) {
  const char16_t* units = text.getBuffer();
  const int32_t length = text.length();
  bool pending_space = false;
  for (int32_t i = 0; i < length;) {
    UChar32 c;
    U16_NEXT(units, i, length, c);
    if (u_isUWhiteSpace(c)) {
      pending_space = !arena->empty();
      continue;
    }
    if (pending_space) {
      marks->push_back(static_cast<uint32_t>(arena->size()));
      arena->push_back(' ');
      pending_space = false;
    }
    marks->push_back(static_cast<uint32_t>(arena->size()));
    text_internal::AppendCodePoint(static_cast<char32_t>(c), arena);
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
    absl::StatusOr<uint32_t> replaced = impl_->icu->Normalize(utf8);
    if (!replaced.ok()) return replaced.status();
    local.invalid_utf8 = *replaced;
    local.tokens = static_cast<uint32_t>(ShingleIcuChars(out));
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

size_t Shingler::ShingleIcuChars(ShingleSet* out) {
  impl_->arena.clear();
  impl_->marks.clear();
  IcuCharArena(impl_->icu->normalized(), &impl_->arena, &impl_->marks);
  const size_t points = impl_->marks.size() - 1;
  HashCharWindows(impl_->arena.data(), impl_->marks.data(), points, settings_.k,
                  settings_.seed, out);
  return points;
}

}  // namespace kindred
