// The summary lines about WARC records that were not documents.
#ifndef KINDRED_CLI_RECORD_COUNTS_H_
#define KINDRED_CLI_RECORD_COUNTS_H_

#include "kindred/corpus.h"

namespace kindred::cli {

// Prints "  not documents     reason: count, ..." to stderr when the
// reader met WARC records that were not documents; nothing otherwise.
void PrintRecordCounts(const CorpusReader& reader);

}  // namespace kindred::cli

#endif  // KINDRED_CLI_RECORD_COUNTS_H_
