// HtmlTree: the adoption agency algorithm (HTML Standard, 13.2.6.4.7), on
// the stack of open elements and the list of active formatting elements.
//
// The tree is not kept, so the moves the algorithm makes are not made;
// they leave the text and its line breaks in the same order as long as
// every element it takes off the stack without closing it (between the
// formatting element and the furthest block, and not a formatting
// element itself) is a phrasing element whose contents are not skipped,
// and the furthest block does not go to a table (foster parenting). The
// formatting elements it clones are all phrasing. Other cases are declined.
#include "io/html_tree.h"

namespace kindred::io {

using namespace html_tags;  // NOLINT: the tag ids read as names here

void HtmlTree::AdoptionAgency(const HtmlTag& tag) {
  for (int outer = 0; outer < 8; ++outer) {
    int found = -1;  // the formatting element's entry in the list
    for (int k = static_cast<int>(formatting_.size()) - 1; k >= 0; --k) {
      if (formatting_[k].tag == kUnknown) break;
      if (formatting_[k].tag == tag.id) {
        found = k;
        break;
      }
    }
    if (found < 0) {
      if (outer == 0) AnyOtherEndTag(tag);
      return;
    }
    const int index = StackIndex(formatting_[found].id);
    if (index < 0) {
      formatting_.erase(formatting_.begin() + found);
      return;
    }
    if (!ElementInScope(index)) return;
    int block = -1;  // the furthest block
    for (size_t k = index + 1; k < stack_.size(); ++k) {
      if (stack_[k].flags & kSpecial) {
        block = static_cast<int>(k);
        break;
      }
    }
    if (block < 0) {
      PopTo(index);
      formatting_.erase(formatting_.begin() + found);
      return;
    }
    const TagId ancestor = stack_[index - 1].tag;
    if (ancestor == kTable || ancestor == kTbody || ancestor == kTfoot || ancestor == kThead ||
        ancestor == kTr) {
      return Decline("misnested formatting moved into a table (foster parenting)");
    }
    AdoptNodes(found, index, block);
    if (declined()) return;
  }
}

// Steps of one round with a furthest block: `found` is the formatting
// element's list entry, `index` its stack position, `block` the furthest
// block's.
void HtmlTree::AdoptNodes(int found, int index, int block) {
  int bookmark = found;
  int node = block;
  bool last_is_block = true;
  for (int inner = 1;; ++inner) {
    --node;  // the element above it on the stack (its parent there)
    if (node == index) break;
    int entry = -1;
    for (int k = static_cast<int>(formatting_.size()) - 1; k >= 0; --k) {
      if (formatting_[k].tag != kUnknown && formatting_[k].id == stack_[node].id) {
        entry = k;
        break;
      }
    }
    if (inner > 3 && entry >= 0) {
      formatting_.erase(formatting_.begin() + entry);
      if (entry < bookmark) --bookmark;
      if (entry < found) --found;
      entry = -1;
    }
    if (entry < 0) {
      const Element& removed = stack_[node];
      if (!(removed.flags & kPhrasing) || (removed.flags & kSkipped)) {
        return Decline("misnested formatting around a block or skipped element");
      }
      stack_.erase(stack_.begin() + node);
      --block;
      continue;
    }
    // A clone replaces the node in the list and on the stack.
    const uint32_t clone = next_id_++;
    formatting_[entry].id = clone;
    stack_[node].id = clone;
    if (last_is_block) bookmark = entry + 1;
    last_is_block = false;
  }
  // A clone of the formatting element takes the furthest block's children
  // and goes below it on the stack; the original leaves both.
  const Formatting original = formatting_[found];
  const Element element = stack_[index];
  formatting_.insert(formatting_.begin() + bookmark, {original.tag, next_id_});
  if (bookmark <= found) ++found;
  formatting_.erase(formatting_.begin() + found);
  Element copy = element;
  copy.id = next_id_++;
  stack_.insert(stack_.begin() + block + 1, copy);
  stack_.erase(stack_.begin() + index);
}

}  // namespace kindred::io
