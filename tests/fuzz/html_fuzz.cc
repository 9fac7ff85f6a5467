// Fuzz target: HTML to text (charset choice, conversion, Gumbo's tree, the
// walk) over arbitrary bytes.
//
// Input: one control byte choosing the declared charset (0: none, 1: UTF-8,
// 2: windows-1252, 3: Shift_JIS, 4: UTF-16LE, 5: ISO-2022-JP, 6: GBK, 7: an
// unknown label; bit 3: plain text instead of HTML), then the payload.
// Besides crashes, it checks that the text is valid UTF-8 and that a second
// extraction gives the same bytes; and, differentially, that when the fast
// HTML path accepts the page, its word tokens are those of the reference
// parser (Gumbo); a difference is a finding. Pages the fast path declines
// are not failures.
#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include "fuzz_util.h"
#include "io/charset.h"
#include "io/html_fast_text.h"
#include "io/html_text.h"
#include "io/warc_documents.h"
#include "kindred/text.h"
#include "text/utf8.h"

namespace {

std::vector<std::string> Words(const std::string& text) {
  std::vector<std::string> words;
  auto tokens = kindred::TokenizeWithSpans(text);
  kindred::fuzz::Require(tokens.ok(), "the text tokenizes");
  for (const kindred::Token& token : *tokens) words.push_back(token.text);
  return words;
}

// The fast path against the reference on the page as HtmlToText sees it.
void CompareWithReference(absl::string_view payload, const char* charset) {
  size_t bom = 0;
  const std::string encoding = kindred::io::ChooseEncoding(charset, payload, true, &bom);
  std::string html, fast, reference;
  uint32_t replaced = 0;
  if (!kindred::io::ConvertToUtf8(encoding, payload.substr(bom), &html, &replaced).ok()) return;
  if (kindred::io::OpenElementBound(html) > kindred::io::kMaxOpenElements) return;
  if (!kindred::io::FastHtmlToText(html, &fast)) return;  // left to the reference: fine
  kindred::fuzz::Require(kindred::io::ReferenceHtmlToText(html, &reference).ok(),
                         "the reference parses the page");
  kindred::fuzz::Require(Words(fast) == Words(reference),
                         "the fast path gives the reference's words");
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  using kindred::fuzz::Require;
  if (size == 0) return 0;
  static const char* const kCharsets[] = {"",         "utf-8",       "windows-1252", "sjis",
                                          "utf-16le", "iso-2022-jp", "gbk",          "no-such"};
  const char* charset = kCharsets[data[0] & 7];
  const bool html = (data[0] & 8) == 0;
  const absl::string_view payload(reinterpret_cast<const char*>(data + 1), size - 1);
  std::string scratch, text, again;
  uint32_t replaced = 0;
  absl::Status made = kindred::io::PayloadText(payload, charset, html, &scratch, &text, &replaced);
  if (made.code() == absl::StatusCode::kFailedPrecondition) {  // the nesting guard
    Require(text.empty(), "a page refused by the nesting guard has no text");
    return 0;
  }
  Require(made.ok(), "every payload gives a text");
  icu::UnicodeString decoded;
  Require(kindred::text_internal::DecodeUtf8(text, &decoded) == 0, "the text is UTF-8");
  made = kindred::io::PayloadText(payload, charset, html, &scratch, &again, &replaced);
  Require(made.ok() && again == text, "the same text twice");
  if (html) CompareWithReference(payload, charset);
  return 0;
}
