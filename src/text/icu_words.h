// The ICU path of the text pipeline: replacement decoding, NFKC_Casefold and
// UAX #29 word segmentation over reusable UTF-16 buffers. Internal to the
// library.
//
// Thread-compatible: one IcuWords per thread. The normalized text stays valid
// until the next Normalize call.
#ifndef KINDRED_TEXT_ICU_WORDS_H_
#define KINDRED_TEXT_ICU_WORDS_H_

#include <cstdint>
#include <memory>
#include <string_view>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "unicode/brkiter.h"
#include "unicode/normalizer2.h"
#include "unicode/unistr.h"

namespace kindred::text_internal {

class IcuWords {
 public:
  // Internal error when ICU cannot load its normalizer or break rules.
  static absl::StatusOr<std::unique_ptr<IcuWords>> Create();

  // Decodes `utf8` (ill-formed sequences become U+FFFD) and normalizes it
  // with NFKC_Casefold into normalized(). Returns the number of
  // replacements, OutOfRange for 2 GiB or more (the most an ICU string
  // holds), or Internal if ICU fails.
  absl::StatusOr<uint32_t> Normalize(std::string_view utf8);

  // Same, and also records for each UTF-16 unit u of normalized() the byte
  // span [span_begin()[u], span_end()[u]) of the original input it comes
  // from. The text is normalized piece by piece between characters that have
  // a normalization boundary before them (Normalizer2::hasBoundaryBefore), so
  // each piece maps to whole original characters; the concatenation equals
  // the normalization of the whole text by that property's definition.
  absl::StatusOr<uint32_t> NormalizeWithSpans(std::string_view utf8);

  // Frees buffers over `bytes` (after a huge document). normalized() and the
  // spans are then invalid until the next Normalize call.
  void Trim(size_t bytes);

  const icu::UnicodeString& normalized() const { return normalized_; }
  const std::vector<uint32_t>& span_begin() const { return span_begin_; }
  const std::vector<uint32_t>& span_end() const { return span_end_; }

  // Calls on_word(begin, end), in UTF-16 units of normalized(), for each
  // segment whose rule status is UBRK_WORD_NONE_LIMIT (100) or more.
  template <typename OnWord>
  void ForEachWord(OnWord&& on_word) {
    words_->setText(normalized_);
    int32_t begin = words_->first();
    for (int32_t end = words_->next(); end != icu::BreakIterator::DONE;
         begin = end, end = words_->next()) {
      if (words_->getRuleStatus() >= UBRK_WORD_NONE_LIMIT) {
        on_word(begin, end);
      }
    }
  }

 private:
  IcuWords(const icu::Normalizer2* normalizer,
           std::unique_ptr<icu::BreakIterator> words);

  void AppendPiece(int32_t begin, int32_t end, uint32_t orig_begin,
                   uint32_t orig_end, UErrorCode* status);

  const icu::Normalizer2* normalizer_;  // owned by ICU
  std::unique_ptr<icu::BreakIterator> words_;
  const icu::UnicodeString empty_;
  icu::UnicodeString decoded_;
  icu::UnicodeString normalized_;
  icu::UnicodeString piece_;
  std::vector<uint32_t> unit_begin_;
  std::vector<uint32_t> span_begin_;
  std::vector<uint32_t> span_end_;
};

}  // namespace kindred::text_internal

#endif  // KINDRED_TEXT_ICU_WORDS_H_
