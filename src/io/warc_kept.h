// Internal: the kept records of WARC inputs, written as a WARC file.
//
// For each WARC input, every record is copied byte for byte as read
// (decoded: header, block and the two CRLFs), each as its own gzip member
// (or zstd frame) when the output is compressed, except:
//   - a document record whose ordinal the caller drops;
//   - a record that belongs to a dropped document: its WARC-Concurrent-To
//     or WARC-Refers-To names the document's WARC-Record-ID, or the
//     document's WARC-Concurrent-To names it (a WARC writer may link either
//     way: a response naming its request, or a metadata record naming its
//     response).
// warcinfo records are always kept. Which records are documents is decided
// exactly as on reading (io/warc_documents.h), so the ordinals match.
// Each input is read twice: once to find the dropped documents' record ids,
// once to copy.
//
// Not thread-safe.
#ifndef KINDRED_IO_WARC_KEPT_H_
#define KINDRED_IO_WARC_KEPT_H_

#include <cstdint>
#include <functional>
#include <string>

#include "absl/status/status.h"
#include "io/output_file.h"
#include "kindred/corpus.h"

namespace kindred::io {

struct WarcKeptCounts {
  uint64_t documents = 0;  // document records seen
  uint64_t kept = 0;       // document records written
  uint64_t records = 0;    // records written, of any kind
};

// Copies the kept records of the WARC file at `path` to `out`. `keep` is
// called once for each document record, in order, with the running
// ordinal `first_ordinal + n`.
absl::Status CopyKeptRecords(const std::string& path, const InputOptions& options,
                             uint64_t first_ordinal,
                             const std::function<bool(uint64_t ordinal)>& keep, OutputFile* out,
                             WarcKeptCounts* counts);

}  // namespace kindred::io

#endif  // KINDRED_IO_WARC_KEPT_H_
