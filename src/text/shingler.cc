#include <xxhash.h>

#include <algorithm>
#include <limits>
#include <utility>

#include "absl/status/status.h"
#include "absl/strings/str_format.h"
#include "kindred/shingles.h"
#include "text/ascii_words.h"
#include "text/icu_words.h"
#include "text/utf8.h"
#include "unicode/uchar.h"
#include "unicode/utf16.h"

namespace kindred {

using text_internal::IcuWords;

uint64_t HashShingle(std::string_view shingle_utf8, uint64_t seed) {
  return XXH3_64bits_withSeed(shingle_utf8.data(), shingle_utf8.size(), seed);
}

// Scratch state reused from document to document. In word mode `arena` holds
// the kept tokens, each followed by one space, and marks[i] is where token i
// begins (plus a final entry, arena.size()); a window of tokens is then one
// contiguous run of the arena. In char mode `arena` holds the folded text and
// marks[i] is where code point i begins (plus arena.size()); the ASCII path
// leaves `marks` empty since there code point i is byte i.
struct Shingler::Impl {
  std::unique_ptr<IcuWords> icu;
  std::string arena;
  std::vector<uint32_t> marks;
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

void AsciiWordArena(std::string_view text, std::string* arena,
                    std::vector<uint32_t>* marks) {
  const auto* p = reinterpret_cast<const unsigned char*>(text.data());
  text_internal::ForEachAsciiWord(p, text.size(), [&](size_t b, size_t e) {
    marks->push_back(static_cast<uint32_t>(arena->size()));
    const size_t at = arena->size();
    arena->resize(at + (e - b) + 1);
    char* out = arena->data() + at;
    for (size_t i = b; i < e; ++i) *out++ = text_internal::AsciiFold(p[i]);
    *out = ' ';
  });
  marks->push_back(static_cast<uint32_t>(arena->size()));
}

// ASCII White_Space (PropList.txt): TAB, LF, VT, FF, CR and SPACE.
inline bool IsAsciiWhiteSpace(unsigned char c) {
  return c == ' ' || (c >= 0x09 && c <= 0x0D);
}

void AsciiCharArena(std::string_view text, std::string* arena) {
  arena->resize(text.size());
  char* out = arena->data();
  bool pending_space = false;
  for (unsigned char c : text) {
    if (IsAsciiWhiteSpace(c)) {
      pending_space = out != arena->data();
      continue;
    }
    if (pending_space) *out++ = ' ', pending_space = false;
    *out++ = text_internal::AsciiFold(c);
  }
  arena->resize(out - arena->data());
}

void IcuWordArena(IcuWords& icu, std::string* arena,
                  std::vector<uint32_t>* marks) {
  const char16_t* units = icu.normalized().getBuffer();
  icu.ForEachWord([&](int32_t b, int32_t e) {
    marks->push_back(static_cast<uint32_t>(arena->size()));
    text_internal::AppendUtf8(units, b, e, arena);
    arena->push_back(' ');
  });
  marks->push_back(static_cast<uint32_t>(arena->size()));
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

// Hashes the word windows described by `arena` and `marks` (see Impl).
void HashWordWindows(const std::string& arena,
                     const std::vector<uint32_t>& marks, uint32_t k,
                     uint64_t seed, ShingleSet* out) {
  const size_t tokens = marks.size() - 1;
  if (tokens == 0) return;
  if (tokens < k) {
    out->push_back(XXH3_64bits_withSeed(arena.data(), arena.size() - 1, seed));
    return;
  }
  out->reserve(tokens - k + 1);
  for (size_t i = 0; i + k <= tokens; ++i) {
    const uint32_t begin = marks[i];
    const uint32_t end = marks[i + k] - 1;  // without the trailing space
    out->push_back(XXH3_64bits_withSeed(arena.data() + begin, end - begin, seed));
  }
}

// Hashes the code point windows of `arena`; `marks` empty means ASCII.
void HashCharWindows(const std::string& arena,
                     const std::vector<uint32_t>& marks, uint32_t k,
                     uint64_t seed, ShingleSet* out) {
  const size_t points = marks.empty() ? arena.size() : marks.size() - 1;
  if (points == 0) return;
  if (points < k) {
    out->push_back(XXH3_64bits_withSeed(arena.data(), arena.size(), seed));
    return;
  }
  out->reserve(points - k + 1);
  for (size_t i = 0; i + k <= points; ++i) {
    const size_t begin = marks.empty() ? i : marks[i];
    const size_t end = marks.empty() ? i + k : marks[i + k];
    out->push_back(XXH3_64bits_withSeed(arena.data() + begin, end - begin, seed));
  }
}

}  // namespace

absl::Status Shingler::Shingle(std::string_view utf8, ShingleSet* out,
                               TextStats* stats) {
  out->clear();
  if (utf8.size() >= std::numeric_limits<uint32_t>::max()) {
    return absl::OutOfRangeError(absl::StrFormat(
        "document of %u bytes is over the 4 GiB limit", utf8.size()));
  }
  TextStats local;
  local.ascii_path = ascii_fast_path_ && IsAscii(utf8);
  std::string& arena = impl_->arena;
  std::vector<uint32_t>& marks = impl_->marks;
  arena.clear();
  marks.clear();
  const bool words = settings_.mode == ShingleMode::kWord;
  if (local.ascii_path) {
    if (words) AsciiWordArena(utf8, &arena, &marks);
    else AsciiCharArena(utf8, &arena);
  } else {
    absl::StatusOr<uint32_t> replaced = impl_->icu->Normalize(utf8);
    if (!replaced.ok()) return replaced.status();
    local.invalid_utf8 = *replaced;
    if (words) IcuWordArena(*impl_->icu, &arena, &marks);
    else IcuCharArena(impl_->icu->normalized(), &arena, &marks);
  }
  if (words) {
    local.tokens = static_cast<uint32_t>(marks.size() - 1);
    HashWordWindows(arena, marks, settings_.k, settings_.seed, out);
  } else {
    local.tokens = static_cast<uint32_t>(marks.empty() ? arena.size()
                                                       : marks.size() - 1);
    HashCharWindows(arena, marks, settings_.k, settings_.seed, out);
  }
  std::sort(out->begin(), out->end());
  out->erase(std::unique(out->begin(), out->end()), out->end());
  if (stats != nullptr) *stats = local;
  return absl::OkStatus();
}

}  // namespace kindred
