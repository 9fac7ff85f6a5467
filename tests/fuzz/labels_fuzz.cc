// Fuzz target: the labels reader of `kindred tune` (JSON Lines, TSV or CSV
// with RFC 4180 quoting, decided by content) over arbitrary bytes.
//
// Input: the file's bytes. Besides crashes, it checks that every error starts
// with the file name, that parsed pairs never pair a document with itself,
// never repeat a pair, come in ascending line order, and resolve against a
// corpus made of their own ids.
#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <set>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "absl/strings/match.h"
#include "fuzz_util.h"
#include "kindred/labels.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  using kindred::fuzz::Require;
  constexpr std::string_view kName = "labels.tsv";
  const std::string_view content(reinterpret_cast<const char*>(data), size);
  auto pairs = kindred::ParseLabels(content, kName);
  if (!pairs.ok()) {
    Require(absl::StartsWith(pairs.status().message(), "labels.tsv"),
            "an error starts with the file name");
    return 0;
  }
  std::set<std::pair<std::string, std::string>> seen;
  std::vector<std::string> ids;
  uint64_t last_line = 0;
  for (const kindred::LabelledPair& pair : *pairs) {
    Require(pair.a != pair.b, "no pair of a document with itself");
    Require(seen.insert(std::minmax(pair.a, pair.b)).second, "no pair listed twice");
    Require(pair.line > last_line, "pairs in ascending line order");
    last_line = pair.line;
    ids.push_back(pair.a);
    ids.push_back(pair.b);
  }
  std::sort(ids.begin(), ids.end());
  ids.erase(std::unique(ids.begin(), ids.end()), ids.end());
  std::vector<std::string> warnings;
  auto resolved = kindred::ResolveLabels(*pairs, ids, kName, false, &warnings);
  Require(resolved.ok() && resolved->size() == pairs->size(), "own ids resolve");
  for (const kindred::ResolvedPair& pair : *resolved) {
    const kindred::LabelledPair& label = (*pairs)[pair.label];
    Require(ids[pair.a] == label.a && ids[pair.b] == label.b, "resolved to the right ids");
    Require(pair.duplicate == label.duplicate, "resolved label kept");
  }
  return 0;
}
