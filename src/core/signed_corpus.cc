#include "kindred/signed_corpus.h"

#include <algorithm>
#include <future>
#include <memory>

#include "absl/container/flat_hash_set.h"
#include "absl/hash/hash.h"
#include "absl/strings/str_cat.h"
#include "xxhash.h"
#include "kindred/parallel.h"
#include "kindred/shingles.h"
#include "kindred/signer.h"

namespace kindred {

SignedCorpus SignedCorpus::Lean(uint32_t perms, Banding banding) {
  SignedCorpus corpus(perms);
  corpus.banding_ = banding;
  return corpus;
}

void SignedCorpus::Reserve(size_t documents) {
  ids_.reserve(documents);
  facts_.reserve(documents);
  origins_.reserve(documents);
  shingle_count_.reserve(documents);
  shingle_data_.reserve(documents);
  signature_data_.reserve(documents);
  if (lean()) {
    band_key_data_.reserve(documents);
    band_key_digests_.reserve(documents);
  }
}

void SignedCorpus::Clear() {
  ids_.clear();
  facts_.clear();
  origins_.clear();
  shingle_data_.clear();
  shingle_count_.clear();
  signature_data_.clear();
  band_key_data_.clear();
  band_key_digests_.clear();
  shingles_.Reset();
  signatures_.Reset();
  band_keys_.Reset();
}

size_t SignedCorpus::memory_bytes() const {
  constexpr size_t kPerDocument = sizeof(std::string) + sizeof(KeepFacts) +
                                  sizeof(DocumentOrigin) + 3 * sizeof(void*) + 2 * sizeof(uint32_t);
  return shingles_.bytes_used() + signatures_.bytes_used() + band_keys_.bytes_used() +
         size() * (kPerDocument + (lean() ? sizeof(void*) : 0));
}

void SignedCorpus::Add(std::string id, const KeepFacts& facts, const DocumentOrigin& origin,
                       absl::Span<const uint64_t> shingles, absl::Span<const uint32_t> signature) {
  if (lean()) {
    uint64_t* keys = band_keys_.Allocate(banding_.bands);
    LeanBandKeys(banding_, shingles.empty(), signature, absl::MakeSpan(keys, banding_.bands));
    AddKeys(std::move(id), facts, origin, static_cast<uint32_t>(shingles.size()), keys);
    return;
  }
  ids_.push_back(std::move(id));
  facts_.push_back(facts);
  origins_.push_back(origin);
  shingle_count_.push_back(static_cast<uint32_t>(shingles.size()));
  shingle_data_.push_back(shingles_.Append(shingles.data(), shingles.size()));
  signature_data_.push_back(signatures_.Append(signature.data(), signature.size()));
}

void SignedCorpus::AddWithBandKeys(std::string id, const KeepFacts& facts,
                                   const DocumentOrigin& origin, uint32_t shingle_count,
                                   absl::Span<const uint64_t> band_keys) {
  AddKeys(std::move(id), facts, origin, shingle_count,
          band_keys_.Append(band_keys.data(), banding_.bands));
}

void SignedCorpus::AddKeys(std::string id, const KeepFacts& facts, const DocumentOrigin& origin,
                           uint32_t shingle_count, const uint64_t* keys) {
  ids_.push_back(std::move(id));
  facts_.push_back(facts);
  origins_.push_back(origin);
  shingle_count_.push_back(shingle_count);
  band_key_data_.push_back(keys);
  band_key_digests_.push_back(BandKeyDigest(absl::MakeConstSpan(keys, banding_.bands)));
  shingle_data_.push_back(nullptr);
  signature_data_.push_back(nullptr);
}

void SignedCorpus::LeanBandKeys(Banding banding, bool empty, absl::Span<const uint32_t> signature,
                                absl::Span<uint64_t> out) {
  if (empty) {
    std::fill(out.begin(), out.end(), kNoBandKey);
  } else {
    BandKeys(signature, banding, out);
  }
}

uint32_t SignedCorpus::BandKeyDigest(absl::Span<const uint64_t> keys) {
  return static_cast<uint32_t>(XXH3_64bits(keys.data(), keys.size() * sizeof(uint64_t)));
}

void SignedCorpus::SetSpill(uint64_t budget_bytes, std::string dir) {
  spill_budget_ = budget_bytes;
  spill_dir_ = std::move(dir);
}

absl::Status SignedCorpus::SpillBandKeys() {
  if (first_resident_ == size()) return absl::OkStatus();
  if (spill_ == nullptr) {
    absl::StatusOr<std::unique_ptr<BandSpill>> spill = BandSpill::Create(spill_dir_, banding_.bands);
    if (!spill.ok()) return spill.status();
    spill_ = *std::move(spill);
  }
  const absl::Span<const uint64_t* const> resident(band_key_data_.data() + first_resident_,
                                                  size() - first_resident_);
  if (absl::Status status = spill_->AddRun(static_cast<uint32_t>(first_resident_), resident);
      !status.ok()) {
    return status;
  }
  std::fill(band_key_data_.begin() + first_resident_, band_key_data_.end(), nullptr);
  band_keys_.Reset();
  first_resident_ = size();
  return absl::OkStatus();
}

void SignedCorpus::AttachShingles(uint32_t doc, absl::Span<const uint64_t> shingles,
                                  absl::Span<const uint32_t> signature) {
  shingle_data_[doc] = shingles_.Append(shingles.data(), shingles.size());
  shingle_count_[doc] = static_cast<uint32_t>(shingles.size());
  signature_data_[doc] = signatures_.Append(signature.data(), signature.size());
}

namespace {

// Per-batch results, reused from batch to batch so their buffers are
// allocated once.
struct BatchResults {
  std::vector<ShingleSet> sets;     // kept sets (not for lean corpora)
  std::vector<uint32_t> set_sizes;  // size of each set or bag
  std::vector<uint32_t> signatures;
  std::vector<uint64_t> band_keys;  // lean corpora only
  std::vector<TextStats> text_stats;
  std::vector<absl::Status> errors;
};

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
  if (input.is_directory) return absl::StrCat(input.name, "/", corpus.id(doc));
  return input.name;
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

}  // namespace

absl::Status SignCorpus(CorpusReader& reader, const SignatureSettings& settings,
                        const SignOptions& options, SignedCorpus* out, SignStats* stats) {
  const int threads = std::max(1, options.threads);
  auto made = Shingler::CreateMany(settings, threads);
  if (!made.ok()) return made.status();
  std::vector<std::unique_ptr<Shingler>> shinglers = *std::move(made);
  const Signer signer(settings);
  const uint32_t perms = settings.perms;
  const bool lean = out->lean();
  const Banding banding = out->lean_banding();
  // Ids seen so far, to reject repeats with both places named.
  absl::flat_hash_set<uint32_t, IdHash, IdEq> seen(0, IdHash{out}, IdEq{out});

  std::vector<Document> batch, next_batch;
  BatchResults results;
  std::vector<ShingleSet> bags(threads);  // lean: one bag per worker
  auto read = [&](std::vector<Document>* into) {
    return reader.ReadBatch(into, options.batch_documents, options.batch_bytes);
  };
  absl::StatusOr<size_t> count = read(&batch);
  while (count.ok() && *count > 0) {
    // Read the next batch while this one is signed, on a thread of its own
    // when there is more than one; one thread means one.
    std::future<absl::StatusOr<size_t>> pending =
        std::async(threads > 1 ? std::launch::async : std::launch::deferred, read, &next_batch);
    const size_t n = batch.size();
    results.sets.resize(lean ? 0 : n);
    results.set_sizes.resize(n);
    results.signatures.resize(n * perms);
    results.band_keys.resize(n * banding.bands);
    results.text_stats.assign(n, TextStats{});
    results.errors.assign(n, absl::OkStatus());
    ParallelFor(n, threads, [&](size_t begin, size_t end, int worker) {
      for (size_t i = begin; i < end; ++i) {
        // A lean corpus keeps no sets, and the signature of the unsorted
        // bag is that of the set: skip the sort, and reuse one bag per
        // worker.
        ShingleSet& set = lean ? bags[worker] : results.sets[i];
        results.errors[i] =
            lean ? shinglers[worker]->ShingleBag(batch[i].text, &set, &results.text_stats[i])
                 : shinglers[worker]->Shingle(batch[i].text, &set, &results.text_stats[i]);
        results.set_sizes[i] = static_cast<uint32_t>(set.size());
        signer.Sign(set, absl::MakeSpan(&results.signatures[i * perms], perms));
        if (lean) {
          SignedCorpus::LeanBandKeys(
              banding, set.empty(),
              absl::MakeConstSpan(&results.signatures[i * perms], perms),
              absl::MakeSpan(&results.band_keys[i * banding.bands], banding.bands));
        }
      }
    });
    for (size_t i = 0; i < n; ++i) {
      Document& doc = batch[i];
      if (!results.errors[i].ok()) {
        if (threads > 1) pending.wait();  // a deferred read need not run
        return absl::Status(results.errors[i].code(),
                            absl::StrCat(Place(reader, doc), ": document \"", doc.id,
                                         "\": ", results.errors[i].message()));
      }
      if (auto it = seen.find(absl::string_view(doc.id)); it != seen.end()) {
        if (threads > 1) pending.wait();  // a deferred read need not run
        return absl::InvalidArgumentError(absl::StrCat(Place(reader, doc), ": duplicate id \"",
                                                       doc.id, "\" (first seen at ",
                                                       PlaceOf(reader, *out, *it), ")"));
      }
      TextStats& text = results.text_stats[i];
      text.invalid_utf8 += doc.invalid_utf8;
      stats->documents++;
      stats->bytes += doc.text.size();
      if (results.set_sizes[i] == 0) stats->empty_documents++;
      if (text.invalid_utf8 > 0) {
        stats->invalid_utf8_documents++;
        stats->invalid_utf8_sequences += text.invalid_utf8;
        if (options.on_invalid_utf8) options.on_invalid_utf8(doc.id, text.invalid_utf8);
      }
      const KeepFacts facts{doc.text.size(), doc.priority, doc.has_priority};
      const DocumentOrigin origin{doc.source.input, doc.source.line};
      if (lean) {
        out->AddWithBandKeys(
            std::move(doc.id), facts, origin, results.set_sizes[i],
            absl::MakeConstSpan(&results.band_keys[i * banding.bands], banding.bands));
      } else {
        out->Add(std::move(doc.id), facts, origin, results.sets[i],
                 absl::MakeConstSpan(&results.signatures[i * perms], perms));
      }
      seen.insert(static_cast<uint32_t>(out->size() - 1));
    }
    stats->raw_bytes = reader.raw_bytes_read();
    stats->raw_bytes_total = reader.raw_bytes_total();
    if (stats->documents == n && stats->raw_bytes_total > 0) {
      // After the first batch: room for the documents the inputs' total
      // size suggests (text bytes per document so far; markup makes this a
      // slight overestimate, compression an underestimate).
      const double per_document =
          std::max(64.0, static_cast<double>(stats->bytes) / static_cast<double>(n));
      const auto expected = static_cast<size_t>(
          static_cast<double>(stats->raw_bytes_total) / per_document * 1.02 + 1024);
      out->Reserve(out->size() + expected);
      seen.reserve(seen.size() + expected);
    }
    if (options.flush && out->memory_bytes() > options.flush_bytes) {
      if (absl::Status flushed = options.flush(*out); !flushed.ok()) {
        if (threads > 1) pending.wait();  // a deferred read need not run
        return flushed;
      }
      out->Clear();
      seen.clear();
    }
    if (out->spill_due()) {
      if (absl::Status spilled = out->SpillBandKeys(); !spilled.ok()) {
        if (threads > 1) pending.wait();  // a deferred read need not run
        return spilled;
      }
    }
    if (options.progress) options.progress(*stats);
    count = pending.get();
    std::swap(batch, next_batch);
  }
  return count.status();
}

}  // namespace kindred
