// HtmlTree: the insertion modes, token by token.
#include "absl/strings/match.h"
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

HtmlTree::Content HtmlTree::StartTag(const HtmlTag& tag) {
  drop_lf_ = false;
  if (InForeign()) {
    StartForeign(tag);
    return Content::kMarkup;
  }
  for (int round = 0; round < 8 && !declined(); ++round) {
    bool again = false;
    Content content = Content::kMarkup;
    if (mode_ < Mode::kInBody) {
      content = StartBeforeBody(tag, &again);
    } else if (mode_ == Mode::kInBody || mode_ == Mode::kInCell) {
      if (mode_ == Mode::kInCell &&
          IsOneOf(tag.id, {kCaption, kCol, kColgroup, kTbody, kTd, kTfoot, kTh, kThead, kTr})) {
        if (!InScope(kTd, Scope::kTable) && !InScope(kTh, Scope::kTable)) return content;
        GenerateImpliedEndTags();
        while (!stack_.empty() && !IsOneOf(stack_.back().tag, {kTd, kTh})) Pop();
        Pop();
        ClearToMarker();
        mode_ = Mode::kInRow;
        continue;
      }
      content = StartInBody(tag);
    } else {
      content = StartInTable(tag, &again);
    }
    if (!again) return content;
  }
  Decline("tokens that reprocess too often");
  return Content::kMarkup;
}

void HtmlTree::EndTag(const HtmlTag& tag) {
  drop_lf_ = false;
  if (InForeign()) return EndForeign(tag);
  for (int round = 0; round < 8 && !declined(); ++round) {
    bool again = false;
    if (mode_ < Mode::kInBody) {
      EndBeforeBody(tag, &again);
    } else if (mode_ == Mode::kInBody) {
      EndInBody(tag);
    } else if (mode_ == Mode::kInCell) {
      if (IsOneOf(tag.id, {kTd, kTh})) {
        if (!InScope(tag.id, Scope::kTable)) return;
        GenerateImpliedEndTags();
        PopUntil(tag.id);
        ClearToMarker();
        mode_ = Mode::kInRow;
      } else if (IsOneOf(tag.id, {kBody, kCaption, kCol, kColgroup, kHtml})) {
        return;
      } else if (IsOneOf(tag.id, {kTable, kTbody, kTfoot, kThead, kTr})) {
        if (!InScope(tag.id, Scope::kTable)) return;
        GenerateImpliedEndTags();
        while (!stack_.empty() && !IsOneOf(stack_.back().tag, {kTd, kTh})) Pop();
        Pop();
        ClearToMarker();
        mode_ = Mode::kInRow;
        again = true;
      } else {
        EndInBody(tag);
      }
    } else {
      EndInTable(tag, &again);
    }
    if (!again) return;
  }
  Decline("tokens that reprocess too often");
}

HtmlTree::Content HtmlTree::StartInHead(const HtmlTag& tag) {
  switch (Info(tag.id).start) {
    case Start::kHeadVoid:
      Push(tag.id, tag.name);
      Pop();
      return Content::kMarkup;
    case Start::kTitle:
      return OpenRaw(tag, Content::kRcdata);
    case Start::kStyle:
      return OpenRaw(tag, Content::kRawtext);
    case Start::kScript:
      return OpenRaw(tag, Content::kScript);
    default:
      Decline("template");  // template
      return Content::kMarkup;
  }
}

HtmlTree::Content HtmlTree::StartBeforeBody(const HtmlTag& tag, bool* again) {
  const Start start = Info(tag.id).start;
  const bool head_rule = start == Start::kHeadVoid || start == Start::kTitle ||
                         start == Start::kStyle || start == Start::kScript || tag.id == kTemplate;
  switch (mode_) {
    case Mode::kBeforeHtml:
      if (tag.id == kHtml) {
        Push(kHtml, "html");
        mode_ = Mode::kBeforeHead;
        return Content::kMarkup;
      }
      break;
    case Mode::kBeforeHead:
      if (tag.id == kHtml) return Content::kMarkup;
      if (tag.id == kHead) {
        Push(kHead, "head");
        mode_ = Mode::kInHead;
        return Content::kMarkup;
      }
      break;
    case Mode::kInHead:
      if (tag.id == kHtml || tag.id == kHead) return Content::kMarkup;
      if (tag.id == kNoscript) {
        Push(kNoscript, tag.name);
        mode_ = Mode::kInHeadNoscript;
        return Content::kMarkup;
      }
      if (head_rule) return StartInHead(tag);
      break;
    case Mode::kInHeadNoscript:
      if (IsOneOf(tag.id, {kHtml, kHead, kNoscript})) return Content::kMarkup;
      if (start == Start::kHeadVoid || tag.id == kStyle || tag.id == kNoframes) {
        return StartInHead(tag);
      }
      break;
    case Mode::kAfterHead:
      if (tag.id == kHtml || tag.id == kHead) return Content::kMarkup;
      if (tag.id == kBody) {
        Push(kBody, "body");
        mode_ = Mode::kInBody;
        return Content::kMarkup;
      }
      if (tag.id == kFrameset) break;
      if (head_rule) {
        // Inserted into the head element: skipped like the rest of it.
        ++skipped_;
        const Content content = StartInHead(tag);
        if (content != Content::kMarkup && !(stack_.back().flags & kSkipped)) {
          stack_.back().flags |= kSkipped;  // its end closes the extra skip
        } else {
          --skipped_;
        }
        return content;
      }
      break;
    default:
      break;
  }
  if (tag.id == kFrameset) {
    Decline("frameset");
    return Content::kMarkup;
  }
  Step();
  *again = true;
  return Content::kMarkup;
}

void HtmlTree::EndBeforeBody(const HtmlTag& tag, bool* again) {
  bool step = IsOneOf(tag.id, {kBody, kHtml, kBr});
  switch (mode_) {
    case Mode::kInitial:
      step = true;
      break;
    case Mode::kBeforeHtml:
    case Mode::kBeforeHead:
      step = step || tag.id == kHead;
      break;
    case Mode::kInHead:
      if (tag.id == kHead) {
        Pop();
        mode_ = Mode::kAfterHead;
        return;
      }
      break;
    case Mode::kInHeadNoscript:
      if (tag.id == kNoscript) {
        Pop();
        mode_ = Mode::kInHead;
        return;
      }
      step = tag.id == kBr;
      break;
    default:
      break;
  }
  if (!step) return;
  Step();
  *again = true;
}

}  // namespace kindred::io
