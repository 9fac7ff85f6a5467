// WriteKept: the second pass over the inputs that writes the kept documents.
#include "kindred/kept_writer.h"

#include <memory>
#include <optional>
#include <utility>

#include "absl/container/flat_hash_set.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "io/buffered_input.h"
#include "io/byte_stream.h"
#include "io/output_file.h"
#include "io/output_guard.h"
#include "io/tree_walker.h"
#include "io/warc_kept.h"
#include "io/warc_reader.h"
#include "kindred/errors.h"

namespace kindred {
namespace {

// The name a single text file (or text from standard input) gets in the copy
// directory.
std::string CopyName(const ResolvedInput& input) {
  if (input.is_stdin) return "stdin.txt";
  std::string path = io::StripTrailingSlashes(input.name);
  size_t slash = path.find_last_of('/');
  return slash == std::string::npos ? path : path.substr(slash + 1);
}

class KeptPass {
 public:
  explicit KeptPass(const KeptRequest& request) : request_(request) {}

  absl::StatusOr<KeptCounts> Run();

 private:
  absl::Status OpenOutputs(bool needs_lines, bool needs_text);
  absl::Status CopyLines(const std::string& path);
  absl::Status KeepText(const std::string& relative, const std::string& path);
  absl::Status CopyWarc(const std::string& path);
  // A file of a tree read by content: WARC files need the kept records' file.
  absl::StatusOr<bool> IsWarcFile(const std::string& path) const;
  absl::Status ReadInput(const ResolvedInput& input);
  absl::Status CommitOutputs();

  const KeptRequest& request_;
  KeptCounts counts_;
  std::unique_ptr<io::OutputFile> lines_;
  std::unique_ptr<io::OutputFile> path_list_;
  std::unique_ptr<io::CopyTree> copies_;
};

absl::Status KeptPass::OpenOutputs(bool needs_lines, bool needs_text) {
  const KeptOutput& output = request_.output;
  if (needs_lines && output.lines_path.empty()) {
    return InvalidRequest(
        "an input is JSON Lines, but no output file for its kept lines was given");
  }
  if (needs_text && output.copy_dir.empty() == output.path_list.empty()) {
    return InvalidRequest(
        "an input holds text documents: give either a copy directory or a path list for them");
  }
  if (needs_lines && needs_text && !output.path_list.empty()) {
    auto lines = io::ResolvePath(output.lines_path), list = io::ResolvePath(output.path_list);
    if (lines.ok() && list.ok() && *lines == *list) {
      return InvalidRequest("the kept lines and the path list name the same file");
    }
  }
  absl::Status checked = io::CheckOutputs(request_.inputs, output, needs_lines, needs_text);
  if (!checked.ok()) return checked;
  if (needs_lines) {
    auto file = io::OutputFile::Create(output.lines_path, request_.file_system);
    if (!file.ok()) return file.status();
    lines_ = std::move(*file);
  }
  if (needs_text && !output.path_list.empty()) {
    auto file = io::OutputFile::Create(output.path_list, request_.file_system);
    if (!file.ok()) return file.status();
    path_list_ = std::move(*file);
  }
  if (needs_text && !output.copy_dir.empty()) {
    auto tree = io::CopyTree::Create(output.copy_dir, request_.file_system);
    if (!tree.ok()) return tree.status();
    copies_ = std::move(*tree);
  }
  return absl::OkStatus();
}

// Copies the kept lines of one JSON Lines file verbatim. Blank lines make no
// document, exactly as in CorpusReader.
absl::Status KeptPass::CopyLines(const std::string& path) {
  io::DecodeOptions decode;
  decode.max_decompressed_bytes = request_.options.max_decompressed_bytes;
  decode.file_system = request_.options.file_system;
  auto stream = io::OpenDecoded(path, decode);
  if (!stream.ok()) return stream.status();
  io::BufferedInput input(std::move(*stream), path, request_.options.max_document_bytes);
  absl::string_view line;
  bool terminated = false;
  for (;;) {
    absl::StatusOr<bool> more = input.NextLine(&line, &terminated);
    if (!more.ok()) return more.status();
    if (!*more) return absl::OkStatus();
    if (io::IsBlankLine(line)) continue;
    if (!request_.keep(counts_.documents++)) continue;
    ++counts_.kept;
    absl::Status written = lines_->Append(line);
    if (written.ok()) written = lines_->Append("\n");
    if (!written.ok()) return written;
  }
}

absl::Status KeptPass::KeepText(const std::string& relative, const std::string& path) {
  if (!request_.keep(counts_.documents++)) return absl::OkStatus();
  ++counts_.kept;
  if (copies_ != nullptr) return copies_->Add(relative, path);
  if (path.find('\n') != std::string::npos) {
    return InvalidRequest(absl::StrCat("\"", path, "\": a path with a newline cannot be listed"));
  }
  absl::Status written = path_list_->Append(path);
  if (written.ok()) written = path_list_->Append("\n");
  return written;
}

absl::Status KeptPass::CopyWarc(const std::string& path) {
  if (lines_ == nullptr) {
    return InvalidRequest(absl::StrCat(
        path,
        ": a WARC file inside a directory read by content; give --input-format warc to "
        "write its kept records"));
  }
  io::WarcKeptCounts counts;
  absl::Status copied = io::CopyKeptRecords(path, request_.options, counts_.documents,
                                            request_.keep, lines_.get(), &counts);
  counts_.documents += counts.documents;
  counts_.kept += counts.kept;
  return copied;
}

absl::StatusOr<bool> KeptPass::IsWarcFile(const std::string& path) const {
  if (request_.options.format != InputFormat::kAuto) return false;
  io::DecodeOptions decode;
  decode.file_system = request_.options.file_system;
  auto stream = io::OpenDecoded(path, decode);
  if (!stream.ok()) return stream.status();
  return io::SniffWarc(&*stream);
}

absl::Status KeptPass::ReadInput(const ResolvedInput& input) {
  if (input.skipped) return absl::OkStatus();  // binary or unreadable: not a document
  if (input.format == InputFormat::kWarc && !input.is_directory) return CopyWarc(input.read_path);
  if (input.is_directory) {
    io::TreeWalker walker(input.read_path, request_.options.follow_links,
                          request_.options.file_system);
    const absl::flat_hash_set<std::string> skipped(input.skipped_files.begin(),
                                                   input.skipped_files.end());
    std::string relative, full;
    for (;;) {
      absl::StatusOr<bool> more = walker.Next(&relative, &full);
      if (!more.ok()) return more.status();
      if (!*more) return absl::OkStatus();
      if (skipped.contains(relative)) continue;
      absl::StatusOr<bool> warc = input.format == InputFormat::kWarc ? true : IsWarcFile(full);
      if (!warc.ok()) return warc.status();
      absl::Status done = *warc                                     ? CopyWarc(full)
                          : input.format == InputFormat::kJsonLines ? CopyLines(full)
                                                                    : KeepText(relative, full);
      if (!done.ok()) return done;
    }
  }
  if (input.format == InputFormat::kJsonLines) return CopyLines(input.read_path);
  if (input.is_stdin && copies_ == nullptr) {
    return InvalidRequest(
        "standard input holds a text document: it has no path to list; give a copy directory");
  }
  return KeepText(CopyName(input), input.read_path);
}

absl::Status KeptPass::CommitOutputs() {
  for (io::OutputFile* file : {lines_.get(), path_list_.get()}) {
    if (file == nullptr) continue;
    absl::Status committed = file->Commit();
    if (!committed.ok()) return committed;
  }
  return copies_ != nullptr ? copies_->Commit() : absl::OkStatus();
}

absl::StatusOr<KeptCounts> KeptPass::Run() {
  bool needs_lines = false, needs_text = false, needs_warc = false;
  for (const ResolvedInput& input : request_.inputs) {
    if (input.format == InputFormat::kAuto) {
      return WithKind(absl::FailedPreconditionError(absl::StrCat(
                          input.name, ": its format is not known yet; read it to the end first")),
                      ErrorKind::kInvalidRequest);
    }
    if (input.is_stdin && input.read_path.empty()) {
      return WithKind(absl::FailedPreconditionError(
                          "standard input was not copied while it was read, so it cannot be read "
                          "again"),
                      ErrorKind::kInvalidRequest);
    }
    if (input.format == InputFormat::kWarc) {
      needs_warc = true;
      continue;
    }
    (input.format == InputFormat::kJsonLines ? needs_lines : needs_text) = true;
  }
  if (needs_warc && needs_lines) {
    return InvalidRequest(
        "the inputs mix JSON Lines and WARC files: their kept documents cannot share one "
        "--write-kept file; sweep them separately");
  }
  if (needs_warc && request_.output.lines_path.empty()) {
    return InvalidRequest(
        "an input is a WARC file, but no output file (--write-kept) for its kept records was "
        "given");
  }
  needs_lines = needs_lines || needs_warc;  // the WARC records go to that file
  absl::Status status = OpenOutputs(needs_lines, needs_text);
  for (size_t i = 0; status.ok() && i < request_.inputs.size(); ++i) {
    status = ReadInput(request_.inputs[i]);
  }
  if (!status.ok()) return status;
  if (counts_.documents != request_.expected_documents) {
    return InputChanged(absl::StrFormat(
        "the inputs changed since they were read: %d documents now, %d before; nothing written",
        counts_.documents, request_.expected_documents));
  }
  status = CommitOutputs();
  if (!status.ok()) return status;
  return counts_;
}

}  // namespace

absl::StatusOr<KeptCounts> WriteKept(const KeptRequest& request) {
  if (!request.keep) return InvalidRequest("no keep predicate given");
  KeptPass pass(request);
  return pass.Run();
}

}  // namespace kindred
