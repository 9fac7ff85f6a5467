// CorpusReader: walks the inputs in order and turns them into documents.
#include <sys/stat.h>

#include <atomic>
#include <cerrno>
#include <optional>
#include <utility>

#include "absl/container/flat_hash_set.h"
#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "io/binary_content.h"
#include "io/buffered_input.h"
#include "io/byte_stream.h"
#include "io/json_line.h"
#include "io/tree_walker.h"
#include "io/html_text.h"
#include "io/warc_documents.h"
#include "kindred/corpus.h"

namespace kindred {

const char* InputFormatName(InputFormat format) {
  switch (format) {
    case InputFormat::kText:
      return "text";
    case InputFormat::kJsonLines:
      return "jsonl";
    case InputFormat::kWarc:
      return "warc";
    default:
      return "auto";
  }
}

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
  struct stat info;
  if (stat(name.c_str(), &info) != 0) {
    return absl::ErrnoToStatus(errno, absl::StrCat(name, ": cannot open"));
  }
  input.is_directory = S_ISDIR(info.st_mode);
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

// How every input is decoded: the limit on decompressed bytes, the count of
// raw bytes read, and standard input's private copy.
io::DecodeOptions CorpusReader::Impl::DecodeOptionsFor(const std::string& path) {
  io::DecodeOptions decode;
  decode.max_decompressed_bytes = options_.max_decompressed_bytes;
  decode.raw_bytes = &raw_bytes_;
  if (path == "-") decode.copy_path = options_.stdin_copy_path;
  return decode;
}

absl::StatusOr<std::unique_ptr<io::ByteStream>> CorpusReader::Impl::OpenSniffed(
    const std::string& path, InputFormat format, bool* warc, io::Compression* compression) {
  auto stream = io::OpenDecoded(path, DecodeOptionsFor(path), compression);
  if (!stream.ok()) return stream.status();
  *warc = format == InputFormat::kWarc;
  if (!*warc && Sniffs(format)) {
    absl::StatusOr<bool> sniffed = io::SniffWarc(&*stream);
    if (!sniffed.ok()) return sniffed.status();
    *warc = *sniffed;
  }
  if (*warc) {
    warc_ = std::make_unique<io::WarcDocuments>(std::move(*stream), io::DisplayName(path), options_,
                                                &record_counts_);
    warc_path_ = path;
    return std::unique_ptr<io::ByteStream>();
  }
  return std::move(*stream);
}

absl::StatusOr<bool> CorpusReader::Impl::NextWarcDocument(Document* doc) {
  for (;;) {
    absl::StatusOr<bool> more = warc_->Next(&record_);
    if (!more.ok() || !*more) return more;
    if (!record_.role.document || !TakeNext()) continue;
    if (absl::Status made = warc_->MakeDocument(record_, doc, defer_parsing_); !made.ok()) {
      return made;
    }
    doc->source.input = static_cast<uint32_t>(current_);
    doc->source.path = warc_path_;
    return true;
  }
}

absl::StatusOr<std::unique_ptr<io::BufferedInput>> CorpusReader::Impl::OpenBuffered(
    const std::string& path, io::Compression* compression) {
  auto stream = io::OpenDecoded(path, DecodeOptionsFor(path), compression);
  if (!stream.ok()) return stream.status();
  return std::make_unique<io::BufferedInput>(std::move(*stream), io::DisplayName(path),
                                             options_.max_document_bytes);
}

absl::Status CorpusReader::Impl::OpenLines(const std::string& path, std::string name,
                                           bool whole_input) {
  io::Compression compression = io::Compression::kNone;
  auto opened = OpenBuffered(path, &compression);
  if (!opened.ok()) return opened.status();
  lines_ = std::move(*opened);
  lines_offsets_ = whole_input && compression == io::Compression::kNone;
  lines_name_ = std::move(name);
  lines_path_ = path;
  lines_display_ = io::DisplayName(path);
  return absl::OkStatus();
}

absl::Status CorpusReader::Impl::ReadTextDocument(io::BufferedInput* input, Document* doc) {
  doc->source.line = 0;
  doc->source.offset = kUnknownOffset;
  doc->priority = 0;
  doc->has_priority = false;
  doc->invalid_utf8 = 0;
  return input->ReadRest(&doc->text);
}

absl::StatusOr<bool> CorpusReader::Impl::NextLineDocument(Document* doc) {
  absl::string_view line;
  bool terminated = false;
  for (;;) {
    absl::StatusOr<bool> more = lines_->NextLine(&line, &terminated);
    if (!more.ok() || !*more) return more;
    if (!io::IsBlankLine(line) && TakeNext()) break;
  }
  const uint64_t number = lines_->line_number();
  if (defer_parsing_) {
    io::AssignReusing(line, &doc->text);
    doc->id.clear();
    doc->unparsed = true;
  } else {
    absl::Status parsed = json_.Parse(line, lines_display_, number, doc);
    if (!parsed.ok()) return parsed;
    if (options_.ids_with_path && options_.id_field != io::kLineNumberId) {
      doc->id.insert(0, absl::StrCat(lines_name_, ":"));
    }
  }
  if (options_.id_field == io::kLineNumberId) doc->id = absl::StrCat(lines_name_, ":", number);
  doc->source.input = static_cast<uint32_t>(current_);
  doc->source.line = number;
  doc->source.offset = lines_offsets_ ? lines_->line_offset() : kUnknownOffset;
  doc->source.path = lines_path_;
  return true;
}

absl::Status CorpusReader::Impl::ReadFileDocument(const std::string& path, Document* doc,
                                                   bool* skip) {
  *skip = false;
  std::string why;
  auto input = OpenBuffered(path);
  absl::Status read = input.ok() ? ReadTextDocument(input->get(), doc) : input.status();
  if (!read.ok()) {
    if (!options_.skip_unreadable) return read;
    ++skips_.unreadable;
    why = std::string(read.message());
    const std::string named = absl::StrCat(path, ": ");  // the path is said once
    if (absl::StartsWith(why, named)) why.erase(0, named.size());
  } else if (!options_.include_binary && io::LooksBinary(doc->text, &why)) {
    ++skips_.binary;
  } else {
    return absl::OkStatus();
  }
  *skip = true;
  if (options_.on_skip) options_.on_skip(path, why);
  return absl::OkStatus();
}

absl::StatusOr<bool> CorpusReader::Impl::NextTreeDocument(Document* doc) {
  std::string relative, full;
  ResolvedInput& resolved = resolved_[current_];
  for (;;) {
    absl::StatusOr<bool> more = tree_->Next(&relative, &full);
    if (!more.ok() || !*more) return more;
    if (resolved.format == InputFormat::kJsonLines) {
      absl::Status opened = OpenLines(full, full, false);
      if (!opened.ok()) return opened;
      return false;  // the caller reads the lines
    }
    if (Sniffs(resolved.format)) {
      bool warc = false;
      auto stream = OpenSniffed(full, resolved.format, &warc, nullptr);
      // An unreadable file is skipped below when --skip-unreadable asks for it.
      if (!stream.ok() && !options_.skip_unreadable) return stream.status();
      if (stream.ok() && warc) return false;  // the caller reads the records
    }
    if (reopened_ && skipped_here_.contains(relative)) continue;
    if (!TakeNext()) continue;
    bool skip = false;
    absl::Status read = reopened_ ? ReadTextOnly(full, doc) : ReadFileDocument(full, doc, &skip);
    if (!read.ok()) return read;
    if (!skip) break;
    resolved.skipped_files.push_back(std::move(relative));
  }
  doc->id = options_.ids_with_path ? full : std::move(relative);
  doc->source.input = static_cast<uint32_t>(current_);
  doc->source.path = std::move(full);
  return true;
}

absl::Status CorpusReader::Impl::ReadTextOnly(const std::string& path, Document* doc) {
  auto input = OpenBuffered(path);
  if (!input.ok()) return input.status();
  return ReadTextDocument(input->get(), doc);
}

void CorpusReader::Impl::EndTree() {
  skips_.links += tree_->counts().links;
  skips_.broken_links += tree_->counts().broken_links;
  skips_.repeated_directories += tree_->counts().repeated_directories;
  skips_.fifos += tree_->counts().fifos;
  skips_.sockets += tree_->counts().sockets;
  skips_.devices += tree_->counts().devices;
  tree_.reset();
}

// Opens input current_. Returns true when it produced a document (a text
// document is read whole at once).
absl::StatusOr<bool> CorpusReader::Impl::StartInput(Document* doc) {
  ResolvedInput& input = resolved_[current_];
  if (input.is_directory) {
    tree_.emplace(input.name, options_.follow_links);
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
  io::Compression compression = io::Compression::kNone;
  absl::StatusOr<std::unique_ptr<io::BufferedInput>> opened;
  if (sniffs) {
    bool warc = false;
    auto stream = OpenSniffed(PathOf(input), input.format, &warc, &compression);
    if (!stream.ok()) {
      if (!(whole_file && options_.skip_unreadable)) return stream.status();
      opened = stream.status();
    } else if (warc) {
      input.format = InputFormat::kWarc;
      return false;  // the caller reads the records
    } else {
      opened = std::make_unique<io::BufferedInput>(
          std::move(*stream), io::DisplayName(PathOf(input)), options_.max_document_bytes);
    }
    if (input.format == InputFormat::kText && !TakeNext()) {
      ++current_;
      return false;
    }
  } else if (!whole_file) {
    opened = OpenBuffered(PathOf(input), &compression);
  }
  if (whole_file) {
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
  if (!opened.ok()) return opened.status();
  if (input.format == InputFormat::kAuto) {
    absl::StatusOr<int> first = (*opened)->PeekFirstNonBlank();
    if (!first.ok()) return first.status();
    input.format = *first == '{' ? InputFormat::kJsonLines : InputFormat::kText;
    if (input.format == InputFormat::kText && !TakeNext()) {
      ++current_;
      return false;
    }
  }
  if (input.format == InputFormat::kJsonLines) {
    lines_ = std::move(*opened);
    // Standard input's copy holds the decompressed bytes: offsets hold there.
    lines_offsets_ = input.is_stdin || compression == io::Compression::kNone;
    lines_name_ = input.name;
    lines_path_ = input.name;
    lines_display_ = io::DisplayName(input.name);
    return false;
  }
  absl::Status read = ReadTextDocument(opened->get(), doc);
  if (!read.ok()) return read;
  doc->id = input.name;
  doc->source.input = static_cast<uint32_t>(current_);
  doc->source.path = input.name;
  ++current_;
  return true;
}

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
  for (const ResolvedInput& input : resolved) {
    struct stat info;
    if (input.is_stdin || input.is_directory || stat(input.name.c_str(), &info) != 0 ||
        !S_ISREG(info.st_mode)) {
      total = 0;
      break;
    }
    total += static_cast<uint64_t>(info.st_size);
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

class LineParser::Impl {
 public:
  explicit Impl(const InputOptions& options)
      : json(options),
        ids_with_path(options.ids_with_path && options.id_field != io::kLineNumberId),
        stdin_copy_path(options.stdin_copy_path) {}
  io::JsonLineParser json;
  bool ids_with_path;
  std::string stdin_copy_path;
  std::string line;  // the raw line, swapped out of the document
};

LineParser::LineParser(const InputOptions& options) : impl_(std::make_unique<Impl>(options)) {}
LineParser::~LineParser() = default;

absl::Status LineParser::Finish(Document* doc) {
  if (!doc->unparsed) return absl::OkStatus();
  if (doc->unparsed_html) {
    impl_->line.swap(doc->text);
    doc->unparsed = doc->unparsed_html = false;
    absl::Status made = io::HtmlToText(impl_->line, &doc->text, /*valid_utf8=*/true);
    if (!made.ok()) {
      return absl::Status(made.code(), absl::StrCat(io::DisplayName(doc->source.path), ": ",
                                                    doc->id, ": ", made.message()));
    }
    return absl::OkStatus();
  }
  // The raw line moves to this parser's buffer and the document's buffer
  // receives the text: both are reused, nothing is allocated per line.
  impl_->line.swap(doc->text);
  doc->unparsed = false;
  const std::string& path = doc->source.path;
  // As io::DisplayName, without a copy of the path for every line.
  const absl::string_view display = path == "-" ? "standard input" : absl::string_view(path);
  absl::Status parsed = impl_->json.Parse(impl_->line, display, doc->source.line, doc);
  if (parsed.ok() && impl_->ids_with_path) {
    // Standard input read again from its copy keeps the name "-".
    const bool copy = !impl_->stdin_copy_path.empty() && path == impl_->stdin_copy_path;
    doc->id.insert(0, absl::StrCat(copy ? absl::string_view("-") : absl::string_view(path), ":"));
  }
  return parsed;
}

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
std::map<std::string, uint64_t> CorpusReader::RecordCounts() const {
  return impl_->record_counts_;
}

}  // namespace kindred
