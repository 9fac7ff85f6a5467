// PrescanMeta: the encoding declared by a <meta> element near the start of
// an HTML document, following the "prescan a byte stream to determine its
// encoding" algorithm of the HTML standard (section 13.2.3.2) over the first
// 1,024 bytes.
#include <string>

#include "absl/strings/ascii.h"
#include "absl/strings/match.h"
#include "io/charset.h"

namespace kindred::io {
namespace {

bool IsSpace(char c) { return c == ' ' || c == '\t' || c == '\n' || c == '\f' || c == '\r'; }

// The "get an attribute" step: reads one attribute at *pos. False when the
// tag ends ('>') or the bytes run out.
bool GetAttribute(absl::string_view s, size_t* pos, std::string* name, std::string* value) {
  size_t i = *pos;
  while (i < s.size() && (IsSpace(s[i]) || s[i] == '/')) ++i;
  if (i >= s.size() || s[i] == '>') {
    *pos = i;
    return false;
  }
  name->clear();
  value->clear();
  while (i < s.size() && s[i] != '=' && s[i] != '/' && s[i] != '>' && !IsSpace(s[i])) {
    name->push_back(absl::ascii_tolower(s[i++]));
  }
  while (i < s.size() && IsSpace(s[i])) ++i;
  if (i >= s.size() || s[i] != '=') {
    *pos = i;
    return i < s.size();
  }
  ++i;
  while (i < s.size() && IsSpace(s[i])) ++i;
  if (i < s.size() && (s[i] == '"' || s[i] == '\'')) {
    const char quote = s[i++];
    while (i < s.size() && s[i] != quote) value->push_back(absl::ascii_tolower(s[i++]));
    if (i >= s.size()) return false;
    ++i;
  } else {
    while (i < s.size() && !IsSpace(s[i]) && s[i] != '>') {
      value->push_back(absl::ascii_tolower(s[i++]));
    }
  }
  *pos = i;
  return true;
}

// "Extracting a character encoding from a meta element" (the content
// attribute's "charset=" value).
std::string CharsetFromContent(absl::string_view content) {
  size_t i = 0;
  for (;;) {
    const size_t found = content.find("charset", i);
    if (found == absl::string_view::npos) return "";
    i = found + 7;
    while (i < content.size() && IsSpace(content[i])) ++i;
    if (i < content.size() && content[i] == '=') break;
  }
  ++i;
  while (i < content.size() && IsSpace(content[i])) ++i;
  if (i >= content.size()) return "";
  if (content[i] == '"' || content[i] == '\'') {
    const size_t end = content.find(content[i], i + 1);
    if (end == absl::string_view::npos) return "";
    return std::string(content.substr(i + 1, end - i - 1));
  }
  size_t end = i;
  while (end < content.size() && !IsSpace(content[end]) && content[end] != ';') ++end;
  return std::string(content.substr(i, end - i));
}

// A <meta> whose attributes start at *pos: the encoding it declares, or "".
std::string MetaEncoding(absl::string_view s, size_t* pos) {
  std::string name, value, charset;
  bool got_pragma = false, seen_http_equiv = false, seen_content = false, seen_charset = false;
  int need_pragma = 0;  // 0 null, 1 false, 2 true
  while (GetAttribute(s, pos, &name, &value)) {
    if (name == "http-equiv" && !seen_http_equiv) {
      seen_http_equiv = true;
      if (value == "content-type") got_pragma = true;
    } else if (name == "content" && !seen_content && charset.empty()) {
      seen_content = true;
      std::string found = EncodingForLabel(CharsetFromContent(value));
      if (!found.empty()) {
        charset = found;
        need_pragma = 2;
      }
    } else if (name == "charset" && !seen_charset) {
      seen_charset = true;
      charset = EncodingForLabel(value);
      need_pragma = 1;
    }
  }
  if (need_pragma == 0 || (need_pragma == 2 && !got_pragma) || charset.empty()) return "";
  if (charset == "UTF-16BE" || charset == "UTF-16LE") return "UTF-8";
  if (charset == "x-user-defined") return "windows-1252";
  return charset;
}

}  // namespace

std::string PrescanMeta(absl::string_view bytes) {
  const absl::string_view s = bytes.substr(0, 1024);
  size_t i = 0;
  std::string name, value;
  while (i < s.size()) {
    if (s[i] != '<') {
      ++i;
      continue;
    }
    absl::string_view rest = s.substr(i);
    if (absl::StartsWith(rest, "<!--")) {
      const size_t end = s.find("-->", i + 2);
      if (end == absl::string_view::npos) return "";
      i = end + 3;
    } else if (rest.size() >= 6 && absl::StartsWithIgnoreCase(rest, "<meta") &&
               (IsSpace(rest[5]) || rest[5] == '/')) {
      i += 6;
      std::string encoding = MetaEncoding(s, &i);
      if (!encoding.empty()) return encoding;
    } else if (rest.size() >= 2 &&
               (absl::ascii_isalpha(rest[1]) ||
                (rest[1] == '/' && rest.size() >= 3 && absl::ascii_isalpha(rest[2])))) {
      i += rest[1] == '/' ? 2 : 1;
      while (i < s.size() && !IsSpace(s[i]) && s[i] != '>') ++i;
      while (GetAttribute(s, &i, &name, &value)) {
      }
    } else if (absl::StartsWith(rest, "<!") || absl::StartsWith(rest, "</") ||
               absl::StartsWith(rest, "<?")) {
      const size_t end = s.find('>', i);
      if (end == absl::string_view::npos) return "";
      i = end + 1;
    } else {
      ++i;
    }
  }
  return "";
}

}  // namespace kindred::io
