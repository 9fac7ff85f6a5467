#include "text/icu_words.h"

#include <cstdint>
#include <utility>

#include "absl/strings/str_cat.h"
#include "text/utf8.h"
#include "unicode/locid.h"
#include "unicode/utf16.h"

namespace kindred::text_internal {

IcuWords::IcuWords(const icu::Normalizer2* normalizer,
                   std::unique_ptr<icu::BreakIterator> words)
    : normalizer_(normalizer), words_(std::move(words)) {}

absl::StatusOr<std::unique_ptr<IcuWords>> IcuWords::Create() {
  UErrorCode status = U_ZERO_ERROR;
  const icu::Normalizer2* normalizer =
      icu::Normalizer2::getNFKCCasefoldInstance(status);
  if (U_FAILURE(status)) {
    return absl::InternalError(
        absl::StrCat("ICU NFKC_Casefold normalizer: ", u_errorName(status)));
  }
  std::unique_ptr<icu::BreakIterator> words(
      icu::BreakIterator::createWordInstance(icu::Locale::getRoot(), status));
  if (U_FAILURE(status) || words == nullptr) {
    return absl::InternalError(
        absl::StrCat("ICU word break iterator: ", u_errorName(status)));
  }
  return std::unique_ptr<IcuWords>(new IcuWords(normalizer, std::move(words)));
}

namespace {

// ICU strings hold at most 2^31 - 1 UTF-16 units.
absl::Status CheckIcuLength(std::string_view utf8) {
  if (utf8.size() >= static_cast<size_t>(INT32_MAX)) {
    return absl::OutOfRangeError(absl::StrCat(
        "non-ASCII text of ", utf8.size(), " bytes is over the 2 GiB limit"));
  }
  return absl::OkStatus();
}

}  // namespace

absl::StatusOr<uint32_t> IcuWords::Normalize(std::string_view utf8) {
  if (absl::Status s = CheckIcuLength(utf8); !s.ok()) return s;
  const uint32_t replaced = DecodeUtf8(utf8, &decoded_);
  UErrorCode status = U_ZERO_ERROR;
  normalizer_->normalize(decoded_, normalized_, status);
  if (U_FAILURE(status)) {
    return absl::InternalError(
        absl::StrCat("ICU normalization failed: ", u_errorName(status)));
  }
  return replaced;
}

void IcuWords::Trim(size_t bytes) {
  const size_t unit = sizeof(char16_t);
  if (decoded_.getCapacity() * unit > bytes)
    icu::UnicodeString().swap(decoded_);
  if (normalized_.getCapacity() * unit > bytes) {
    words_->setText(empty_);  // drop the view of normalized_
    icu::UnicodeString().swap(normalized_);
  }
  if (piece_.getCapacity() * unit > bytes) icu::UnicodeString().swap(piece_);
  for (auto* v : {&unit_begin_, &span_begin_, &span_end_}) {
    if (v->capacity() * sizeof(uint32_t) > bytes)
      std::vector<uint32_t>().swap(*v);
  }
}

void IcuWords::AppendPiece(int32_t begin, int32_t end, uint32_t orig_begin,
                           uint32_t orig_end, UErrorCode* status) {
  const UChar32 first = decoded_.char32At(begin);
  if (end - begin == U16_LENGTH(first) && normalizer_->isInert(first)) {
    normalized_.append(decoded_, begin, end - begin);
  } else {
    normalizer_->normalize(decoded_.tempSubStringBetween(begin, end), piece_,
                           *status);
    normalized_.append(piece_);
  }
  span_begin_.resize(normalized_.length(), orig_begin);
  span_end_.resize(normalized_.length(), orig_end);
}

absl::StatusOr<uint32_t> IcuWords::NormalizeWithSpans(std::string_view utf8) {
  if (absl::Status s = CheckIcuLength(utf8); !s.ok()) return s;
  const uint32_t replaced = DecodeUtf8(utf8, &decoded_, &unit_begin_);
  normalized_.remove();
  span_begin_.clear();
  span_end_.clear();
  UErrorCode status = U_ZERO_ERROR;
  const int32_t length = decoded_.length();
  int32_t begin = 0;
  while (begin < length && U_SUCCESS(status)) {
    int32_t end = begin + U16_LENGTH(decoded_.char32At(begin));
    while (end < length &&
           !normalizer_->hasBoundaryBefore(decoded_.char32At(end))) {
      end += U16_LENGTH(decoded_.char32At(end));
    }
    AppendPiece(begin, end, unit_begin_[begin], unit_begin_[end], &status);
    begin = end;
  }
  if (U_FAILURE(status)) {
    return absl::InternalError(
        absl::StrCat("ICU normalization failed: ", u_errorName(status)));
  }
  return replaced;
}

}  // namespace kindred::text_internal
