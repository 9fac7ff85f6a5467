// kindred: writing the filtered corpus (the kept documents) in the inputs'
// own format.
//
// WriteKept reads the inputs a second time, in the same order as
// CorpusReader, numbers their documents with the same ordinals, and writes
// those for which keep(ordinal) is true:
//   - documents of JSON Lines inputs: the kept lines verbatim (the original
//     bytes, decompressed, with their own "\n" or "\r\n"; a last line without
//     a newline gets "\n") into one file, KeptOutput::lines_path. The file is
//     gzip- or zstd-compressed when its name ends in ".gz" or ".zst"/".zstd".
//   - documents of text inputs (trees and single files): either copies, byte
//     for byte (compressed files stay compressed), under
//     KeptOutput::copy_dir, at their relative path for trees and under their
//     base name for single files ("stdin.txt" for text read from standard
//     input, written decompressed from its copy); or their file paths, one
//     per line, in KeptOutput::path_list.
// Outputs that no input needs are not created.
//
// Nothing is passed off as complete when it is not: each output file is
// written under a temporary name in its own directory, flushed with fsync and
// renamed into place only on success; the copy tree is built in a temporary
// sibling directory and renamed into place at the end. On failure the
// temporary files are removed and nothing appears at the output names.
//
// Safety: WriteKept never writes to an input. It refuses an output file that
// is an input file or lies inside an input tree, a copy directory that lies
// inside an input tree or holds one, a copy directory that exists and is not
// empty, and any relative path that is absolute or holds "." or "..".
//
// Standard input cannot be read twice: read it with
// InputOptions::stdin_copy_path set, and pass the reader's ResolvedInputs(),
// whose read_path names that copy.
//
// Thread-safety: WriteKept is a plain function; concurrent calls must use
// different outputs.
#ifndef KINDRED_KEPT_WRITER_H_
#define KINDRED_KEPT_WRITER_H_

#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "absl/status/statusor.h"
#include "kindred/corpus.h"
#include "kindred/file_io.h"

namespace kindred {

struct KeptOutput {
  // Output file for kept lines of JSON Lines inputs. Required when an input
  // is JSON Lines.
  std::string lines_path;
  // Output directory for copies of kept text documents. Created (with its
  // parents) if missing; must be empty if present.
  std::string copy_dir;
  // Output file listing the paths of kept text documents, one per line.
  // Exactly one of copy_dir and path_list is required when an input is text.
  std::string path_list;
};

struct KeptRequest {
  // The inputs as the reader resolved them (CorpusReader::ResolvedInputs()
  // after it returned end of input).
  std::vector<ResolvedInput> inputs;
  // The options the inputs were read with (limits and the JSON Lines layout).
  InputOptions options;
  // True for the ordinals to write. Called once per document, in order.
  std::function<bool(uint64_t ordinal)> keep;
  // The number of documents the reader returned
  // (CorpusReader::documents_read()). A different count on the second pass
  // means the inputs changed: InputChanged (kindred/errors.h), and nothing
  // is written.
  uint64_t expected_documents = 0;
  KeptOutput output;
  // Where the outputs are written (borrowed; tests inject faults here).
  FileSystem* file_system = DefaultFileSystem();
};

struct KeptCounts {
  uint64_t documents = 0;  // documents seen on the second pass
  uint64_t kept = 0;       // documents written (lines, copies or paths)
};

// Writes the kept documents as described above. Errors (kinds of
// kindred/errors.h): InvalidRequest for outputs that do not fit the inputs
// or a refused output (with the reason), InputChanged when the inputs
// changed, FailedPrecondition when they cannot be read again (standard
// input read without a copy, or a format still unknown), the reader's errors
// for the inputs, and DiskFull or WriteFailed for write failures.
absl::StatusOr<KeptCounts> WriteKept(const KeptRequest& request);

}  // namespace kindred

#endif  // KINDRED_KEPT_WRITER_H_
