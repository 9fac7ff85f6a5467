// FastHtmlToText: the tokenizer's markup states, feeding HtmlTree.
#include "io/html_fast_text.h"

#include <cstring>

#include "absl/strings/ascii.h"
#include "absl/strings/match.h"
#include "io/html_scan.h"
#include "io/html_tags.h"
#include "io/html_tree.h"

namespace kindred::io {
namespace {

using html_scan::IsAlpha;
using html_scan::IsSpace;
using html_scan::kNotFound;

class Tokenizer {
 public:
  Tokenizer(absl::string_view html, HtmlTree* tree) : html_(html), tree_(tree) {}

  // False when the tree declined the document.
  bool Run(const char** reason) {
    const size_t n = html_.size();
    size_t pos = 0;
    while (pos < n && !tree_->declined() && declined_ == nullptr) {
      const void* lt = std::memchr(html_.data() + pos, '<', n - pos);
      const size_t at = lt == nullptr ? n : static_cast<const char*>(lt) - html_.data();
      if (at > pos) tree_->Text(html_.substr(pos, at - pos));
      if (at == n) break;
      pos = Markup(at);
    }
    if (declined_ == nullptr && !tree_->declined()) tree_->Eof();
    if (reason != nullptr) *reason = declined_ != nullptr ? declined_ : tree_->decline_reason();
    return declined_ == nullptr && !tree_->declined();
  }

 private:
  // `at` is a '<' in the data state. Returns where the data state resumes.
  size_t Markup(size_t at) {
    const size_t n = html_.size();
    if (at + 1 >= n) {
      tree_->Text(html_.substr(at, 1));
      return n;
    }
    const char c = html_[at + 1];
    if (c == '!') return Declaration(at);
    if (c == '/') {
      if (at + 2 >= n) {
        tree_->Text(html_.substr(at, 2));
        return n;
      }
      const char d = html_[at + 2];
      if (IsAlpha(d)) return Tag(at + 2, /*end=*/true);
      if (d == '>') {  // "</>": nothing
        after_empty_end_tag_ = at + 3;
        return at + 3;
      }
      return BogusComment(at + 2);
    }
    if (IsAlpha(c)) return Tag(at + 1, /*end=*/false);
    if (c == '?') return BogusComment(at + 1);
    tree_->Text(html_.substr(at, 1));
    return at + 1;
  }

  size_t BogusComment(size_t from) {
    tree_->Comment();
    const size_t close = html_.find('>', from);
    return close == absl::string_view::npos ? html_.size() : close + 1;
  }

  // At "<!".
  size_t Declaration(size_t at) {
    const absl::string_view rest = html_.substr(at + 2);
    if (absl::StartsWith(rest, "--")) {
      tree_->Comment();
      return html_scan::CommentEnd(html_, at);
    }
    if (rest.size() >= 7 && absl::EqualsIgnoreCase(rest.substr(0, 7), "doctype")) {
      const size_t close = html_.find('>', at + 9);
      const size_t end = close == absl::string_view::npos ? html_.size() : close;
      // EOF inside a DOCTYPE forces quirks: a body without its '>' is unsure.
      tree_->Doctype(close == absl::string_view::npos ? "?" : html_.substr(at + 9, end - at - 9));
      return close == absl::string_view::npos ? html_.size() : close + 1;
    }
    if (absl::StartsWith(rest, "[CDATA[") && tree_->InForeign()) {
      const size_t close = html_.find("]]>", at + 9);
      return close == absl::string_view::npos ? html_.size() : close + 3;  // skipped text
    }
    return BogusComment(at + 2);
  }

  // `from` is the first letter of a tag name.
  size_t Tag(size_t from, bool end) {
    const size_t n = html_.size();
    size_t i = from;
    while (i < n && !IsSpace(html_[i]) && html_[i] != '/' && html_[i] != '>') ++i;
    HtmlTag tag;
    tag.name = html_.substr(from, i - from);
    char lower[16];
    if (tag.name.size() <= sizeof(lower)) {
      for (size_t k = 0; k < tag.name.size(); ++k) {
        const unsigned char c = tag.name[k];
        if (c < 0x20 || c >= 0x7f)
          return Decline("a tag name with controls or non-ASCII bytes");  // left to the
                                                                          // reference
        lower[k] = absl::ascii_tolower(c);
      }
      tag.id = html_tags::LookUpTag(absl::string_view(lower, tag.name.size()));
    } else {
      for (char c : tag.name) {
        if (static_cast<unsigned char>(c) < 0x20 || static_cast<unsigned char>(c) >= 0x7f) {
          return Decline("a tag name with controls or non-ASCII bytes");
        }
      }
    }
    const size_t after = html_scan::SkipAttributes(html_, i, &tag.self_closing);
    if (after == kNotFound) return n;  // EOF in a tag: dropped
    tag.attributes = html_.substr(i, after - i);
    if (from == after_empty_end_tag_ + 1 + end &&
        (tag.id == html_tags::kUnknown || tag.id == html_tags::kSvg || tag.id == html_tags::kMath ||
         tree_->InForeign())) {
      // The reference parser takes "</>" into the source text of the next
      // tag and may then misread its name.
      return Decline("an unknown, svg or math tag right after \"</>\"");
    }
    if (end) {
      tree_->EndTag(tag);
      return after;
    }
    switch (tree_->StartTag(tag)) {
      case HtmlTree::Content::kMarkup:
        return after;
      case HtmlTree::Content::kScript:
        return RawContent(after, html_scan::ScriptDataEnd(html_, after), "script");
      default: {
        char name[16];
        for (size_t k = 0; k < tag.name.size(); ++k) name[k] = absl::ascii_tolower(tag.name[k]);
        const absl::string_view lower_name(name, tag.name.size());
        return RawContent(after, html_scan::RawTextEnd(html_, after, lower_name), lower_name);
      }
    }
  }

  // The contents of a raw text element run from `from` to `close` (the '<'
  // of its end tag, or kNotFound).
  size_t RawContent(size_t from, size_t close, absl::string_view name) {
    const size_t n = html_.size();
    const size_t stop = close == kNotFound ? n : close;
    tree_->RawText(html_.substr(from, stop - from));
    if (close == kNotFound) {
      tree_->EndRaw();
      return n;
    }
    bool self_closing;
    const size_t after = html_scan::SkipAttributes(html_, close + 2 + name.size(), &self_closing);
    tree_->EndRaw();  // EOF inside the end tag also ends the element
    return after == kNotFound ? n : after;
  }

  size_t Decline(const char* why) {
    declined_ = why;
    return html_.size();
  }

  absl::string_view html_;
  HtmlTree* tree_;
  const char* declined_ = nullptr;                        // a tag name the tree's names cannot hold
  size_t after_empty_end_tag_ = absl::string_view::npos;  // just after the last "</>"
};

}  // namespace

bool FastHtmlToText(absl::string_view html, std::string* out, const char** reason,
                    bool valid_utf8) {
  out->clear();
  if (!valid_utf8 && !html_scan::IsValidUtf8(html)) {
    if (reason != nullptr) *reason = "not valid UTF-8";
    return false;
  }
  HtmlTree tree(out);
  Tokenizer tokenizer(html, &tree);
  return tokenizer.Run(reason);
}

}  // namespace kindred::io
