// HtmlTree: the stack of open elements and the rules of "in body".
#include "io/html_tree.h"

#include "absl/strings/match.h"
#include "io/html_scan.h"
#include "io/html_text.h"

namespace kindred::io {

using namespace html_tags;  // NOLINT: the tag ids read as names here

namespace {

constexpr char kPastUnicode[] = "a numeric character reference past U+10FFFF";

// The phrasing elements of the definition that the reference parser does
// not know (tag number "unknown"), and custom elements (a '-' in the name).
bool IsPhrasingName(absl::string_view name) {
  return name.find('-') != absl::string_view::npos || absl::EqualsIgnoreCase(name, "picture") ||
         absl::EqualsIgnoreCase(name, "slot");
}

}  // namespace

void HtmlTree::Push(TagId tag, absl::string_view name, bool foreign) {
  if (stack_.size() >= static_cast<size_t>(kMaxOpenElements))
    return Decline("nesting deeper than the guard");
  uint16_t flags = Info(tag).flags;
  if (foreign) {
    flags = stack_.empty() || !stack_.back().foreign ? kSkipped | kPhrasing : kPhrasing;
  } else if (tag == kUnknown && IsPhrasingName(name)) {
    flags = kPhrasing;
  }
  if (flags & kSkipped) {
    ++skipped_;
  } else if (skipped_ == 0 && !(flags & kPhrasing)) {
    out_->push_back('\n');
  }
  Element e{tag, flags, foreign, false, false, next_id_++, name};
  if (foreign) {
    const Element* parent = stack_.empty() || !stack_.back().foreign ? nullptr : &stack_.back();
    e.math = parent != nullptr ? parent->math : tag == kMath;
    static constexpr absl::string_view kSvgPoints[] = {"title", "desc", "foreignobject"};
    static constexpr absl::string_view kMathPoints[] = {"mi", "mo", "mn", "ms", "mtext"};
    if (parent != nullptr) {
      if (e.math) {
        for (absl::string_view point : kMathPoints)
          e.integration |= absl::EqualsIgnoreCase(name, point);
        if (absl::EqualsIgnoreCase(name, "annotation-xml")) Decline("annotation-xml");
      } else {
        for (absl::string_view point : kSvgPoints)
          e.integration |= absl::EqualsIgnoreCase(name, point);
      }
    }
  }
  stack_.push_back(e);
  flushed_ = out_->size();
}

void HtmlTree::Pop() {
  const Element& e = stack_.back();
  if (e.flags & kSkipped) {
    --skipped_;
  } else if (skipped_ == 0 && !(e.flags & kPhrasing)) {
    out_->push_back('\n');
  }
  stack_.pop_back();
  flushed_ = out_->size();
}

void HtmlTree::PopUntil(TagId tag) {
  while (!stack_.empty()) {
    const bool last = stack_.back().tag == tag && !stack_.back().foreign;
    Pop();
    if (last) return;
  }
}

void HtmlTree::PopTo(size_t size) {
  while (stack_.size() > size) Pop();
}

bool HtmlTree::IsBoundary(const Element& e, Scope scope) const {
  if (e.foreign) return e.integration;  // mi.. and title, desc, foreignObject
  switch (scope) {
    case Scope::kDefault:
      return e.flags & kScopeBoundary;
    case Scope::kListItem:
      return (e.flags & kScopeBoundary) || e.tag == kOl || e.tag == kUl;
    case Scope::kButton:
      return (e.flags & kScopeBoundary) || e.tag == kButton;
    case Scope::kTable:
      return e.flags & kTableContext;
  }
  return false;
}

bool HtmlTree::InScope(TagId tag, Scope scope) const {
  for (size_t k = stack_.size(); k-- > 0;) {
    const Element& e = stack_[k];
    if (e.tag == tag && !e.foreign) return true;
    if (IsBoundary(e, scope)) return false;
  }
  return false;
}

bool HtmlTree::HeadingInScope() const {
  for (size_t k = stack_.size(); k-- > 0;) {
    const Element& e = stack_[k];
    if ((e.flags & kHeadingFlag) && !e.foreign) return true;
    if (IsBoundary(e, Scope::kDefault)) return false;
  }
  return false;
}

int HtmlTree::StackIndex(uint32_t id) const {
  for (size_t k = stack_.size(); k-- > 0;) {
    if (stack_[k].id == id) return static_cast<int>(k);
  }
  return -1;
}

bool HtmlTree::ElementInScope(int index) const {
  for (int k = static_cast<int>(stack_.size()) - 1; k >= 0; --k) {
    if (k == index) return true;
    if (IsBoundary(stack_[k], Scope::kDefault)) return false;
  }
  return false;
}

void HtmlTree::GenerateImpliedEndTags(TagId except) {
  while (!stack_.empty() && (stack_.back().flags & kImpliedEnd) && !stack_.back().foreign &&
         stack_.back().tag != except) {
    Pop();
  }
}

void HtmlTree::ClosePInButtonScope() {
  if (!InScope(kP, Scope::kButton)) return;
  GenerateImpliedEndTags(kP);
  PopUntil(kP);
}

bool HtmlTree::NeedsReconstruct() const {
  if (formatting_.empty()) return false;
  const Formatting& last = formatting_.back();
  return last.tag != kUnknown && StackIndex(last.id) < 0;
}

void HtmlTree::Reconstruct() {
  if (!NeedsReconstruct()) return;
  size_t i = formatting_.size() - 1;
  while (i > 0 && formatting_[i - 1].tag != kUnknown && StackIndex(formatting_[i - 1].id) < 0) --i;
  for (; i < formatting_.size(); ++i) {
    Push(formatting_[i].tag, Info(formatting_[i].tag).name);
    formatting_[i].id = stack_.back().id;
  }
}

void HtmlTree::AddFormatting(TagId tag) {
  int same = 0;
  for (size_t k = formatting_.size(); k-- > 0 && formatting_[k].tag != kUnknown;) {
    same += formatting_[k].tag == tag;
  }
  if (same >= 3)
    return Decline("Noah's Ark (a fourth identical formatting element)");  // Noah's Ark
                                                                           // compares
                                                                           // attributes
  formatting_.push_back({tag, stack_.back().id});
}

void HtmlTree::ClearToMarker() {
  while (!formatting_.empty()) {
    const bool marker = formatting_.back().tag == kUnknown;
    formatting_.pop_back();
    if (marker) return;
  }
}

void HtmlTree::AnyOtherEndTag(const HtmlTag& tag) {
  for (size_t k = stack_.size(); k-- > 0;) {
    const Element& e = stack_[k];
    // The reference parser (Gumbo 0.10) knows an end tag by its tag number
    // only, so an end tag of any unknown name closes any unknown element.
    const bool same = !e.foreign && e.tag == tag.id;
    if (same) return PopTo(k);
    if (e.flags & kSpecial) return;
  }
}

void HtmlTree::ResetMode() {
  for (size_t k = stack_.size(); k-- > 0;) {
    const TagId tag = stack_[k].tag;
    if (k > 0 && (tag == kTd || tag == kTh)) {
      mode_ = Mode::kInCell;
    } else if (tag == kTr) {
      mode_ = Mode::kInRow;
    } else if (tag == kTbody || tag == kThead || tag == kTfoot) {
      mode_ = Mode::kInTableBody;
    } else if (tag == kTable) {
      mode_ = Mode::kInTable;
    } else if (tag == kColgroup) {
      mode_ = Mode::kInColumnGroup;
    } else if (tag == kBody || k == 0) {
      mode_ = Mode::kInBody;
    } else {
      continue;
    }
    return;
  }
  mode_ = Mode::kInBody;
}

HtmlTree::Content HtmlTree::OpenRaw(const HtmlTag& tag, Content content) {
  Push(tag.id, tag.name);
  if (tag.id == kTextarea) {
    drop_lf_ = true;
    drop_lf_at_ = out_->size();
  }
  return content;
}

void HtmlTree::RawText(absl::string_view run) {
  if (skipped_ > 0 || run.empty()) return;
  if (drop_lf_ && run[0] == '\0') return Decline("NUL after a dropped line feed");
  const Element& e = stack_.back();
  if (!html_scan::AppendText(run,
                             e.tag == kTitle || e.tag == kTextarea ? html_scan::TextKind::kRcdata
                                                                   : html_scan::TextKind::kRawtext,
                             out_)) {
    return Decline(kPastUnicode);
  }
  if (drop_lf_ && out_->size() > drop_lf_at_ && (*out_)[drop_lf_at_] == '\n') {
    out_->erase(drop_lf_at_, 1);
  }
  drop_lf_ = false;
}

void HtmlTree::EndRaw() {
  drop_lf_ = false;
  Pop();
}

void HtmlTree::Comment() {
  drop_lf_ = false;
  flushed_ = out_->size();
}

void HtmlTree::Doctype(absl::string_view body) {
  drop_lf_ = false;
  if (mode_ != Mode::kInitial) return;  // ignored
  while (!body.empty() && html_scan::IsSpace(body.front())) body.remove_prefix(1);
  while (!body.empty() && html_scan::IsSpace(body.back())) body.remove_suffix(1);
  quirks_ = absl::EqualsIgnoreCase(body, "html") ? Quirks::kNone : Quirks::kUnsure;
  mode_ = Mode::kBeforeHtml;
}

void HtmlTree::Step() {
  switch (mode_) {
    case Mode::kInitial:
      quirks_ = Quirks::kQuirks;
      mode_ = Mode::kBeforeHtml;
      return;
    case Mode::kBeforeHtml:
      Push(kHtml, "html");
      mode_ = Mode::kBeforeHead;
      return;
    case Mode::kBeforeHead:
      Push(kHead, "head");
      mode_ = Mode::kInHead;
      return;
    case Mode::kInHead:
      Pop();
      mode_ = Mode::kAfterHead;
      return;
    case Mode::kInHeadNoscript:
      Pop();
      mode_ = Mode::kInHead;
      return;
    case Mode::kAfterHead:
      Push(kBody, "body");
      mode_ = Mode::kInBody;
      return;
    default:
      return;
  }
}

void HtmlTree::Text(absl::string_view run) {
  const bool drop_lf = drop_lf_;
  drop_lf_ = false;
  while (mode_ < Mode::kInBody) {
    size_t spaces = 0;
    while (spaces < run.size() && html_scan::IsSpace(run[spaces])) ++spaces;
    if (mode_ == Mode::kAfterHead && skipped_ == 0) out_->append(run.data(), spaces);
    run.remove_prefix(spaces);
    if (run.empty()) return;
    if (run[0] == '&' || run[0] == '\0')
      return Decline("a character reference or NUL before the body");
    Step();
  }
  if (mode_ >= Mode::kInTable && mode_ <= Mode::kInRow) {
    for (char c : run) {
      if (!html_scan::IsSpace(c))
        return Decline("text in a table (foster parenting)");  // foster parenting
    }
    if (skipped_ == 0) out_->append(run.data(), run.size());
    return;
  }
  if (InForeign()) {
    if (stack_.back().integration && NeedsReconstruct())
      Decline("formatting to reconstruct inside svg or math");
    return;
  }
  if (drop_lf && run[0] == '\0') return Decline("NUL after a dropped line feed");
  if (run.find_first_not_of('\0') == absl::string_view::npos) return;
  Reconstruct();
  if (skipped_ > 0) return;
  const size_t before = out_->size();
  if (!html_scan::AppendText(run, html_scan::TextKind::kData, out_)) return Decline(kPastUnicode);
  if (drop_lf && out_->size() > before && (*out_)[before] == '\n') out_->erase(before, 1);
}

void HtmlTree::Eof() {
  drop_lf_ = false;
  while (mode_ < Mode::kInBody && !declined()) Step();
  PopTo(0);
}

}  // namespace kindred::io
