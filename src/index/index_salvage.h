// Salvage: the readable documents of a damaged index file, and a list of
// what could not be read. Used by `audit --repair` to write a repaired copy;
// it never changes the damaged file.
#ifndef KINDRED_INDEX_INDEX_SALVAGE_H_
#define KINDRED_INDEX_INDEX_SALVAGE_H_

#include <string>
#include <string_view>
#include <vector>

#include "absl/status/status.h"
#include "kindred/index.h"
#include "kindred/signed_corpus.h"

namespace kindred::index {

struct Salvage {
  IndexSettings settings;
  SignedCorpus live{1};           // readable live documents, in index order
  std::vector<std::string> lost;  // what was not readable
};

// Reads every segment of `file` whose header, tables and commit record
// verify (scanning past damaged ones), keeps the documents whose shingle
// sets verify and that no readable segment retired, and lists the rest.
// DataLoss when the file header itself does not verify.
absl::Status SalvageIndex(std::string_view file, Salvage* out);

}  // namespace kindred::index

#endif  // KINDRED_INDEX_INDEX_SALVAGE_H_
