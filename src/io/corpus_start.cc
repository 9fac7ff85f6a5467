// CorpusReader: opening each input in turn.
#include <utility>

#include "io/corpus_reader_impl.h"

namespace kindred {

// Opens input current_. Returns true when it produced a document (a text
// document is read whole at once).
absl::StatusOr<bool> CorpusReader::Impl::StartInput(Document* doc) {
  ResolvedInput& input = resolved_[current_];
  if (input.is_directory) {
    tree_.emplace(input.name, options_.follow_links, options_.file_system);
    skipped_here_.clear();
    if (reopened_) skipped_here_.insert(input.skipped_files.begin(), input.skipped_files.end());
    return false;
  }
  if (reopened_ && input.skipped) {
    ++current_;
    return false;
  }
  if (input.format == InputFormat::kJsonLines && (!input.is_stdin || reopened_)) {
    absl::Status opened = OpenLines(PathOf(input), input.name, true);
    if (!opened.ok()) return opened;
    return false;
  }
  const bool sniffs = Sniffs(input.format);
  if (input.format == InputFormat::kText && !sniffs && !TakeNext()) {
    ++current_;
    return false;
  }
  // A text file named alone is read whole by ReadFileDocument (binary and
  // unreadable files may be skipped); standard input and second readings
  // stream below.
  const bool whole_file = input.format == InputFormat::kText && !input.is_stdin && !reopened_;
  OpenedInput opened;
  if (sniffs) {
    absl::StatusOr<bool> more = OpenSniffedInput(input, whole_file, &opened);
    if (!more.ok() || !*more) return more;
  } else if (!whole_file) {
    opened.input = OpenBuffered(PathOf(input), &opened.compression);
  }
  if (whole_file) return ReadWholeInput(input, doc);
  if (!opened.input.ok()) return opened.input.status();
  return StartStream(input, *std::move(opened.input), opened.compression, doc);
}

absl::StatusOr<bool> CorpusReader::Impl::OpenSniffedInput(ResolvedInput& input, bool whole_file,
                                                          OpenedInput* opened) {
  bool warc = false;
  auto stream = OpenSniffed(PathOf(input), input.format, &warc, &opened->compression);
  if (!stream.ok()) {
    if (!(whole_file && options_.skip_unreadable)) return stream.status();
    opened->input = stream.status();
  } else if (warc) {
    input.format = InputFormat::kWarc;
    return false;  // the caller reads the records
  } else {
    opened->input = std::make_unique<io::BufferedInput>(
        std::move(*stream), io::DisplayName(PathOf(input)), options_.max_document_bytes);
  }
  if (input.format == InputFormat::kText && !TakeNext()) {
    ++current_;
    return false;
  }
  return true;
}

absl::StatusOr<bool> CorpusReader::Impl::ReadWholeInput(ResolvedInput& input, Document* doc) {
  bool skip = false;
  absl::Status read = ReadFileDocument(input.name, doc, &skip);
  if (!read.ok()) return read;
  input.skipped = skip;
  ++current_;
  if (skip) return false;
  doc->id = input.name;
  doc->source.input = static_cast<uint32_t>(current_ - 1);
  doc->source.path = input.name;
  return true;
}

absl::StatusOr<bool> CorpusReader::Impl::StartStream(ResolvedInput& input,
                                                     std::unique_ptr<io::BufferedInput> opened,
                                                     io::Compression compression, Document* doc) {
  if (input.format == InputFormat::kAuto) {
    absl::StatusOr<int> first = opened->PeekFirstNonBlank();
    if (!first.ok()) return first.status();
    input.format = *first == '{' ? InputFormat::kJsonLines : InputFormat::kText;
    if (input.format == InputFormat::kText && !TakeNext()) {
      ++current_;
      return false;
    }
  }
  if (input.format == InputFormat::kJsonLines) {
    lines_ = std::move(opened);
    // Standard input's copy holds the decompressed bytes: offsets hold there.
    lines_offsets_ = input.is_stdin || compression == io::Compression::kNone;
    lines_name_ = input.name;
    lines_path_ = input.name;
    lines_display_ = io::DisplayName(input.name);
    return false;
  }
  absl::Status read = ReadTextDocument(opened.get(), doc);
  if (!read.ok()) return read;
  doc->id = input.name;
  doc->source.input = static_cast<uint32_t>(current_);
  doc->source.path = input.name;
  ++current_;
  return true;
}

}  // namespace kindred
