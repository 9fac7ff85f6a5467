#include "kindred/text.h"

#include <limits>
#include <memory>
#include <utility>

#include "absl/status/status.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "text/ascii_words.h"
#include "text/icu_words.h"
#include "text/utf8.h"
#include "unicode/normalizer2.h"
#include "unicode/uchar.h"
#include "unicode/uversion.h"

namespace kindred {
namespace {

using text_internal::IcuWords;

absl::Status CheckLength(std::string_view utf8) {
  if (utf8.size() >= std::numeric_limits<uint32_t>::max()) {
    return absl::OutOfRangeError(absl::StrFormat(
        "document of %u bytes is over the 4 GiB limit", utf8.size()));
  }
  return absl::OkStatus();
}

std::vector<Token> AsciiTokens(std::string_view text) {
  const size_t n = text.size();
  std::string arena(n + 17, '\0');
  std::vector<uint32_t> word_begin(n / 2 + 2);
  std::vector<uint32_t> span_begin(n / 2 + 1);
  std::vector<uint32_t> span_end(n / 2 + 1);
  const size_t words = text_internal::FoldAsciiWordsWithSpans(
      reinterpret_cast<const unsigned char*>(text.data()), n, arena.data(),
      word_begin.data(), span_begin.data(), span_end.data());
  std::vector<Token> tokens(words);
  for (size_t i = 0; i < words; ++i) {
    const uint32_t begin = word_begin[i];
    tokens[i].text.assign(arena, begin, word_begin[i + 1] - 1 - begin);
    tokens[i].begin = span_begin[i];
    tokens[i].end = span_end[i];
  }
  return tokens;
}

absl::StatusOr<std::vector<Token>> IcuTokens(std::string_view utf8) {
  absl::StatusOr<std::unique_ptr<IcuWords>> icu = IcuWords::Create();
  if (!icu.ok()) return icu.status();
  IcuWords& words = **icu;
  absl::StatusOr<uint32_t> replaced = words.NormalizeWithSpans(utf8);
  if (!replaced.ok()) return replaced.status();
  const char16_t* units = words.normalized().getBuffer();
  std::vector<Token> tokens;
  words.ForEachWord([&](int32_t b, int32_t e) {
    Token token;
    text_internal::AppendUtf8(units, b, e, &token.text);
    token.begin = words.span_begin()[b];
    token.end = words.span_end()[e - 1];
    tokens.push_back(std::move(token));
  });
  return tokens;
}

}  // namespace

absl::StatusOr<std::string> NormalizeText(std::string_view utf8,
                                          TextStats* stats) {
  UErrorCode status = U_ZERO_ERROR;
  const icu::Normalizer2* normalizer =
      icu::Normalizer2::getNFKCCasefoldInstance(status);
  if (utf8.size() >= static_cast<size_t>(INT32_MAX)) {
    return absl::OutOfRangeError("text is over the 2 GiB limit");
  }
  icu::UnicodeString decoded;
  icu::UnicodeString normalized;
  const uint32_t replaced = text_internal::DecodeUtf8(utf8, &decoded);
  if (U_SUCCESS(status)) normalizer->normalize(decoded, normalized, status);
  if (U_FAILURE(status)) {
    return absl::InternalError(
        absl::StrCat("ICU normalization failed: ", u_errorName(status)));
  }
  if (stats != nullptr) stats->invalid_utf8 = replaced;
  std::string out;
  text_internal::AppendUtf8(normalized.getBuffer(), 0, normalized.length(),
                            &out);
  return out;
}

absl::StatusOr<std::vector<Token>> TokenizeWithSpans(std::string_view utf8,
                                                     TextPath path) {
  if (absl::Status s = CheckLength(utf8); !s.ok()) return s;
  const bool ascii = path != TextPath::kIcu && IsAscii(utf8);
  if (path == TextPath::kAscii && !ascii) {
    return absl::InvalidArgumentError(
        "the ASCII tokenizer was given non-ASCII text");
  }
  if (ascii) return AsciiTokens(utf8);
  return IcuTokens(utf8);
}

std::string UnicodeVersionString() {
  UVersionInfo unicode;
  UVersionInfo icu;
  u_getUnicodeVersion(unicode);
  u_getVersion(icu);
  char unicode_text[U_MAX_VERSION_STRING_LENGTH];
  char icu_text[U_MAX_VERSION_STRING_LENGTH];
  u_versionToString(unicode, unicode_text);
  u_versionToString(icu, icu_text);
  return absl::StrFormat("Unicode %s, ICU %s", unicode_text, icu_text);
}

}  // namespace kindred
