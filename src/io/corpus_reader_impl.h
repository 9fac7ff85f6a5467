// CorpusReader::Impl, the state of a corpus reader, shared by the files
// that implement it: corpus_reader.cc (the inputs in order, batches, the
// public interface), corpus_start.cc (opening each input) and
// corpus_sources.cc (documents from JSON Lines, trees, WARC files and text
// files). Internal to the library.
#ifndef KINDRED_IO_CORPUS_READER_IMPL_H_
#define KINDRED_IO_CORPUS_READER_IMPL_H_

#include <atomic>
#include <functional>
#include <map>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "absl/container/flat_hash_set.h"
#include "absl/status/statusor.h"
#include "io/buffered_input.h"
#include "io/byte_stream.h"
#include "io/json_line.h"
#include "io/tree_walker.h"
#include "io/warc_documents.h"
#include "kindred/corpus.h"

namespace kindred {

class CorpusReader::Impl {
 public:
  Impl(std::vector<std::string> inputs, InputOptions options, std::vector<ResolvedInput> resolved)
      : inputs_(std::move(inputs)),
        options_(std::move(options)),
        resolved_(std::move(resolved)),
        json_(options_) {}

  absl::StatusOr<size_t> ReadBatch(std::vector<Document>* batch, size_t max_docs, size_t max_bytes);

  std::vector<std::string> inputs_;
  InputOptions options_;
  std::vector<ResolvedInput> resolved_;
  uint64_t ordinal_ = 0;
  bool reopened_ = false;  // read from read_path (see Reopen)
  std::atomic<uint64_t> raw_bytes_{0};
  uint64_t raw_total_ = 0;
  std::function<bool(uint64_t)> wanted_;
  InputSkips skips_;
  bool defer_parsing_ = false;

 private:
  absl::StatusOr<bool> Next(Document* doc);
  // False when the filter rejects the next document; its ordinal is then
  // used up.
  bool TakeNext() {
    if (!wanted_ || wanted_(ordinal_)) return true;
    ++ordinal_;
    return false;
  }
  // Where input `input` is read from.
  const std::string& PathOf(const ResolvedInput& input) const {
    return reopened_ ? input.read_path : input.name;
  }
  absl::StatusOr<bool> NextLineDocument(Document* doc);
  absl::StatusOr<bool> NextTreeDocument(Document* doc);
  // Reads the file at `path` as one text document; with the options, sets
  // *skip instead (counted, reported) for a binary or unreadable file.
  absl::Status ReadFileDocument(const std::string& path, Document* doc, bool* skip);
  absl::Status ReadTextOnly(const std::string& path, Document* doc);
  void EndTree();  // adds the tree's counts to skips_
  absl::StatusOr<bool> StartInput(Document* doc);
  // The parts of StartInput: an input read by content (*opened set, or
  // false when StartInput is done with it), a text file read whole, and a
  // stream that is JSON Lines or one text document.
  struct OpenedInput {
    absl::StatusOr<std::unique_ptr<io::BufferedInput>> input;
    io::Compression compression = io::Compression::kNone;
  };
  absl::StatusOr<bool> OpenSniffedInput(ResolvedInput& input, bool whole_file,
                                        OpenedInput* opened);
  absl::StatusOr<bool> ReadWholeInput(ResolvedInput& input, Document* doc);
  absl::StatusOr<bool> StartStream(ResolvedInput& input,
                                   std::unique_ptr<io::BufferedInput> opened,
                                   io::Compression compression, Document* doc);
  // `whole_input`: the file is an input of its own (not a file of a tree),
  // so that line offsets can find a line again (DocumentSource::offset).
  absl::Status OpenLines(const std::string& path, std::string name, bool whole_input);
  absl::Status ReadTextDocument(io::BufferedInput* input, Document* doc);
  io::DecodeOptions DecodeOptionsFor(const std::string& path);
  absl::StatusOr<std::unique_ptr<io::BufferedInput>> OpenBuffered(
      const std::string& path, io::Compression* compression = nullptr);
  // Opens `path` decoded; *warc says whether it is to be read as WARC: by
  // content with kAuto (when `sniff`), always with kWarc.
  absl::StatusOr<std::unique_ptr<io::ByteStream>> OpenSniffed(const std::string& path,
                                                              InputFormat format, bool* warc,
                                                              io::Compression* compression);
  absl::StatusOr<bool> NextWarcDocument(Document* doc);
  bool Sniffs(InputFormat format) const {
    return format == InputFormat::kWarc ||
           (options_.format == InputFormat::kAuto && format != InputFormat::kJsonLines);
  }

  io::JsonLineParser json_;
  size_t current_ = 0;                        // input being read
  std::optional<io::TreeWalker> tree_;        // set while reading a tree
  absl::flat_hash_set<std::string> skipped_here_;  // reopened: the tree's skipped files
  std::unique_ptr<io::BufferedInput> lines_;  // set while reading JSON Lines
  std::string lines_name_;                    // their name in ids and messages
  std::string lines_path_;                    // their path in DocumentSource
  std::string lines_display_;                 // their name in messages
  bool lines_offsets_ = false;                // their line offsets find lines again
  absl::Status failure_;
  std::unique_ptr<io::WarcDocuments> warc_;  // set while reading a WARC file
  std::string warc_path_;                    // its path in DocumentSource
  io::WarcRecord record_;                    // reused for every record

 public:
  std::map<std::string, uint64_t> record_counts_;
};

}  // namespace kindred

#endif  // KINDRED_IO_CORPUS_READER_IMPL_H_
