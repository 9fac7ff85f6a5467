// CorpusReader: walks the inputs in order and turns them into documents.
// Opening each input is in corpus_start.cc, reading each kind of source in
// corpus_sources.cc; the reader's state is corpus_reader_impl.h.
#include <utility>

#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "io/corpus_reader_impl.h"
#include "kindred/errors.h"
#include "kindred/file_io.h"

namespace kindred {

namespace {

// JSON Lines by name: ".jsonl", ".ndjson" or ".json", before an optional
// ".gz", ".zst" or ".zstd".
bool HasJsonLinesName(absl::string_view path) {
  for (absl::string_view suffix : {".gz", ".zst", ".zstd"}) {
    if (absl::EndsWith(path, suffix)) {
      path.remove_suffix(suffix.size());
      break;
    }
  }
  return absl::EndsWith(path, ".jsonl") || absl::EndsWith(path, ".ndjson") ||
         absl::EndsWith(path, ".json");
}

absl::StatusOr<ResolvedInput> Resolve(const std::string& name, const InputOptions& options) {
  ResolvedInput input;
  input.name = name;
  input.read_path = name;
  if (name == "-") {
    input.is_stdin = true;
    input.read_path = options.stdin_copy_path;
    input.format = options.format;
    return input;
  }
  FileSystem* fs = options.file_system != nullptr ? options.file_system : DefaultFileSystem();
  absl::StatusOr<FileInfo> info = fs->Stat(name);
  if (!info.ok()) return info.status();
  input.is_directory = info->kind == FileKind::kDirectory;
  if (options.format != InputFormat::kAuto) {
    input.format = options.format;
  } else if (!input.is_directory && HasJsonLinesName(name)) {
    input.format = InputFormat::kJsonLines;
  } else {
    input.format = InputFormat::kText;
  }
  return input;
}

}  // namespace

absl::StatusOr<bool> CorpusReader::Impl::Next(Document* doc) {
  while (current_ < resolved_.size()) {
    if (warc_ != nullptr) {
      absl::StatusOr<bool> more = NextWarcDocument(doc);
      if (!more.ok() || *more) return more;
      warc_.reset();
      if (!tree_.has_value()) ++current_;
      continue;
    }
    if (lines_ != nullptr) {
      absl::StatusOr<bool> more = NextLineDocument(doc);
      if (!more.ok() || *more) return more;
      lines_.reset();
      if (!tree_.has_value()) ++current_;
      continue;
    }
    if (tree_.has_value()) {
      absl::StatusOr<bool> more = NextTreeDocument(doc);
      if (!more.ok() || *more) return more;
      if (lines_ == nullptr && warc_ == nullptr) {
        EndTree();
        ++current_;
      }
      continue;
    }
    absl::StatusOr<bool> produced = StartInput(doc);
    if (!produced.ok() || *produced) return produced;
  }
  return false;
}

namespace {
// Largest text buffer a batch slot keeps from one document to the next.
constexpr size_t kReusedTextBytes = 16 << 10;
}  // namespace

absl::StatusOr<size_t> CorpusReader::Impl::ReadBatch(std::vector<Document>* batch, size_t max_docs,
                                                     size_t max_bytes) {
  if (!failure_.ok()) return failure_;
  size_t count = 0, bytes = 0;
  while (count < max_docs && (count == 0 || bytes < max_bytes)) {
    if (batch->size() <= count) batch->emplace_back();
    Document& doc = (*batch)[count];
    // Reuse a slot's text buffer only when it is small: each slot would
    // otherwise keep the largest document it ever held, and a batch of
    // thousands of slots would hold far more than max_bytes.
    if (doc.text.capacity() > kReusedTextBytes) std::string().swap(doc.text);
    doc.unparsed = false;
    doc.unparsed_html = false;
    doc.html_page = doc.html_by_reference = false;
    absl::StatusOr<bool> more = Next(&doc);
    if (!more.ok()) {
      failure_ = more.status();
      batch->resize(count);
      return failure_;
    }
    if (!*more) break;
    doc.ordinal = ordinal_++;
    bytes += doc.text.size();
    ++count;
  }
  batch->resize(count);
  return count;
}

absl::StatusOr<std::unique_ptr<CorpusReader>> CorpusReader::Open(std::vector<std::string> inputs,
                                                                 InputOptions options) {
  if (inputs.empty()) return absl::InvalidArgumentError("no input given");
  std::vector<ResolvedInput> resolved;
  int stdin_count = 0;
  for (const std::string& name : inputs) {
    if (name == "-" && ++stdin_count > 1) {
      return absl::InvalidArgumentError("standard input (\"-\") is given more than once");
    }
    absl::StatusOr<ResolvedInput> input = Resolve(name, options);
    if (!input.ok()) return input.status();
    resolved.push_back(std::move(*input));
  }
  uint64_t total = 0;
  FileSystem* fs = options.file_system != nullptr ? options.file_system : DefaultFileSystem();
  for (const ResolvedInput& input : resolved) {
    absl::StatusOr<FileInfo> info = absl::NotFoundError("no file");
    if (!input.is_stdin && !input.is_directory) info = fs->Stat(input.name);
    if (!info.ok() || info->kind != FileKind::kFile) {
      total = 0;
      break;
    }
    total += info->size;
  }
  auto impl = std::make_unique<Impl>(std::move(inputs), std::move(options), std::move(resolved));
  impl->raw_total_ = total;
  return std::unique_ptr<CorpusReader>(new CorpusReader(std::move(impl)));
}

absl::StatusOr<std::unique_ptr<CorpusReader>> CorpusReader::Reopen(
    std::vector<ResolvedInput> inputs, InputOptions options) {
  std::vector<std::string> names;
  for (const ResolvedInput& input : inputs) {
    if (input.is_stdin && input.read_path.empty()) {
      return absl::FailedPreconditionError(
          "standard input cannot be read a second time: no copy of it was kept");
    }
    names.push_back(input.name);
  }
  auto impl = std::make_unique<Impl>(std::move(names), std::move(options), std::move(inputs));
  impl->reopened_ = true;
  return std::unique_ptr<CorpusReader>(new CorpusReader(std::move(impl)));
}

CorpusReader::CorpusReader(std::unique_ptr<Impl> impl) : impl_(std::move(impl)) {}
CorpusReader::~CorpusReader() = default;

absl::StatusOr<size_t> CorpusReader::ReadBatch(std::vector<Document>* batch, size_t max_docs,
                                               size_t max_bytes) {
  return impl_->ReadBatch(batch, max_docs, max_bytes);
}

void CorpusReader::DeferParsing() { impl_->defer_parsing_ = true; }

InputFormat CorpusReader::FormatOf(uint32_t input) const { return impl_->resolved_[input].format; }
const InputOptions& CorpusReader::options() const { return impl_->options_; }
void CorpusReader::SetFilter(std::function<bool(uint64_t ordinal)> wanted) {
  impl_->wanted_ = std::move(wanted);
}
const std::vector<std::string>& CorpusReader::inputs() const { return impl_->inputs_; }
std::vector<ResolvedInput> CorpusReader::ResolvedInputs() const { return impl_->resolved_; }
uint64_t CorpusReader::documents_read() const { return impl_->ordinal_; }
InputSkips CorpusReader::skips() const { return impl_->skips_; }
uint64_t CorpusReader::raw_bytes_read() const {
  return impl_->raw_bytes_.load(std::memory_order_relaxed);
}
uint64_t CorpusReader::raw_bytes_total() const { return impl_->raw_total_; }
std::map<std::string, uint64_t> CorpusReader::RecordCounts() const { return impl_->record_counts_; }

}  // namespace kindred
