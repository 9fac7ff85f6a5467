// CorpusReader: documents from each kind of source (JSON Lines, trees,
// WARC files, text files read whole).
#include <utility>

#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "io/binary_content.h"
#include "io/corpus_reader_impl.h"

namespace kindred {

// How every input is decoded: the limit on decompressed bytes, the count of
// raw bytes read, and standard input's private copy.
io::DecodeOptions CorpusReader::Impl::DecodeOptionsFor(const std::string& path) {
  io::DecodeOptions decode;
  decode.max_decompressed_bytes = options_.max_decompressed_bytes;
  decode.raw_bytes = &raw_bytes_;
  decode.file_system = options_.file_system;
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
    // A WARC file of a tree is not an input of its own: no offset there.
    const uint64_t at = record_.header.raw_offset;
    if (!tree_ && at != io::kNoRawOffset) doc->source.offset = at;
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

}  // namespace kindred
