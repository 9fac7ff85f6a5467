// kindred: reading a corpus of documents from files, directory trees and
// standard input.
//
// A corpus is a list of inputs, read in order. Each input is one of:
//   - a directory tree: every regular file under it is one document whose id
//     is its path relative to the root, '/'-separated. Files are visited in
//     byte-wise sorted order of that relative path, so the stream is the same
//     on every run. Symbolic links (to files or to directories) and special
//     files are skipped and counted (InputSkips); InputOptions::follow_links
//     follows links (each directory walked once). With
//     InputFormat::kJsonLines every file of the tree is read as JSON Lines
//     instead.
//
// Binary files: a file read as one text document (a file of a tree, or a
// text file given alone; not standard input, not JSON Lines, whose texts are
// JSON strings) whose first 8 KiB, decompressed, hold a NUL byte or more
// than 10% of bytes in ill-formed UTF-8 sequences (an incomplete sequence
// cut at 8 KiB does not count) is binary: skipped and counted, unless
// InputOptions::include_binary.
//
// Unreadable files: with InputOptions::skip_unreadable, a file read as one
// text document that cannot be read to its end (cannot be opened, an I/O
// error, truncated or corrupt compressed data, over a size limit) is skipped
// and counted instead of failing. Its text is read whole before it becomes a
// document, so a skipped file never half-enters the results. JSON Lines
// files are not skipped: the lines before a fault are documents already.
// Skipped files use up no ordinal, and a reader made by Reopen skips the
// same files (ResolvedInput::skipped_files) without reading them.
//   - a JSON Lines file: one JSON object per line. The id field (a string or
//     an integer, rendered in decimal), the text field (a string) and an
//     optional numeric priority field are named by InputOptions. A line that
//     is empty or holds only whitespace is skipped and makes no document.
//     Lines may end in "\n" or "\r\n"; the last line may lack its newline.
//   - a plain text file: one document, id = the path as given.
//   - standard input, named "-": JSON Lines when its first non-whitespace
//     byte is '{', else one text document with id "-".
// Any file (and standard input) may be compressed with gzip (several members
// allowed) or zstd (several frames allowed); compression is detected from the
// first bytes, never from the name, and decompressed as a stream.
//
// WARC inputs: a file (or standard input, or a file of a tree) whose
// decoded bytes start with "WARC/1." is a WARC 1.0 or 1.1 crawl archive
// (ISO 28500), plain, gzip-compressed record by record or as a whole, or
// zstd-compressed; InputFormat::kWarc forces it. Its documents are
// response, resource and conversion records with HTML or plain text
// payloads, turned into UTF-8 text (HTML by the definition of the README,
// "Text of HTML pages"); ids are their WARC-Target-URI (or WARC-Record-ID,
// WarcOptions). Other records are counted (RecordCounts) and skipped. See
// src/io/warc_documents.h for the exact rules. Errors name the file and
// the record's byte offset in the decoded stream.
//
// With InputFormat::kAuto a directory is a tree of text documents; a file
// whose name, after stripping ".gz", ".zst" or ".zstd", ends in ".jsonl",
// ".ndjson" or ".json" is JSON Lines; any other file is one text document.
// kText or kJsonLines force the format of every input.
//
// Document text is the raw bytes as stored (decompressed): it may hold
// invalid UTF-8 or NUL bytes; decoding is the text module's job. Text from a
// JSON string is unescaped. A JSON line with invalid UTF-8 (which RFC 8259
// does not allow) is read with every ill-formed sequence replaced by U+FFFD
// (counted in Document::invalid_utf8) before parsing, so a crawled line with
// a broken byte is read, not rejected.
//
// Memory stays bounded: besides the batch, a reader holds one document or
// line (at most max_document_bytes, in a buffer at most about twice that)
// and fixed-size read buffers (256 KiB each). The limit applies to the line
// as read: the text of a line with invalid UTF-8 can be longer, by at most
// 2 bytes per replacement (one invalid byte becomes the 3 bytes of U+FFFD),
// so at most three times the limit.
//
// Errors name the input and line (or the document): "corpus.jsonl:17:
// missing field \"text\"", "corpus.jsonl.gz: truncated gzip stream after
// 81920 bytes". Codes: NotFound for a missing input; InvalidArgument for
// malformed JSON, missing fields, fields of the wrong type and truncated or
// corrupt compressed data; ResourceExhausted for a document, line or
// decompressed size over its limit; the errno's code for other I/O failures.
// Duplicate ids are not detected here.
//
// Thread-safety: a CorpusReader is single-threaded (thread-compatible); the
// caller hands the documents of each batch to worker threads.
#ifndef KINDRED_CORPUS_H_
#define KINDRED_CORPUS_H_

#include <cstddef>
#include <cstdint>
#include <functional>
#include <map>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"

namespace kindred {

class FileSystem;  // kindred/file_io.h

enum class InputFormat : uint8_t {
  kAuto,       // decided per input, as described above
  kText,       // a file (or each file of a tree) is one document
  kJsonLines,  // a file (or each file of a tree) holds one document per line
  kWarc,       // a file (or each file of a tree) is a WARC crawl archive
};

// "auto", "text", "jsonl", "warc".
const char* InputFormatName(InputFormat format);
// The inverse of InputFormatName; an unknown name is InvalidArgument
// "input-format: expected auto, text, jsonl or warc, not \"x\"".
absl::StatusOr<InputFormat> ParseInputFormat(std::string_view name);

// Which header field of a WARC record gives a document its id.
enum class WarcIdSource : uint8_t {
  kUri,       // WARC-Target-URI
  kRecordId,  // WARC-Record-ID
};

// "uri", "record-id".
const char* WarcIdSourceName(WarcIdSource source);
// The inverse of WarcIdSourceName; an unknown name is InvalidArgument
// "warc-id: expected uri or record-id, not \"x\"".
absl::StatusOr<WarcIdSource> ParseWarcIdSource(std::string_view name);

// How WARC crawl archives are read (see "WARC inputs" above).
struct WarcOptions {
  // The field ids come from; a record without it uses the other one.
  WarcIdSource id_source = WarcIdSource::kUri;
  // HTTP responses of any status are documents, not only 2xx.
  bool any_status = false;
  // A payload digest mismatch or a record over the size limit is an error
  // (InvalidArgument / ResourceExhausted) instead of being counted.
  bool strict = false;
};

struct InputOptions {
  // Format of every input; kAuto decides per input.
  InputFormat format = InputFormat::kAuto;
  // JSON Lines field holding the id: a string or an integer. The special
  // value "@line" makes the id "<input name>:<line number>" instead (for a
  // tree read as JSON Lines, "<file path>:<line number>").
  std::string id_field = "id";
  // Ids that name their file, so that inputs with the same relative paths
  // or ids (two mirrors) can be read together: a file of a tree gets its
  // path as read (the tree as given, "/", the relative path) instead of the
  // relative path, and a JSON line "<file path>:<id>" (a file of a tree by
  // its path as read). Ids of "@line" and of text files given alone (their
  // path already) do not change.
  bool ids_with_path = false;
  // Trees: follow symbolic links (see the top of this file).
  bool follow_links = false;
  // Read binary files as text too (see the top of this file).
  bool include_binary = false;
  // Skip files that cannot be read instead of failing (see the top).
  bool skip_unreadable = false;
  // Called for each file skipped as binary or unreadable (its path as read,
  // and why), on the reading thread. May be empty.
  std::function<void(const std::string& path, const std::string& why)> on_skip;
  // JSON Lines field holding the text: a string.
  std::string text_field = "text";
  // JSON Lines field holding a numeric priority (for the keep policy).
  // Empty: none. A line without the field has no priority.
  std::string priority_field;
  // Largest document (text file) or JSON line, in bytes. Default 64 MiB.
  // Larger is a ResourceExhausted error naming the file and line. Memory is
  // about this much plus the read buffer.
  uint64_t max_document_bytes = 64ull << 20;
  // Largest decompressed size of one compressed file or stream, in bytes;
  // 0 = unlimited. Guards against decompression bombs.
  uint64_t max_decompressed_bytes = 0;
  // When not empty, the decompressed bytes read from standard input are also
  // written to this file (created or truncated, mode 0600; a symbolic link
  // at the path is an error, never followed), so that a second
  // pass (WriteKept) can read them again. The caller chooses the path and
  // removes the file when done.
  std::string stdin_copy_path;
  WarcOptions warc;
  // The file system every input file and tree is read through (standard
  // input excepted), by the reader and by whatever reads the inputs again
  // (Reopen, the second reading of a sweep, WriteKept); null:
  // DefaultFileSystem(). Borrowed: it must outlive every reader.
  FileSystem* file_system = nullptr;
};

// DocumentSource::offset when the line cannot be found again by its offset.
inline constexpr uint64_t kUnknownOffset = ~uint64_t{0};

// Where a document came from: enough to name it in messages and to find it
// again.
struct DocumentSource {
  uint32_t input = 0;  // index into the reader's input list
  uint64_t line = 0;   // 1-based line for JSON Lines, 0 otherwise
  // JSON Lines: where the line starts in the input's read_path (see
  // ResolvedInput), for an input that is an uncompressed file or standard
  // input. WARC files given as inputs: where the document's record starts
  // in read_path, or its gzip member when the record has one of its own
  // (else unknown: zstd, several records in one member). Else
  // kUnknownOffset (other compressed files, files of a tree, text
  // documents).
  uint64_t offset = kUnknownOffset;
  std::string path;  // the file read: for trees, the full path of the file;
                     // "-" for standard input
};

struct Document {
  std::string id;
  // Raw bytes as read (text files) or the unescaped JSON string. May be
  // invalid UTF-8.
  std::string text;
  double priority = 0;
  bool has_priority = false;
  // JSON Lines: ill-formed UTF-8 sequences of the raw line, replaced by
  // U+FFFD before parsing (text files keep their bytes; the text module
  // replaces and counts them there).
  uint32_t invalid_utf8 = 0;
  DocumentSource source;
  // 0-based position in the whole stream of all inputs ("first seen" order).
  uint64_t ordinal = 0;
  // True when a reader that defers parsing (CorpusReader::DeferParsing) left
  // this JSON line unparsed: `text` holds the raw line, `id` is empty (or
  // "<input>:<line>" with the id field "@line"), the other fields unset.
  // LineParser::Finish makes it an ordinary document.
  bool unparsed = false;
  // With `unparsed`: `text` holds an HTML page of a crawl archive (WARC),
  // already converted to UTF-8 and within the nesting guard, whose text is
  // still to be extracted; LineParser::Finish extracts it.
  bool unparsed_html = false;
  // The text is (or, with unparsed_html, will be) that of an HTML page of
  // a crawl archive; and it was extracted by the reference HTML parser,
  // the fast path having declined the page (io/html_text.h).
  bool html_page = false;
  bool html_by_reference = false;
};

// What a reader skipped, so far.
struct InputSkips {
  uint64_t links = 0;                 // symbolic links not followed
  uint64_t broken_links = 0;          // followed links that lead nowhere
  uint64_t repeated_directories = 0;  // directories reached again by a link
  uint64_t fifos = 0, sockets = 0, devices = 0;  // special files in trees
  uint64_t binary = 0;      // binary files
  uint64_t unreadable = 0;  // files skipped by skip_unreadable
};

// An input as the reader resolved it: what it is and how to read it again.
struct ResolvedInput {
  std::string name;       // as given; "-" for standard input
  std::string read_path;  // where its bytes can be read again: the name, or
                          // for standard input InputOptions::stdin_copy_path
                          // ("" when no copy was asked for)
  bool is_directory = false;
  bool is_stdin = false;
  // kText or kJsonLines once known; kAuto for standard input before its
  // first byte was read.
  InputFormat format = InputFormat::kAuto;
  // Files skipped as binary or unreadable: for a tree their relative paths,
  // in the order read; for a file given alone, `skipped`.
  std::vector<std::string> skipped_files;
  bool skipped = false;
};

// Reads documents from a list of inputs, in order, in batches.
//
// Call order: Open, then ReadBatch until it returns 0 (end of all inputs) or
// an error. After an error every later ReadBatch returns the same error.
class CorpusReader {
 public:
  // Checks that every input exists (NotFound otherwise; "-" is standard
  // input, allowed once) and resolves the format of every file and tree.
  // Requires a non-empty input list.
  static absl::StatusOr<std::unique_ptr<CorpusReader>> Open(std::vector<std::string> inputs,
                                                            InputOptions options);
  // Reads the inputs of an earlier reader again, from their read_path, with
  // the same documents, ids and ordinals. `inputs` is that reader's
  // ResolvedInputs() once it reached the end, `options` its options().
  // Standard input is read from its copy (InputOptions::stdin_copy_path):
  // FailedPrecondition when none was kept.
  static absl::StatusOr<std::unique_ptr<CorpusReader>> Reopen(std::vector<ResolvedInput> inputs,
                                                              InputOptions options);
  ~CorpusReader();
  CorpusReader(const CorpusReader&) = delete;
  CorpusReader& operator=(const CorpusReader&) = delete;

  // Replaces *batch with the next documents: up to max_docs documents, and
  // stops early once their texts total max_bytes or more (a batch holds at
  // least one document). Returns the number read; 0 means end of all inputs.
  // Requires max_docs >= 1. Strings already in *batch are reused (text
  // buffers only up to 16 KiB, so that a batch never keeps the largest
  // document each of its slots once held).
  absl::StatusOr<size_t> ReadBatch(std::vector<Document>* batch, size_t max_docs, size_t max_bytes);

  // Resolved format of input `input` (kAuto for standard input before it
  // was first read). Requires input < inputs().size().
  InputFormat FormatOf(uint32_t input) const;
  const InputOptions& options() const;
  // Makes every later ReadBatch leave JSON lines unparsed, and the text of
  // the HTML pages of crawl archives unextracted (see Document::unparsed):
  // the reader only finds lines and records, so that the parsing can run on
  // worker threads, each with a LineParser. A malformed line is
  // then reported by LineParser::Finish, not by ReadBatch, which reads on.
  void DeferParsing();
  // Makes ReadBatch skip every document whose ordinal `wanted` rejects
  // without reading or parsing it (a JSON line is only found, a file of a
  // tree not opened): its ordinal is used up but it is not returned, and
  // errors it would have caused go unseen. Call before the first ReadBatch.
  void SetFilter(std::function<bool(uint64_t ordinal)> wanted);
  const std::vector<std::string>& inputs() const;
  // Every input as resolved so far; complete once ReadBatch returned 0.
  std::vector<ResolvedInput> ResolvedInputs() const;
  // Documents returned so far.
  uint64_t documents_read() const;
  // Files and tree entries skipped so far (by the first reading; a reader
  // made by Reopen counts only links and special files again).
  InputSkips skips() const;
  // Raw bytes read so far from the inputs' files (compressed bytes for
  // compressed files), and the total size of the inputs when known (every
  // input a regular file, not a tree or standard input), else 0: enough to
  // say how far reading has come. raw_bytes_read() may be called from any
  // thread while another reads.
  uint64_t raw_bytes_read() const;
  uint64_t raw_bytes_total() const;
  // WARC inputs: the records that were not documents, by reason ("warcinfo
  // record", "HTTP status 404", ...), and events such as payload digest
  // mismatches, counted so far, sorted by reason.
  std::map<std::string, uint64_t> RecordCounts() const;

 private:
  class Impl;
  explicit CorpusReader(std::unique_ptr<Impl> impl);
  std::unique_ptr<Impl> impl_;
};

// Parses the JSON lines a reader left unparsed (CorpusReader::DeferParsing),
// exactly as the reader would have: same fields, same messages.
//
// Thread-safety: one LineParser per thread; it holds reusable buffers.
class LineParser {
 public:
  // `options` as given to the reader (its options()).
  explicit LineParser(const InputOptions& options);
  ~LineParser();
  LineParser(const LineParser&) = delete;
  LineParser& operator=(const LineParser&) = delete;

  // Fills doc->id (unless the id field is "@line"), text, priority and
  // invalid_utf8 from the raw line in doc->text, and clears doc->unparsed.
  // For an HTML page (Document::unparsed_html), replaces doc->text by the
  // page's text and clears both flags.
  // Does nothing to a document that is not unparsed. On error (malformed
  // JSON, a missing field or one of the wrong type; InvalidArgument, the
  // message starting "<file>:<line>:") the document is left unusable.
  absl::Status Finish(Document* doc);

 private:
  class Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace kindred

#endif  // KINDRED_CORPUS_H_
