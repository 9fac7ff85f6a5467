// The summary lines about WARC records that were not documents.
#ifndef KINDRED_CLI_RECORD_COUNTS_H_
#define KINDRED_CLI_RECORD_COUNTS_H_

#include "kindred/corpus.h"
#include "kindred/signed_corpus.h"

namespace kindred::cli {

// Prints "  not documents     reason: count, ..." to stderr when the
// reader met WARC records that were not documents; nothing otherwise.
void PrintRecordCounts(const CorpusReader& reader);

// Prints "  HTML pages        N, M of them by the reference parser ..." to
// stderr when signing met HTML pages of crawl archives; nothing otherwise.
void PrintHtmlPages(const SignStats& stats);

}  // namespace kindred::cli

#endif  // KINDRED_CLI_RECORD_COUNTS_H_
