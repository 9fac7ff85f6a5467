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

void PrintHtmlPages(const SignStats& stats) {
  if (stats.html_pages == 0) return;
  std::fprintf(stderr,
               "  HTML pages        %llu, %llu of them by the reference parser (the fast path "
               "declined them)\n",
               static_cast<unsigned long long>(stats.html_pages),
               static_cast<unsigned long long>(stats.html_reference_pages));
}

}  // namespace kindred::cli
