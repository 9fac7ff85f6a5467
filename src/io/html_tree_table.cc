// HtmlTree: the table insertion modes ("in table", "in column group", "in
// table body", "in row"; "in cell" is with "in body"). Text and elements
// that the standard would foster-parent out of the table are declined.
#include "absl/strings/match.h"
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

}  // namespace

HtmlTree::Content HtmlTree::StartInTable(const HtmlTag& tag, bool* again) {
  const TagId t = tag.id;
  if (mode_ == Mode::kInColumnGroup) {
    if (t == kHtml) return Content::kMarkup;
    if (t == kCol) {
      Push(t, tag.name);
      Pop();
      return Content::kMarkup;
    }
    if (t == kTemplate) {
      Decline("template");
      return Content::kMarkup;
    }
    if (stack_.back().tag != kColgroup) return Content::kMarkup;
    Pop();
    mode_ = Mode::kInTable;
    *again = true;
    return Content::kMarkup;
  }
  if (mode_ == Mode::kInRow && (t == kTd || t == kTh)) {
    while (!IsOneOf(stack_.back().tag, {kTr, kHtml})) Pop();
    Push(t, tag.name);
    mode_ = Mode::kInCell;
    formatting_.push_back({kUnknown, 0});
    return Content::kMarkup;
  }
  if (mode_ == Mode::kInRow &&
      IsOneOf(t, {kCaption, kCol, kColgroup, kTbody, kTfoot, kThead, kTr})) {
    if (!InScope(kTr, Scope::kTable)) return Content::kMarkup;
    while (!IsOneOf(stack_.back().tag, {kTr, kHtml})) Pop();
    Pop();
    mode_ = Mode::kInTableBody;
    *again = true;
    return Content::kMarkup;
  }
  if (mode_ >= Mode::kInTableBody) {  // in table body (or in row, falling through)
    if (mode_ == Mode::kInTableBody && (t == kTr || t == kTd || t == kTh)) {
      while (!IsOneOf(stack_.back().tag, {kTbody, kTfoot, kThead, kHtml})) Pop();
      Push(kTr, "tr");
      mode_ = Mode::kInRow;
      *again = t != kTr;
      return Content::kMarkup;
    }
    if (mode_ == Mode::kInTableBody &&
        IsOneOf(t, {kCaption, kCol, kColgroup, kTbody, kTfoot, kThead})) {
      if (!InScope(kTbody, Scope::kTable) && !InScope(kThead, Scope::kTable) &&
          !InScope(kTfoot, Scope::kTable)) {
        return Content::kMarkup;
      }
      while (!IsOneOf(stack_.back().tag, {kTbody, kTfoot, kThead, kHtml})) Pop();
      Pop();
      mode_ = Mode::kInTable;
      *again = true;
      return Content::kMarkup;
    }
  }
  // "in table"
  if (IsOneOf(t, {kTbody, kTfoot, kThead, kTd, kTh, kTr})) {
    while (!IsOneOf(stack_.back().tag, {kTable, kHtml})) Pop();
    if (IsOneOf(t, {kTbody, kTfoot, kThead})) {
      Push(t, tag.name);
    } else {
      Push(kTbody, "tbody");
      *again = true;
    }
    mode_ = Mode::kInTableBody;
    return Content::kMarkup;
  }
  if (t == kColgroup || t == kCol) {
    while (!IsOneOf(stack_.back().tag, {kTable, kHtml})) Pop();
    Push(kColgroup, "colgroup");
    mode_ = Mode::kInColumnGroup;
    *again = t == kCol;
    return Content::kMarkup;
  }
  if (t == kTable) {
    if (!InScope(kTable, Scope::kTable)) return Content::kMarkup;
    PopUntil(kTable);
    ResetMode();
    *again = true;
    return Content::kMarkup;
  }
  if (t == kForm) {
    if (form_ != 0) return Content::kMarkup;
    Push(t, tag.name);
    form_ = stack_.back().id;
    Pop();
    return Content::kMarkup;
  }
  if (t == LookUpTag("input")) {
    absl::string_view type;
    if (html_scan::AttributeValue(tag.attributes, "type", &type) &&
        type.find('&') == absl::string_view::npos && absl::EqualsIgnoreCase(type, "hidden")) {
      Push(t, tag.name);
      Pop();
      return Content::kMarkup;
    }
  }
  if (t == kStyle) return OpenRaw(tag, Content::kRawtext);
  if (t == kScript) return OpenRaw(tag, Content::kScript);
  Decline("an element in a table (foster parenting), caption or template");
  return Content::kMarkup;
}

void HtmlTree::EndInTable(const HtmlTag& tag, bool* again) {
  const TagId t = tag.id;
  if (mode_ == Mode::kInColumnGroup) {
    if (t == kCol || t == kTemplate) return;
    if (stack_.back().tag != kColgroup) return;
    Pop();
    mode_ = Mode::kInTable;
    *again = t != kColgroup;
    return;
  }
  if (mode_ == Mode::kInRow) {
    if (t == kTr || t == kTable || IsOneOf(t, {kTbody, kTfoot, kThead})) {
      if (IsOneOf(t, {kTbody, kTfoot, kThead}) && !InScope(t, Scope::kTable)) return;
      if (!InScope(kTr, Scope::kTable)) return;
      while (!IsOneOf(stack_.back().tag, {kTr, kHtml})) Pop();
      Pop();
      mode_ = Mode::kInTableBody;
      *again = t != kTr;
      return;
    }
    if (IsOneOf(t, {kBody, kCaption, kCol, kColgroup, kHtml, kTd, kTh})) return;
  } else if (mode_ == Mode::kInTableBody) {
    if (IsOneOf(t, {kTbody, kTfoot, kThead})) {
      if (!InScope(t, Scope::kTable)) return;
      while (!IsOneOf(stack_.back().tag, {kTbody, kTfoot, kThead, kHtml})) Pop();
      Pop();
      mode_ = Mode::kInTable;
      return;
    }
    if (t == kTable) {
      if (!InScope(kTbody, Scope::kTable) && !InScope(kThead, Scope::kTable) &&
          !InScope(kTfoot, Scope::kTable)) {
        return;
      }
      while (!IsOneOf(stack_.back().tag, {kTbody, kTfoot, kThead, kHtml})) Pop();
      Pop();
      mode_ = Mode::kInTable;
      *again = true;
      return;
    }
    if (IsOneOf(t, {kBody, kCaption, kCol, kColgroup, kHtml, kTd, kTh, kTr})) return;
  }
  if (t == kTable) {
    if (!InScope(kTable, Scope::kTable)) return;
    PopUntil(kTable);
    ResetMode();
    return;
  }
  if (IsOneOf(t, {kBody, kCaption, kCol, kColgroup, kHtml, kTbody, kTd, kTfoot, kTh, kThead, kTr,
                  kTemplate})) {
    return;
  }
  Decline("an end tag in a table (foster parenting)");  // foster parented
}

}  // namespace kindred::io
