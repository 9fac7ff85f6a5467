// HtmlTree: "in body", the table modes, and svg and math content.
#include "absl/strings/ascii.h"
#include "absl/strings/match.h"
#include "absl/strings/strip.h"
#include "io/html_scan.h"
#include "io/html_tree.h"

namespace kindred::io {

using namespace html_tags;  // NOLINT: the tag ids read as names here

namespace {

bool IsOneOf(TagId tag, std::initializer_list<TagId> tags) {
  for (TagId t : tags) {
    if (tag == t) return true;
  }
  return false;
}

// Start tags that leave svg and math content ("breakouts").
bool IsBreakout(absl::string_view name) {
  static constexpr absl::string_view kNames[] = {
      "b",      "big",  "blockquote", "body",  "br",   "center", "code",    "dd",   "div",
      "dl",     "dt",   "em",         "embed", "h1",   "h2",     "h3",      "h4",   "h5",
      "h6",     "head", "hr",         "i",     "img",  "li",     "listing", "menu", "meta",
      "nobr",   "ol",   "p",          "pre",   "ruby", "s",      "small",   "span", "strong",
      "strike", "sub",  "sup",        "table", "tt",   "u",      "ul",      "var",  "font"};
  for (absl::string_view breakout : kNames) {
    if (absl::EqualsIgnoreCase(name, breakout)) return true;
  }
  return false;
}

}  // namespace

HtmlTree::Content HtmlTree::StartInBody(const HtmlTag& tag) {
  switch (Info(tag.id).start) {
    case Start::kOrdinary:
      Reconstruct();
      Push(tag.id, tag.name);
      break;
    case Start::kBlock:
      ClosePInButtonScope();
      Push(tag.id, tag.name);
      break;
    case Start::kHeading:
      ClosePInButtonScope();
      if (!stack_.empty() && (stack_.back().flags & kHeadingFlag)) Pop();
      Push(tag.id, tag.name);
      break;
    case Start::kPre:
      ClosePInButtonScope();
      Push(tag.id, tag.name);
      drop_lf_ = true;
      break;
    case Start::kForm:
      if (form_ != 0) break;  // a form is open: ignored
      ClosePInButtonScope();
      Push(tag.id, tag.name);
      form_ = stack_.back().id;
      break;
    case Start::kListItem:
    case Start::kDefinition:
      for (size_t k = stack_.size(); k-- > 0;) {
        const Element& e = stack_[k];
        const bool match = tag.id == kLi ? e.tag == kLi : (e.tag == kDd || e.tag == kDt);
        if (match) {
          const TagId found = e.tag;
          GenerateImpliedEndTags(found);
          PopUntil(found);
          break;
        }
        if ((e.flags & kSpecial) && !IsOneOf(e.tag, {LookUpTag("address"), LookUpTag("div"), kP})) {
          break;
        }
      }
      ClosePInButtonScope();
      Push(tag.id, tag.name);
      break;
    case Start::kButton:
      if (InScope(kButton)) {
        GenerateImpliedEndTags();
        PopUntil(kButton);
      }
      Reconstruct();
      Push(tag.id, tag.name);
      break;
    case Start::kAnchor:
      for (size_t k = formatting_.size(); k-- > 0 && formatting_[k].tag != kUnknown;) {
        if (formatting_[k].tag != kA) continue;
        const uint32_t id = formatting_[k].id;
        AdoptionAgency(tag);
        if (declined()) return Content::kMarkup;
        if (StackIndex(id) >= 0) {
          Decline("an open a element left on the stack");  // removed from the stack
                                                           // without being closed
          return Content::kMarkup;
        }
        for (size_t j = 0; j < formatting_.size(); ++j) {
          if (formatting_[j].id == id && formatting_[j].tag == kA) {
            formatting_.erase(formatting_.begin() + j);
            break;
          }
        }
        break;
      }
      Reconstruct();
      Push(tag.id, tag.name);
      AddFormatting(tag.id);
      break;
    case Start::kFormatting:
      Reconstruct();
      Push(tag.id, tag.name);
      AddFormatting(tag.id);
      break;
    case Start::kNobr:
      Reconstruct();
      if (InScope(kNobr)) {
        AdoptionAgency(tag);
        Reconstruct();
      }
      Push(tag.id, tag.name);
      AddFormatting(tag.id);
      break;
    case Start::kMarker:
      Reconstruct();
      Push(tag.id, tag.name);
      formatting_.push_back({kUnknown, 0});
      break;
    case Start::kTable:
      if (quirks_ == Quirks::kNone) {
        ClosePInButtonScope();
      } else if (quirks_ == Quirks::kUnsure && InScope(kP, Scope::kButton)) {
        Decline("a table in a p element, quirks mode unsure");  // whether the p closes
                                                                // depends on the
                                                                // quirks mode
        break;
      }
      Push(tag.id, tag.name);
      mode_ = Mode::kInTable;
      break;
    case Start::kVoid:
      Reconstruct();
      if (tag.id == kBr) {
        if (skipped_ == 0) out_->push_back('\n');
        flushed_ = out_->size();
      } else {
        Push(tag.id == kImage ? kImg : tag.id, tag.name);
        Pop();
      }
      break;
    case Start::kVoidPlain:
    case Start::kHeadVoid:
      Push(tag.id, tag.name);
      Pop();
      break;
    case Start::kHr:
      ClosePInButtonScope();
      Push(tag.id, tag.name);
      Pop();
      break;
    case Start::kTextarea:
      return OpenRaw(tag, Content::kRcdata);
    case Start::kXmp:
      ClosePInButtonScope();
      Reconstruct();
      return OpenRaw(tag, Content::kRawtext);
    case Start::kRawVisible:
    case Start::kStyle:
      return OpenRaw(tag, Content::kRawtext);
    case Start::kTitle:
      return OpenRaw(tag, Content::kRcdata);
    case Start::kScript:
      return OpenRaw(tag, Content::kScript);
    case Start::kOption:
      if (!stack_.empty() && stack_.back().tag == kOption) Pop();
      Reconstruct();
      Push(tag.id, tag.name);
      break;
    case Start::kForeign:
      Reconstruct();
      if (!tag.self_closing) Push(tag.id, tag.name, /*foreign=*/true);
      break;
    case Start::kIgnored:
      break;
    case Start::kBail:
      Decline(Info(tag.id).name);
      break;
  }
  return Content::kMarkup;
}

void HtmlTree::EndInBody(const HtmlTag& tag) {
  switch (Info(tag.id).end) {
    case End::kAnyOther:
      return AnyOtherEndTag(tag);
    case End::kBlock:
      if (!InScope(tag.id)) return;
      GenerateImpliedEndTags();
      return PopUntil(tag.id);
    case End::kForm: {
      const uint32_t form = form_;
      form_ = 0;
      const int index = form == 0 ? -1 : StackIndex(form);
      if (index < 0 || !ElementInScope(index)) return;
      GenerateImpliedEndTags();
      if (stack_.back().id != form)
        return Decline("a form closed out of order");  // removed from the middle of the stack
      // The reference parser closes the form before the text that follows
      // the last element or comment inside it: that text comes after it.
      if (skipped_ == 0) out_->insert(out_->begin() + flushed_, '\n');
      stack_.pop_back();
      flushed_ = out_->size();
      return;
    }
    case End::kParagraph:
      if (!InScope(kP, Scope::kButton)) Push(kP, "p");
      GenerateImpliedEndTags(kP);
      return PopUntil(kP);
    case End::kListItem:
      if (!InScope(kLi, Scope::kListItem)) return;
      GenerateImpliedEndTags(kLi);
      return PopUntil(kLi);
    case End::kDefinition:
      if (!InScope(tag.id)) return;
      GenerateImpliedEndTags(tag.id);
      return PopUntil(tag.id);
    case End::kHeading:
      if (!HeadingInScope()) return;
      GenerateImpliedEndTags();
      while (!stack_.empty()) {
        const bool heading = stack_.back().flags & kHeadingFlag;
        Pop();
        if (heading) return;
      }
      return;
    case End::kFormatting:
      return AdoptionAgency(tag);
    case End::kMarker:
      // The reference parser checks the table scope here, not the default
      // scope the standard names.
      if (!InScope(tag.id, Scope::kTable)) return;
      GenerateImpliedEndTags();
      PopUntil(tag.id);
      return ClearToMarker();
    case End::kBreak:
      Reconstruct();
      if (skipped_ == 0) out_->push_back('\n');
      flushed_ = out_->size();
      return;
    case End::kIgnore:
      return;
  }
}

void HtmlTree::StartForeign(const HtmlTag& tag) {
  if (stack_.back().integration || IsBreakout(tag.name)) return Decline("HTML inside svg or math");
  if (!tag.self_closing) Push(tag.id, tag.name, /*foreign=*/true);
}

void HtmlTree::EndForeign(const HtmlTag& tag) {
  if (tag.id == kBr || tag.id == kP) return Decline("br or p end tag in svg or math");
  // "</svg/svg>", "</svg >": the reference parser (Gumbo 0.10) compares
  // the whole source between "</" and ">" with the open element's name in
  // foreign content, so an end tag with anything after its name (a slash,
  // attributes, even white space) leaves svg open there; such pages go to it.
  if (tag.self_closing || tag.attributes != ">") {
    return Decline("an end tag with more than its name in svg or math");
  }
  for (size_t k = stack_.size(); k-- > 0;) {
    const Element& e = stack_[k];
    if (!e.foreign)
      return Decline("an HTML end tag inside svg or math");  // handled by the
                                                             // insertion mode
    if (absl::EqualsIgnoreCase(e.name, tag.name)) return PopTo(k);
  }
}

}  // namespace kindred::io
