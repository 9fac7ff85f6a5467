#include "core/reload.h"

#include <algorithm>
#include <cstring>
#include <functional>
#include <memory>

#include "absl/strings/str_cat.h"
#include "core/document_signer.h"
#include "core/parallel.h"
#include "io/json_line.h"
#include "io/warc_documents.h"
#include "kindred/errors.h"
#include "kindred/file_io.h"

namespace kindred {
namespace {

// Signs documents read again and attaches them to the corpus, after checking
// that each is the document signing saw.
class Attacher {
 public:
  // Fills a document's text in a worker thread (null: the text is there).
  using ReadText = std::function<absl::Status(Document& doc)>;

  Attacher(std::vector<DocumentSigner> signers, uint32_t perms, SignedCorpus* corpus)
      : threads_(static_cast<int>(signers.size())),
        signers_(std::move(signers)),
        perms_(perms),
        corpus_(corpus) {}

  // Documents attached so far.
  size_t attached() const { return attached_; }

  // `batch` holds documents with their ordinals set (JSON lines may be
  // unparsed). Reading (`read`, when given), parsing, shingling, signing,
  // the check that a document is unchanged and the copies into the corpus
  // run in the worker threads; the calling thread only checks the results
  // and takes room in the corpus, in batch order.
  // Returns the first read error, or InvalidArgument naming the first
  // document that changed.
  absl::Status Attach(std::vector<Document>& batch, const ReadText& read = nullptr) {
    const size_t n = batch.size();
    sets_.resize(n);
    signatures_.resize(n * perms_);
    read_errors_.assign(n, absl::OkStatus());
    same_.assign(n, 0);
    ParallelFor(n, threads_, [&](size_t begin, size_t end, int worker) {
      for (size_t i = begin; i < end; ++i) {
        if (read != nullptr) {
          read_errors_[i] = read(batch[i]);
          if (!read_errors_[i].ok()) continue;
        }
        DocumentSigner& signer = signers_[worker];
        const auto signature = absl::MakeSpan(&signatures_[i * perms_], perms_);
        const bool parsed =
            signer.Parse(&batch[i]).ok() &&
            signer.Sign(batch[i], /*sorted=*/true, &sets_[i], nullptr, signature, {}).ok();
        same_[i] = parsed && Unchanged(batch[i], sets_[i], signature, signer);
      }
    });
    // Documents before the first failure are attached (filled, whatever
    // follows), then the failure is reported.
    rooms_.resize(n);
    size_t good = 0;
    absl::Status failure;
    for (; good < n; ++good) {
      const Document& doc = batch[good];
      const uint64_t ordinal = doc.ordinal;
      if (!read_errors_[good].ok()) {
        failure = read_errors_[good];
        break;
      }
      if (!same_[good]) {
        const std::string where = doc.source.line > 0
                                      ? absl::StrCat(doc.source.path, ":", doc.source.line)
                                      : doc.source.path;
        const std::string& id = ordinal < corpus_->size() ? corpus_->id(ordinal) : doc.id;
        failure = InputChanged(
            absl::StrCat(where, ": document \"", id,
                         "\" changed while kindred was reading the corpus; run again"));
        break;
      }
      rooms_[good] = corpus_->AttachRoom(static_cast<uint32_t>(ordinal), sets_[good].size());
    }
    ParallelFor(good, threads_, [&](size_t begin, size_t end, int) {
      for (size_t i = begin; i < end; ++i) {
        if (!sets_[i].empty()) {
          std::memcpy(rooms_[i].shingles, sets_[i].data(), sets_[i].size() * sizeof(uint64_t));
        }
        std::memcpy(rooms_[i].signature, &signatures_[i * perms_], perms_ * sizeof(uint32_t));
      }
    });
    attached_ += good;
    return failure;
  }

 private:
  // Whether the document read again is the one signing saw: same id, same
  // emptiness, same band keys (by their digest). Reads the corpus only.
  bool Unchanged(const Document& doc, const ShingleSet& set, absl::Span<const uint32_t> signature,
                 DocumentSigner& signer) const {
    const uint64_t ordinal = doc.ordinal;
    if (ordinal >= corpus_->size() || doc.id != corpus_->id(ordinal) ||
        set.empty() != (corpus_->shingle_count(ordinal) == 0)) {
      return false;
    }
    if (set.empty()) return true;
    return SignedCorpus::BandKeyDigest(signer.BandKeysOf(signature)) ==
           corpus_->band_key_digest(ordinal);
  }

  const int threads_;
  std::vector<DocumentSigner> signers_;  // per worker
  const uint32_t perms_;
  SignedCorpus* corpus_;
  std::vector<ShingleSet> sets_;
  std::vector<uint32_t> signatures_;
  std::vector<absl::Status> read_errors_;
  std::vector<uint8_t> same_;
  std::vector<SignedCorpus::AttachedRoom> rooms_;
  size_t attached_ = 0;
};

// Reads the line that starts at `offset` of `file` (without its "\n"; all
// that is left when no "\n" ends it) into *line. Stops past max_bytes: the
// document then fails the check that it is unchanged.
absl::Status ReadLineAt(const ReadableFile& file, uint64_t offset, uint64_t max_bytes,
                        std::string* line) {
  line->clear();
  size_t chunk = 4096;
  for (;;) {
    const size_t have = line->size();
    line->resize(have + chunk);
    const absl::StatusOr<size_t> read =
        file.ReadAt(offset + have, absl::MakeSpan(line->data() + have, chunk));
    if (!read.ok()) return read.status();
    const size_t n = *read;
    const char* newline = static_cast<const char*>(std::memchr(line->data() + have, '\n', n));
    if (newline != nullptr) {
      line->resize(static_cast<size_t>(newline - line->data()));
      return absl::OkStatus();
    }
    line->resize(have + n);
    if (n == 0 || line->size() > max_bytes) return absl::OkStatus();
    chunk *= 2;
  }
}

// `status` of a read of `input`'s read_path, naming the input as given
// (standard input as "-", not its copy).
absl::Status NamedAsGiven(const absl::Status& status, const ResolvedInput& input) {
  return WithPathShownAs(status, input.read_path, input.name);
}

// Reads documents `docs` (each with a known offset) at their offsets, in
// the workers (JSON lines by reads at offsets of one ReadableFile per input,
// WARC records each from its own stream).
absl::Status ReadAtOffsets(const std::vector<ResolvedInput>& inputs, const InputOptions& options,
                           const SignedCorpus& corpus, absl::Span<const uint32_t> docs,
                           Attacher* attacher) {
  FileSystem* fs = options.file_system != nullptr ? options.file_system : DefaultFileSystem();
  std::vector<std::unique_ptr<ReadableFile>> files(inputs.size());
  std::vector<Document> batch;
  const auto read = [&](Document& doc) {
    const DocumentOrigin& origin = corpus.origin(doc.ordinal);
    if (inputs[origin.input].format == InputFormat::kWarc) {
      return io::ReadWarcDocumentAt(inputs[origin.input].read_path, origin.offset, options, &doc);
    }
    return NamedAsGiven(
        ReadLineAt(*files[origin.input], origin.offset, options.max_document_bytes, &doc.text),
        inputs[origin.input]);
  };
  constexpr size_t kBatch = 1024;
  for (size_t start = 0; start < docs.size(); start += kBatch) {
    const size_t n = std::min(kBatch, docs.size() - start);
    batch.resize(n);
    for (size_t i = 0; i < n; ++i) {
      const uint32_t ordinal = docs[start + i];
      const DocumentOrigin& origin = corpus.origin(ordinal);
      const ResolvedInput& input = inputs[origin.input];
      if (files[origin.input] == nullptr && input.format != InputFormat::kWarc) {
        absl::StatusOr<std::unique_ptr<ReadableFile>> opened = fs->OpenRead(input.read_path);
        if (!opened.ok()) return NamedAsGiven(opened.status(), input);
        files[origin.input] = *std::move(opened);
      }
      Document& doc = batch[i];
      doc.unparsed = true;
      doc.id =
          options.id_field == io::kLineNumberId ? absl::StrCat(input.name, ":", origin.line) : "";
      doc.source.input = origin.input;
      doc.source.line = origin.line;
      doc.source.offset = origin.offset;
      doc.source.path = input.name;
      doc.ordinal = ordinal;
    }
    if (absl::Status attached = attacher->Attach(batch, read); !attached.ok()) return attached;
  }
  return absl::OkStatus();
}

}  // namespace

absl::Status ReloadShingles(const std::vector<ResolvedInput>& inputs, const InputOptions& options,
                            const SignatureSettings& settings, absl::Span<const uint32_t> docs,
                            int threads, SignedCorpus* corpus) {
  if (docs.empty()) return absl::OkStatus();
  threads = std::max(1, threads);
  auto made = DocumentSigner::Make(options, settings, corpus->lean_banding(), threads);
  if (!made.ok()) return made.status();
  Attacher attacher(*std::move(made), settings.perms, corpus);

  // A JSON line whose offset is known is read where it starts; the other
  // documents are found by reading the inputs again, skipping the rest.
  std::vector<uint32_t> at_offset, streamed;
  for (uint32_t doc : docs) {
    const bool known = doc < corpus->size() && corpus->origin(doc).offset != kUnknownOffset &&
                       corpus->origin(doc).input < inputs.size() &&
                       !inputs[corpus->origin(doc).input].read_path.empty();
    (known ? at_offset : streamed).push_back(doc);
  }
  if (absl::Status read = ReadAtOffsets(inputs, options, *corpus, at_offset, &attacher);
      !read.ok()) {
    return read;
  }
  if (!streamed.empty()) {
    auto reader = CorpusReader::Reopen(inputs, options);
    if (!reader.ok()) return reader.status();
    std::vector<uint8_t> wanted(corpus->size(), 0);
    for (uint32_t doc : streamed) wanted[doc] = 1;
    (*reader)->SetFilter(
        [&wanted](uint64_t ordinal) { return ordinal < wanted.size() && wanted[ordinal] != 0; });
    std::vector<Document> batch;
    for (;;) {
      absl::StatusOr<size_t> count = (*reader)->ReadBatch(&batch, 4096, 16 << 20);
      if (!count.ok()) return count.status();
      if (*count == 0) break;
      if (absl::Status attached = attacher.Attach(batch); !attached.ok()) return attached;
    }
  }
  if (attacher.attached() != docs.size()) {
    return InputChanged(absl::StrCat(
        "the corpus changed while kindred was reading it: ", docs.size() - attacher.attached(),
        " documents could not be found again; run again"));
  }
  return absl::OkStatus();
}

}  // namespace kindred
