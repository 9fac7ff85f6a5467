// Internal: the tree construction part of the fast HTML-to-text path
// (io/html_fast_text.h lists what it covers and what it declines). It keeps
// no tree: only the stack of open elements, the list of active formatting
// elements, the insertion mode and the form element pointer, and it
// appends the text and line breaks to the output as elements are opened
// and closed, which is document order as long as no node is moved (the
// cases where the algorithm moves nodes are declined).
//
// Thread-safety: one object per document; not shared.
#ifndef KINDRED_IO_HTML_TREE_H_
#define KINDRED_IO_HTML_TREE_H_

#include <cstdint>
#include <string>
#include <vector>

#include "absl/strings/string_view.h"
#include "io/html_tags.h"

namespace kindred::io {

struct HtmlTag {
  html_tags::TagId id = html_tags::kUnknown;
  absl::string_view name;        // as in the source (any case)
  absl::string_view attributes;  // the source from the name's end to '>'
  bool self_closing = false;
};

class HtmlTree {
 public:
  // How the tokenizer reads the contents of the element just opened.
  enum class Content { kMarkup, kRcdata, kRawtext, kScript };

  explicit HtmlTree(std::string* out) : out_(out) {}

  Content StartTag(const HtmlTag& tag);
  void EndTag(const HtmlTag& tag);
  void Text(absl::string_view run);     // data state text, no '<'
  void RawText(absl::string_view run);  // contents of the element just opened
  void EndRaw();                        // its end tag (or the end of input)
  void Comment();
  void Doctype(absl::string_view body);  // between "<!DOCTYPE" and '>'
  void Eof();

  // Whether the adjusted current node is not an HTML element (CDATA
  // sections are then recognized).
  bool InForeign() const { return !stack_.empty() && stack_.back().foreign; }
  bool declined() const { return declined_ != nullptr; }
  // Why it declined (for diagnostics), or null.
  const char* decline_reason() const { return declined_; }

 private:
  enum class Mode {
    kInitial,
    kBeforeHtml,
    kBeforeHead,
    kInHead,
    kInHeadNoscript,
    kAfterHead,
    kInBody,
    kInTable,
    kInColumnGroup,
    kInTableBody,
    kInRow,
    kInCell,
  };
  enum class Quirks { kNone, kQuirks, kUnsure };
  struct Element {
    html_tags::TagId tag;
    uint16_t flags;
    bool foreign;
    bool integration;  // an HTML integration point inside svg or math
    bool math;         // in the MathML namespace (else SVG, when foreign)
    uint32_t id;
    absl::string_view name;
  };
  struct Formatting {
    html_tags::TagId tag;  // 0 for a marker
    uint32_t id;
  };
  enum class Scope { kDefault, kListItem, kButton, kTable };

  void Decline(const char* why) {
    if (declined_ == nullptr) declined_ = why;
  }
  void Push(html_tags::TagId tag, absl::string_view name, bool foreign = false);
  void Pop();
  void PopUntil(html_tags::TagId tag);
  void PopTo(size_t size);
  bool IsBoundary(const Element& e, Scope scope) const;
  bool InScope(html_tags::TagId tag, Scope scope = Scope::kDefault) const;
  bool HeadingInScope() const;
  int StackIndex(uint32_t id) const;
  bool ElementInScope(int index) const;
  void GenerateImpliedEndTags(html_tags::TagId except = html_tags::kUnknown);
  void ClosePInButtonScope();
  void Reconstruct();
  bool NeedsReconstruct() const;
  void AddFormatting(html_tags::TagId tag);
  void ClearToMarker();
  void AdoptionAgency(const HtmlTag& tag);
  void AdoptNodes(int found, int index, int block);
  void AnyOtherEndTag(const HtmlTag& tag);
  void ResetMode();
  void Step();  // the "anything else" step of the modes before "in body"

  Content StartBeforeBody(const HtmlTag& tag, bool* again);
  Content StartInHead(const HtmlTag& tag);
  void EndBeforeBody(const HtmlTag& tag, bool* again);
  Content StartInBody(const HtmlTag& tag);
  void EndInBody(const HtmlTag& tag);
  Content StartInTable(const HtmlTag& tag, bool* again);
  void EndInTable(const HtmlTag& tag, bool* again);
  void StartForeign(const HtmlTag& tag);
  void EndForeign(const HtmlTag& tag);
  Content OpenRaw(const HtmlTag& tag, Content content);
  void BodyText(absl::string_view run);

  std::string* out_;
  std::vector<Element> stack_;
  std::vector<Formatting> formatting_;
  Mode mode_ = Mode::kInitial;
  Quirks quirks_ = Quirks::kQuirks;
  uint32_t next_id_ = 1;
  uint32_t form_ = 0;      // the form element pointer (an element id), 0 if null
  int skipped_ = 0;        // skipped elements open
  size_t flushed_ = 0;     // out_ size at the last element or comment event
  bool drop_lf_ = false;   // a leading LF of the next text is dropped
  size_t drop_lf_at_ = 0;  // out_ size when drop_lf_ was set
  const char* declined_ = nullptr;
};

}  // namespace kindred::io

#endif  // KINDRED_IO_HTML_TREE_H_
