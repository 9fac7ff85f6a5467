// kindred: the document table, a record of the signing stage.
//
// One row per document, in first-seen order: its id, the facts the keep
// policies look at, where it was read, and the size of its shingle set (0:
// an empty document, never anyone's duplicate). Documents are numbered from
// `first_document`, so that the tables of consecutive shards, each signed
// alone, number their documents as one sweep over all of them would.
//
// The serialized form (SerializeDocumentTable) is documented in
// src/core/RECORDS.md: versioned, little-endian, checksummed, the same bytes
// for the same table. Plain data; thread-compatible.
#ifndef KINDRED_DOCUMENT_TABLE_H_
#define KINDRED_DOCUMENT_TABLE_H_

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/statusor.h"
#include "absl/types/span.h"
#include "kindred/corpus.h"
#include "kindred/groups.h"

namespace kindred {

// Where a document was read: enough to name it in a message and to find it
// again.
struct DocumentOrigin {
  uint32_t input = 0;                // index into the reader's input list (or shard number)
  uint64_t line = 0;                 // 1-based line for JSON Lines, 0 for whole files
  uint64_t offset = kUnknownOffset;  // DocumentSource::offset
  friend bool operator==(const DocumentOrigin&, const DocumentOrigin&) = default;
};

struct DocumentRecord {
  std::string id;
  KeepFacts facts;
  DocumentOrigin origin;
  uint32_t shingle_count = 0;  // size of the shingle set; 0 for an empty document
  friend bool operator==(const DocumentRecord&, const DocumentRecord&) = default;
};

struct DocumentTable {
  uint32_t first_document = 0;  // the number of documents[0] in the whole corpus
  std::vector<DocumentRecord> documents;
  friend bool operator==(const DocumentTable&, const DocumentTable&) = default;
};

std::string SerializeDocumentTable(const DocumentTable& table);
// Errors: BadInput (errors.h) naming what is wrong when `bytes` are not a
// whole, intact document table of a version this build reads.
absl::StatusOr<DocumentTable> ParseDocumentTable(std::string_view bytes);

// The tables of consecutive parts of one corpus joined into one: each must
// start where the one before ends. Errors: InvalidRequest for a gap or an
// overlap; BadInput for an id repeated across (or within) the tables, naming
// both documents' origins, as a sweep over the whole corpus rejects it.
absl::StatusOr<DocumentTable> JoinDocumentTables(std::vector<DocumentTable> parts);

}  // namespace kindred

#endif  // KINDRED_DOCUMENT_TABLE_H_
