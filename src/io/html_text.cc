// HtmlToText: the text of an HTML document, walking the tree Gumbo builds.
#include "io/html_text.h"

#include <gumbo.h>

#include <algorithm>
#include <atomic>
#include <string>
#include <utility>
#include <vector>

#include "absl/container/flat_hash_set.h"
#include "absl/strings/ascii.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"
#include "io/html_fast_text.h"
#include "io/html_tags.h"
#include "kindred/text.h"

namespace kindred::io {
namespace {

enum class Role : unsigned char { kBlock, kPhrasing, kSkipped, kBreak };

struct Roles {
  absl::flat_hash_set<std::string> phrasing, skipped;
  std::vector<Role> by_tag;  // for every GumboTag below GUMBO_TAG_UNKNOWN

  Roles() {
    for (absl::string_view name : absl::StrSplit(kPhrasingElements, ' ')) {
      phrasing.insert(std::string(name));
    }
    for (absl::string_view name : absl::StrSplit(kSkippedElements, ' ')) {
      skipped.insert(std::string(name));
    }
    for (int tag = 0; tag < GUMBO_TAG_UNKNOWN; ++tag) {
      by_tag.push_back(ByName(gumbo_normalized_tagname(static_cast<GumboTag>(tag))));
    }
  }
  Role ByName(absl::string_view name) const {
    if (name == "br") return Role::kBreak;
    if (skipped.contains(name)) return Role::kSkipped;
    if (phrasing.contains(name) || name.find('-') != absl::string_view::npos) {
      return Role::kPhrasing;
    }
    return Role::kBlock;
  }
};

const Roles& TheRoles() {
  static const Roles* roles = new Roles();
  return *roles;
}

Role RoleOf(const GumboElement& element) {
  const Roles& roles = TheRoles();
  if (element.tag < GUMBO_TAG_UNKNOWN) return roles.by_tag[element.tag];
  GumboStringPiece name = element.original_tag;
  if (name.data == nullptr || name.length == 0) return Role::kBlock;
  gumbo_tag_from_original_text(&name);
  return roles.ByName(absl::AsciiStrToLower(absl::string_view(name.data, name.length)));
}

// One step of the walk: a node to visit, or the end of an element whose
// closing line break is due.
struct Step {
  const GumboNode* node;
  bool closing;
};

void Walk(const GumboNode* root, std::string* out) {
  std::vector<Step> stack = {{root, false}};
  while (!stack.empty()) {
    const Step step = stack.back();
    stack.pop_back();
    if (step.closing) {
      out->push_back('\n');
      continue;
    }
    const GumboNode* node = step.node;
    switch (node->type) {
      case GUMBO_NODE_TEXT:
      case GUMBO_NODE_WHITESPACE:
      case GUMBO_NODE_CDATA:
        out->append(node->v.text.text);
        continue;
      case GUMBO_NODE_COMMENT:
      case GUMBO_NODE_TEMPLATE:
        continue;
      default:
        break;
    }
    const GumboVector* children =
        node->type == GUMBO_NODE_DOCUMENT ? &node->v.document.children : &node->v.element.children;
    if (node->type == GUMBO_NODE_ELEMENT) {
      const Role role = RoleOf(node->v.element);
      if (role == Role::kSkipped) continue;
      if (role == Role::kBreak) out->push_back('\n');
      if (role == Role::kBlock) {
        out->push_back('\n');
        stack.push_back({node, true});
      }
    }
    for (unsigned int i = children->length; i-- > 0;) {
      stack.push_back({static_cast<const GumboNode*>(children->data[i]), false});
    }
  }
}

std::atomic<uint64_t> fast_documents{0}, reference_documents{0};

}  // namespace

int OpenElementBound(absl::string_view html) {
  int open = 0, most = 0;
  size_t i = 0;
  char name[16];
  while ((i = html.find('<', i)) != absl::string_view::npos) {
    ++i;
    const bool end = i < html.size() && html[i] == '/';
    if (end) ++i;
    size_t j = i;
    while (j < html.size() && j - i < 16 && absl::ascii_isalnum(html[j])) {
      name[j - i] = absl::ascii_tolower(html[j]);
      ++j;
    }
    if (j == i) continue;
    if (j - i <= 14 &&
        (html_tags::Info(html_tags::LookUpTag(absl::string_view(name, j - i))).flags &
         html_tags::kNeverDeep)) {
      continue;
    }
    open = end ? std::max(0, open - 1) : open + 1;
    most = std::max(most, open);
  }
  return most;
}

bool NestsTooDeeply(absl::string_view html) {
  // Each element counted takes at least two bytes ("<a").
  return html.size() / 2 > static_cast<size_t>(kMaxOpenElements) &&
         OpenElementBound(html) > kMaxOpenElements;
}

absl::Status ReferenceHtmlToText(absl::string_view html, std::string* out) {
  out->clear();
  GumboOptions options = kGumboDefaultOptions;
  options.max_errors = 0;  // errors are not reported, only parsed around
  GumboOutput* output = gumbo_parse_with_options(&options, html.data(), html.size());
  if (output == nullptr) return absl::InternalError("the HTML parser failed");
  Walk(output->document, out);
  gumbo_destroy_output(&options, output);
  // The parser can turn an out-of-range numeric reference into bytes that
  // are not UTF-8; the text is repaired as every other text is.
  std::string repaired = RepairUtf8(*out);
  out->swap(repaired);
  return absl::OkStatus();
}

absl::Status HtmlToText(absl::string_view html, std::string* out, bool valid_utf8,
                        bool* by_reference) {
  out->clear();
  if (by_reference != nullptr) *by_reference = false;
  if (NestsTooDeeply(html)) {
    return absl::FailedPreconditionError(
        absl::StrCat("its tags could nest more than ", kMaxOpenElements,
                     " elements deep; not parsed (a parser-cost guard)"));
  }
  if (FastHtmlToText(html, out, nullptr, valid_utf8)) {
    fast_documents.fetch_add(1, std::memory_order_relaxed);
    return absl::OkStatus();
  }
  reference_documents.fetch_add(1, std::memory_order_relaxed);
  if (by_reference != nullptr) *by_reference = true;
  return ReferenceHtmlToText(html, out);
}

HtmlPathCounts HtmlTextPaths() {
  HtmlPathCounts counts;
  counts.fast = fast_documents.load(std::memory_order_relaxed);
  counts.reference = reference_documents.load(std::memory_order_relaxed);
  return counts;
}

}  // namespace kindred::io
