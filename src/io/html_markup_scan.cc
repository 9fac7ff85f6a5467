// The markup ends of the fast HTML5 tokenizer: attributes, comments, and
// the contents of raw text elements and scripts.
#include <cstring>

#include "absl/strings/match.h"
#include "io/html_scan.h"

namespace kindred::io::html_scan {

size_t SkipAttributes(absl::string_view html, size_t i, bool* self_closing) {
  const size_t n = html.size();
  *self_closing = false;
  for (;;) {
    while (i < n && IsSpace(html[i])) ++i;  // before attribute name
    if (i >= n) return kNotFound;
    if (html[i] == '>') return i + 1;
    if (html[i] == '/') {  // self-closing start tag state
      if (i + 1 >= n) return kNotFound;
      if (html[i + 1] == '>') {
        *self_closing = true;
        return i + 2;
      }
      ++i;
      continue;
    }
    ++i;  // the attribute name's first byte, whatever it is
    while (i < n && !IsSpace(html[i]) && html[i] != '/' && html[i] != '>' && html[i] != '=') ++i;
    while (i < n && IsSpace(html[i])) ++i;  // after attribute name
    if (i >= n) return kNotFound;
    if (html[i] != '=') continue;
    ++i;
    while (i < n && IsSpace(html[i])) ++i;  // before attribute value
    if (i >= n) return kNotFound;
    const char quote = html[i];
    if (quote == '"' || quote == '\'') {
      const size_t close = html.find(quote, i + 1);
      if (close == absl::string_view::npos) return kNotFound;
      i = close + 1;
    } else if (quote == '>') {
      return i + 1;
    } else {
      while (i < n && !IsSpace(html[i]) && html[i] != '>') ++i;
    }
  }
}

bool AttributeValue(absl::string_view html, absl::string_view wanted, absl::string_view* value) {
  const size_t n = html.size();
  size_t i = 0;
  for (;;) {
    while (i < n && (IsSpace(html[i]) || html[i] == '/')) ++i;
    if (i >= n || html[i] == '>') return false;
    const size_t name_start = i++;
    while (i < n && !IsSpace(html[i]) && html[i] != '/' && html[i] != '>' && html[i] != '=') ++i;
    const absl::string_view name = html.substr(name_start, i - name_start);
    while (i < n && IsSpace(html[i])) ++i;
    absl::string_view found;
    if (i < n && html[i] == '=') {
      ++i;
      while (i < n && IsSpace(html[i])) ++i;
      if (i < n && (html[i] == '"' || html[i] == '\'')) {
        const size_t close = html.find(html[i], i + 1);
        if (close == absl::string_view::npos) return false;
        found = html.substr(i + 1, close - i - 1);
        i = close + 1;
      } else {
        const size_t start = i;
        while (i < n && !IsSpace(html[i]) && html[i] != '>') ++i;
        found = html.substr(start, i - start);
      }
    }
    if (absl::EqualsIgnoreCase(name, wanted)) {
      *value = found;
      return true;
    }
  }
}

size_t CommentEnd(absl::string_view html, size_t i) {
  const size_t n = html.size();
  i += 4;                                                               // "<!--"
  if (i < n && html[i] == '>') return i + 1;                            // "<!-->"
  if (i + 1 < n && html[i] == '-' && html[i + 1] == '>') return i + 2;  // "<!--->"
  for (;;) {
    const size_t dashes = html.find("--", i);
    if (dashes == absl::string_view::npos) return n;
    size_t j = dashes + 2;
    while (j < n && html[j] == '-') ++j;
    if (j < n && html[j] == '>') return j + 1;
    if (j + 1 < n && html[j] == '!' && html[j + 1] == '>') return j + 2;
    if (j >= n) return n;
    i = j;
  }
}

namespace {

// Whether `html` at `i` ("</" already seen at i - 2) holds `name` followed
// by a byte that ends an end tag name.
bool AppropriateEndTag(absl::string_view html, size_t i, absl::string_view name) {
  if (i + name.size() >= html.size()) return false;
  if (!absl::EqualsIgnoreCase(html.substr(i, name.size()), name)) return false;
  const char after = html[i + name.size()];
  return IsSpace(after) || after == '/' || after == '>';
}

}  // namespace

size_t RawTextEnd(absl::string_view html, size_t i, absl::string_view name) {
  for (;;) {
    const size_t lt = html.find("</", i);
    if (lt == absl::string_view::npos) return kNotFound;
    if (AppropriateEndTag(html, lt + 2, name)) return lt;
    i = lt + 2;
  }
}

size_t ScriptDataEnd(absl::string_view html, size_t i) {
  enum { kPlain, kEscaped, kDoubleEscaped } state = kPlain;
  int dashes = 0;  // dashes just seen in the escaped states (at most 2 count)
  const size_t n = html.size();
  while (i < n) {
    if (state == kPlain) {
      const void* lt = std::memchr(html.data() + i, '<', n - i);
      if (lt == nullptr) return kNotFound;
      i = static_cast<const char*>(lt) - html.data() + 1;
      if (i < n && html[i] == '/') {
        if (AppropriateEndTag(html, i + 1, "script")) return i - 1;
      } else if (i + 2 < n && html[i] == '!' && html[i + 1] == '-' && html[i + 2] == '-') {
        state = kEscaped;  // "<!--": the escaped dash dash state
        dashes = 2;
        i += 3;
      }
      continue;
    }
    const char c = html[i++];
    if (c == '-') {
      dashes = dashes < 2 ? dashes + 1 : 2;
      continue;
    }
    if (c == '>' && dashes == 2) {
      state = kPlain;
      continue;
    }
    dashes = 0;
    if (c != '<') continue;
    if (i < n && html[i] == '/') {
      if (AppropriateEndTag(html, i + 1, "script")) {
        if (state == kEscaped) return i - 1;
        state = kEscaped;  // double escape end
        i += 1 + 6;
      }
    } else if (state == kEscaped && AppropriateEndTag(html, i, "script")) {
      state = kDoubleEscaped;  // double escape start
      i += 6;
    }
  }
  return kNotFound;
}

}  // namespace kindred::io::html_scan
