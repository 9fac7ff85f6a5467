#include "cli/record_counts.h"

#include <cstdio>
#include <string>

#include "absl/strings/str_cat.h"

namespace kindred::cli {

void PrintRecordCounts(const CorpusReader& reader) {
  const std::map<std::string, uint64_t> counts = reader.RecordCounts();
  if (counts.empty()) return;
  std::string line;
  for (const auto& [reason, count] : counts) {
    absl::StrAppend(&line, line.empty() ? "" : ", ", reason, ": ", count);
  }
  std::fprintf(stderr, "  not documents     %s\n", line.c_str());
}

}  // namespace kindred::cli
