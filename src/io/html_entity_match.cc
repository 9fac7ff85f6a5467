// MatchNamedReference: the longest named character reference at a position.
#include <algorithm>
#include <cstring>

#include "absl/strings/ascii.h"
#include "io/html_entities.h"

namespace kindred::io {
namespace {

// Longest name of the table, ';' included.
constexpr size_t kLongestName = 32;

const NamedReference* Find(absl::string_view name) {
  const NamedReference* begin = kNamedReferences;
  const NamedReference* end = kNamedReferences + kNamedReferenceCount;
  const NamedReference* it =
      std::lower_bound(begin, end, name, [](const NamedReference& ref, absl::string_view key) {
        return absl::string_view(ref.name, ref.length) < key;
      });
  if (it == end || absl::string_view(it->name, it->length) != name) return nullptr;
  return it;
}

}  // namespace

size_t MatchNamedReference(absl::string_view input, absl::string_view* value) {
  size_t run = 0;
  while (run < input.size() && run < kLongestName && absl::ascii_isalnum(input[run])) ++run;
  if (run == 0) return 0;
  if (run < input.size() && input[run] == ';') {
    if (const NamedReference* ref = Find(input.substr(0, run + 1))) {
      *value = absl::string_view(ref->utf8, ref->utf8_length);
      return run + 1;
    }
  }
  // Legacy names (no ';') are at most 6 letters long.
  for (size_t length = std::min<size_t>(run, 6); length >= 2; --length) {
    if (const NamedReference* ref = Find(input.substr(0, length))) {
      *value = absl::string_view(ref->utf8, ref->utf8_length);
      return length;
    }
  }
  return 0;
}

}  // namespace kindred::io
