// SignCorpus: reads, parses, shingles and signs a corpus on a fixed set of
// threads, and appends the documents to a SignedCorpus in input order.
//
// The work flows in small batches (SignOptions::batch_documents) through
// three steps:
//   read    any thread, one at a time (the reader is single-threaded): finds
//           the next lines or files; JSON is not parsed here;
//   sign    any thread, batches in parallel: parses the JSON lines, shingles
//           and signs each document, computes band keys (sign_batch.h, by
//           the per-document recipe of document_signer.h);
//   commit  the calling thread only, batches strictly in read order: checks
//           for repeated ids, appends to the corpus, reports, flushes and
//           spills.
// The calling thread commits every batch that is ready whenever it is free,
// and otherwise reads and signs like the others; a bounded pool of batches
// keeps the workers from running far ahead of it. Small batches keep the
// memory the batches touch small (fresh pages are costly) and the threads
// evenly loaded, and batch boundaries depend only on the input, so the
// corpus and every message are the same for any thread count.
#include <algorithm>
#include <atomic>
#include <condition_variable>
#include <memory>
#include <mutex>
#include <thread>
#include <vector>

#include "absl/container/flat_hash_map.h"
#include "absl/container/flat_hash_set.h"
#include "absl/hash/hash.h"
#include "absl/strings/str_cat.h"
#include "core/sign_batch.h"
#include "kindred/corpus.h"
#include "kindred/errors.h"
#include "kindred/signed_corpus.h"

namespace kindred {
namespace {

using Batch = SigningBatch;

std::string Place(const CorpusReader& reader, const Document& doc) {
  const std::string& input = reader.inputs()[doc.source.input];
  if (doc.source.line == 0) return doc.source.path.empty() ? input : doc.source.path;
  return absl::StrCat(input, ":", doc.source.line);
}

// Where an already signed document was read, for messages.
std::string PlaceOf(const CorpusReader& reader, const SignedCorpus& corpus, uint32_t doc) {
  const DocumentOrigin& origin = corpus.origin(doc);
  const ResolvedInput input = reader.ResolvedInputs()[origin.input];
  if (origin.line > 0) return absl::StrCat(input.name, ":", origin.line);
  if (input.is_directory && !reader.options().ids_with_path) {
    return absl::StrCat(input.name, "/", corpus.id(doc));
  }
  return input.is_directory ? std::string(corpus.id(doc)) : input.name;
}

// A hint for an id repeated across two inputs.
const char* HintFor(const CorpusReader& reader, const SignedCorpus& corpus, uint32_t first,
                    const Document& doc) {
  if (reader.options().ids_with_path || corpus.origin(first).input == doc.source.input) return "";
  return "; --ids-with-path makes ids name their files";
}

// The set of ids seen so far, holding document indices and hashing the ids
// they name in the corpus, so no id is stored twice.
struct IdHash {
  using is_transparent = void;
  const SignedCorpus* corpus;
  size_t operator()(uint32_t doc) const { return (*this)(corpus->id(doc)); }
  size_t operator()(absl::string_view id) const { return absl::Hash<absl::string_view>{}(id); }
};
struct IdEq {
  using is_transparent = void;
  const SignedCorpus* corpus;
  absl::string_view Id(uint32_t doc) const { return corpus->id(doc); }
  absl::string_view Id(absl::string_view id) const { return id; }
  template <typename A, typename B>
  bool operator()(const A& a, const B& b) const {
    return Id(a) == Id(b);
  }
};

class Pipeline {
 public:
  Pipeline(CorpusReader& reader, const SignatureSettings& settings, const SignOptions& options,
           std::vector<DocumentSigner> signers, SignedCorpus* out, SignStats* stats)
      : reader_(reader),
        options_(options),
        threads_(static_cast<int>(signers.size())),
        perms_(settings.perms),
        lean_(out->lean()),
        grouped_(out->groups_identical()),
        banding_(out->lean_banding()),
        out_(out),
        stats_(stats),
        seen_(0, IdHash{out}, IdEq{out}) {
    per_thread_.reserve(threads_);
    for (DocumentSigner& signer : signers) per_thread_.push_back(PerThread{std::move(signer)});
    // Enough batches for every thread to hold one being signed and one
    // waiting to be committed.
    for (int b = 0; b < 2 * threads_ + 2; ++b) free_.push_back(std::make_unique<Batch>());
  }

  absl::Status Run() {
    std::vector<std::thread> workers;
    workers.reserve(threads_ - 1);
    for (int t = 1; t < threads_; ++t) workers.emplace_back([this, t] { WorkerLoop(t); });
    absl::Status result = CallerLoop();
    {
      std::lock_guard<std::mutex> lock(mu_);
      stop_ = true;
    }
    changed_.notify_all();
    for (std::thread& worker : workers) worker.join();
    return result;
  }

 private:
  // Reads the next batch into a free one; null once the input is done.
  // Requires a free batch to have been taken as *batch.
  std::unique_ptr<Batch> Read(std::unique_ptr<Batch> batch) {
    std::lock_guard<std::mutex> reading(read_mu_);
    if (reader_done_) return Release(std::move(batch), false);
    absl::StatusOr<size_t> count =
        reader_.ReadBatch(&batch->docs, options_.batch_documents, options_.batch_bytes);
    batch->read_error = count.status();
    if (!count.ok() || *count == 0) reader_done_ = true;
    const bool produced = !count.ok() || *count > 0;
    if (produced) batch->sequence = batches_read_++;
    if (reader_done_) {
      {
        std::lock_guard<std::mutex> lock(mu_);
        input_done_ = true;
        batch_count_ = batches_read_;
      }
      changed_.notify_all();
    }
    return produced ? std::move(batch) : Release(std::move(batch), true);
  }

  // Returns a batch to the pool; null.
  std::unique_ptr<Batch> Release(std::unique_ptr<Batch> batch, bool notify) {
    {
      std::lock_guard<std::mutex> lock(mu_);
      free_.push_back(std::move(batch));
    }
    if (notify) changed_.notify_all();
    return nullptr;
  }

  // Takes a free batch, waiting for one; null when there is nothing left to
  // read or signing stopped.
  std::unique_ptr<Batch> TakeFree(std::unique_lock<std::mutex>& lock) {
    changed_.wait(lock, [&] { return stop_ || input_done_ || !free_.empty(); });
    if (stop_ || input_done_) return nullptr;
    std::unique_ptr<Batch> batch = std::move(free_.back());
    free_.pop_back();
    return batch;
  }

  void Signed(std::unique_ptr<Batch> batch) {
    {
      std::lock_guard<std::mutex> lock(mu_);
      const uint64_t sequence = batch->sequence;
      ready_.emplace(sequence, std::move(batch));
    }
    changed_.notify_all();
  }

  void WorkerLoop(int worker) {
    for (;;) {
      std::unique_ptr<Batch> batch;
      {
        std::unique_lock<std::mutex> lock(mu_);
        batch = TakeFree(lock);
      }
      if (batch == nullptr) return;
      batch = Read(std::move(batch));
      if (batch == nullptr) return;
      Sign(batch.get(), worker);
      Signed(std::move(batch));
    }
  }

  // The calling thread: commits every batch that is ready, in order; when
  // none is, reads and signs one itself, or waits.
  absl::Status CallerLoop() {
    std::unique_lock<std::mutex> lock(mu_);
    for (;;) {
      if (auto it = ready_.find(next_commit_); it != ready_.end()) {
        std::unique_ptr<Batch> batch = std::move(it->second);
        ready_.erase(it);
        lock.unlock();
        absl::Status committed = Commit(batch.get());
        lock.lock();
        ++next_commit_;
        free_.push_back(std::move(batch));
        changed_.notify_all();
        if (!committed.ok()) return committed;
        continue;
      }
      if (input_done_ && next_commit_ == batch_count_) return absl::OkStatus();
      if (!input_done_ && !free_.empty()) {
        std::unique_ptr<Batch> batch = TakeFree(lock);
        lock.unlock();
        batch = Read(std::move(batch));
        if (batch != nullptr) {
          Sign(batch.get(), 0);
          Signed(std::move(batch));
        }
        lock.lock();
        continue;
      }
      changed_.wait(lock);
    }
  }

  void Sign(Batch* batch, int worker) {
    DocumentSigner& signer = per_thread_[worker].signer;
    if (grouped_) {
      SignGroupedBatch(batch, texts_, keeping_.load(std::memory_order_relaxed), signer);
    } else {
      SignPlainBatch(batch, lean_, signer);
    }
  }

  // Appends document i of a signed batch to a corpus that groups identical
  // sets.
  void AddGrouped(Batch* batch, size_t i, const KeepFacts& facts, const DocumentOrigin& origin) {
    SignedCorpus::SignedDocument signed_doc;
    signed_doc.same_text_as = batch->same_text[i];
    signed_doc.sorted = batch->sorted[i] != 0;
    signed_doc.set = batch->sets[i];
    signed_doc.digest = batch->set_digests[i];
    signed_doc.signature = absl::MakeConstSpan(&batch->signatures[i * perms_], perms_);
    signed_doc.band_keys =
        absl::MakeConstSpan(&batch->band_keys[i * banding_.bands], banding_.bands);
    if (signed_doc.same_text_as >= 0) {
      ++repeated_texts_;
    } else if (!signed_doc.sorted) {
      signed_doc.set = {};  // a bag: its size is all the corpus takes
      signed_doc.bag_size = batch->set_sizes[i];
    }
    out_->AddGrouped(std::move(batch->docs[i].id), facts, origin, signed_doc);
  }

  // After a batch's commit: its new texts (and texts whose documents now
  // have sets), for SignGrouped; and whether sets are still kept. They are
  // kept while the corpus has room for them and, after its first 4096
  // documents, while at least one document in 16 repeats an earlier text:
  // in a corpus of few duplicates, the few candidate documents are cheaper
  // to read again than every set is to sort and keep.
  void RememberTexts(const Batch& batch, size_t first_doc) {
    texts_.Remember(batch, first_doc, *out_);
    const size_t docs = out_->size();
    keeping_.store(out_->set_room() && (docs < 4096 || repeated_texts_ * 16 >= docs),
                   std::memory_order_relaxed);
  }

  // Appends a signed batch to the corpus (calling thread, read order).
  // Counts a committed document in the stats (and reports invalid UTF-8).
  void CountDocument(const Document& doc, uint32_t set_size, uint32_t invalid_utf8) {
    stats_->documents++;
    stats_->bytes += doc.text.size();
    if (set_size == 0) stats_->empty_documents++;
    stats_->html_pages += doc.html_page;
    stats_->html_reference_pages += doc.html_by_reference;
    if (invalid_utf8 > 0) {
      stats_->invalid_utf8_documents++;
      stats_->invalid_utf8_sequences += invalid_utf8;
      if (options_.on_invalid_utf8) options_.on_invalid_utf8(doc.id, invalid_utf8);
    }
  }

  // After the first batch (of n documents): room for the documents the
  // inputs' total size suggests (text bytes per document so far; markup
  // makes this a slight overestimate, compression an underestimate).
  void ReserveForInputs(size_t n) {
    if (stats_->raw_bytes_total == 0 || n == 0) return;
    const double per_document =
        std::max(64.0, static_cast<double>(stats_->bytes) / static_cast<double>(n));
    const auto expected = static_cast<size_t>(
        static_cast<double>(stats_->raw_bytes_total) / per_document * 1.02 + 1024);
    out_->Reserve(out_->size() + expected);
    seen_.reserve(seen_.size() + expected);
  }

  absl::Status Commit(Batch* batch) {
    const size_t n = batch->docs.size();
    const size_t first_doc = out_->size();
    for (size_t i = 0; i < n; ++i) {
      Document& doc = batch->docs[i];
      if (batch->unparsable[i]) return batch->errors[i];
      if (!batch->errors[i].ok()) {
        return Annotate(batch->errors[i],
                        absl::StrCat(Place(reader_, doc), ": document \"", doc.id, "\""));
      }
      if (auto it = seen_.find(absl::string_view(doc.id)); it != seen_.end()) {
        std::lock_guard<std::mutex> reading(read_mu_);  // ResolvedInputs() while others read
        return absl::InvalidArgumentError(
            absl::StrCat(Place(reader_, doc), ": duplicate id \"", doc.id, "\" (first seen at ",
                         PlaceOf(reader_, *out_, *it), ")", HintFor(reader_, *out_, *it, doc)));
      }
      if (grouped_ && batch->same_text[i] >= 0) {
        batch->set_sizes[i] = out_->shingle_count(batch->same_text[i]);
      }
      TextStats& text = batch->text_stats[i];
      const uint32_t shingler_invalid = text.invalid_utf8;
      text.invalid_utf8 += doc.invalid_utf8;
      CountDocument(doc, batch->set_sizes[i], text.invalid_utf8);
      const KeepFacts facts{doc.text.size(), doc.priority, doc.has_priority};
      const DocumentOrigin origin{doc.source.input, doc.source.line, doc.source.offset};
      if (grouped_) {
        text.invalid_utf8 = shingler_invalid;  // what a repeat of this text gets from signing
        AddGrouped(batch, i, facts, origin);
      } else if (lean_) {
        out_->AddWithBandKeys(
            std::move(doc.id), facts, origin, batch->set_sizes[i],
            absl::MakeConstSpan(&batch->band_keys[i * banding_.bands], banding_.bands));
      } else {
        out_->Add(std::move(doc.id), facts, origin, batch->sets[i],
                  absl::MakeConstSpan(&batch->signatures[i * perms_], perms_));
      }
      seen_.insert(static_cast<uint32_t>(out_->size() - 1));
    }
    if (grouped_) RememberTexts(*batch, first_doc);
    stats_->raw_bytes = reader_.raw_bytes_read();
    stats_->raw_bytes_total = reader_.raw_bytes_total();
    if (batch->sequence == 0) ReserveForInputs(n);
    if (options_.flush && out_->memory_bytes() > options_.flush_bytes) {
      if (absl::Status flushed = options_.flush(*out_); !flushed.ok()) return flushed;
      out_->Clear();
      seen_.clear();
    }
    if (out_->spill_due()) {
      if (absl::Status spilled = out_->SpillBandKeys(); !spilled.ok()) return spilled;
    }
    if (options_.progress) options_.progress(*stats_);
    return batch->read_error;
  }

  CorpusReader& reader_;
  const SignOptions& options_;
  const int threads_;
  const uint32_t perms_;
  const bool lean_;
  const bool grouped_;
  const Banding banding_;
  // What each thread works with (index 0: the calling thread), a cache
  // line apart: the bag's end pointer is written for every shingle, and
  // two threads writing one line slow each other down (measured: 15% more
  // CPU on two threads).
  struct alignas(64) PerThread {
    DocumentSigner signer;
  };
  std::vector<PerThread> per_thread_;
  // Commit state: the calling thread only.
  SignedCorpus* out_;
  SignStats* stats_;
  absl::flat_hash_set<uint32_t, IdHash, IdEq> seen_;  // ids so far, to name repeats

  // Texts committed so far (grouping identical sets).
  SeenTexts texts_;
  std::atomic<bool> keeping_{true};
  uint64_t repeated_texts_ = 0;  // commit thread

  std::mutex read_mu_;  // held while reading; guards the two below
  bool reader_done_ = false;
  uint64_t batches_read_ = 0;

  std::mutex mu_;  // guards the rest
  std::condition_variable changed_;
  std::vector<std::unique_ptr<Batch>> free_;
  absl::flat_hash_map<uint64_t, std::unique_ptr<Batch>> ready_;  // signed, by sequence
  uint64_t next_commit_ = 0;
  bool input_done_ = false;   // no batch left to read
  uint64_t batch_count_ = 0;  // batches read, once input_done_
  bool stop_ = false;
};

}  // namespace

absl::Status SignCorpus(CorpusReader& reader, const SignatureSettings& settings,
                        const SignOptions& options, SignedCorpus* out, SignStats* stats) {
  auto made = DocumentSigner::Make(reader.options(), settings, out->lean_banding(),
                                   std::max(1, options.threads));
  if (!made.ok()) return made.status();
  // JSON lines are parsed on the signing threads, not by the reader: the
  // reader only finds lines, and so keeps up with the workers.
  reader.DeferParsing();
  Pipeline pipeline(reader, settings, options, *std::move(made), out, stats);
  return pipeline.Run();
}

}  // namespace kindred
