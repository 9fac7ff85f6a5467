#include <limits>
#include <utility>

#include "absl/status/status.h"
#include "kindred/shingles.h"
#include "text/ascii_words.h"
#include "text/icu_words.h"
#include "text/utf8.h"
#include "unicode/uchar.h"
#include "unicode/utf16.h"

namespace kindred {
namespace {

// One code point of the whitespace-folded text (a folded run of White_Space
// is one U+0020) and the original bytes it covers.
struct FoldedPoint {
  std::string utf8;
  uint32_t begin;
  uint32_t end;
};

// Appends `c` covering [begin, end), folding White_Space runs into one space
// and dropping leading ones; trailing ones are dropped by the caller.
void AddPoint(UChar32 c, uint32_t begin, uint32_t end, bool* in_space,
              std::vector<FoldedPoint>* points) {
  if (u_isUWhiteSpace(c)) {
    if (points->empty()) return;
    if (*in_space) {
      points->back().end = end;
    } else {
      points->push_back({" ", begin, end});
      *in_space = true;
    }
    return;
  }
  *in_space = false;
  FoldedPoint point{"", begin, end};
  text_internal::AppendCodePoint(static_cast<char32_t>(c), &point.utf8);
  points->push_back(std::move(point));
}

absl::StatusOr<std::vector<FoldedPoint>> FoldedPoints(std::string_view utf8,
                                                      TextPath path) {
  std::vector<FoldedPoint> points;
  bool in_space = false;
  const bool ascii = path != TextPath::kIcu && IsAscii(utf8);
  if (path == TextPath::kAscii && !ascii) {
    return absl::InvalidArgumentError(
        "the ASCII tokenizer was given non-ASCII text");
  }
  if (ascii) {
    for (uint32_t i = 0; i < utf8.size(); ++i) {
      const auto c = static_cast<unsigned char>(utf8[i]);
      AddPoint(text_internal::AsciiFold(c), i, i + 1, &in_space, &points);
    }
  } else {
    absl::StatusOr<std::unique_ptr<text_internal::IcuWords>> icu =
        text_internal::IcuWords::Create();
    if (!icu.ok()) return icu.status();
    absl::StatusOr<uint32_t> replaced = (*icu)->NormalizeWithSpans(utf8);
    if (!replaced.ok()) return replaced.status();
    const icu::UnicodeString& text = (*icu)->normalized();
    const char16_t* units = text.getBuffer();
    for (int32_t i = 0; i < text.length();) {
      const int32_t start = i;
      UChar32 c;
      U16_NEXT(units, i, text.length(), c);
      AddPoint(c, (*icu)->span_begin()[start], (*icu)->span_end()[i - 1],
               &in_space, &points);
    }
  }
  if (in_space) points.pop_back();
  return points;
}

// Windows of k items (or one window of all items when there are 1..k-1),
// joined by `separator`.
template <typename Item>
std::vector<ShingleText> Windows(const std::vector<Item>& items, uint32_t k,
                                 std::string_view separator) {
  std::vector<ShingleText> out;
  if (items.empty()) return out;
  const size_t width = std::min<size_t>(k, items.size());
  for (size_t i = 0; i + width <= items.size(); ++i) {
    ShingleText shingle;
    for (size_t j = i; j < i + width; ++j) {
      if (j > i) shingle.text.append(separator);
      if constexpr (std::is_same_v<Item, Token>) {
        shingle.text.append(items[j].text);
      } else {
        shingle.text.append(items[j].utf8);
      }
    }
    shingle.begin = items[i].begin;
    shingle.end = items[i + width - 1].end;
    out.push_back(std::move(shingle));
  }
  return out;
}

}  // namespace

absl::StatusOr<std::vector<ShingleText>> ShingleTexts(
    std::string_view utf8, const SignatureSettings& settings, TextPath path) {
  if (absl::Status s = settings.Validate(); !s.ok()) return s;
  if (utf8.size() >= std::numeric_limits<uint32_t>::max()) {
    return absl::OutOfRangeError("document is over the 4 GiB limit");
  }
  if (settings.mode == ShingleMode::kWord) {
    absl::StatusOr<std::vector<Token>> tokens = TokenizeWithSpans(utf8, path);
    if (!tokens.ok()) return tokens.status();
    return Windows(*tokens, settings.k, " ");
  }
  absl::StatusOr<std::vector<FoldedPoint>> points = FoldedPoints(utf8, path);
  if (!points.ok()) return points.status();
  return Windows(*points, settings.k, "");
}

}  // namespace kindred
