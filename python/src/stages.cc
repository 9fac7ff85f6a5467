// The stages of the cluster sweep (kindred.cluster), each a pure function
// from bytes to bytes over the library's public API, so that a task re-run
// after a lost worker gives the same bytes. The records are described in
// python/kindred/cluster/RECORDS.md; all integers little-endian.
//
//   sign_shard      a shard, signed lean -> document table, band-key
//                   records split into P partitions by key hash, and a
//                   band-key digest per document
//   candidates      one partition's band keys from every shard -> candidate
//                   pairs (FindCandidatePairs on those keys, so the crowded
//                   bucket cap is applied exactly as in a local sweep),
//                   routed by first document into V verify ranges
//   verify_plan     one range's candidate pairs from every partition ->
//                   the pairs, sorted and distinct, and the documents each
//                   shard must send for them
//   read_sets       a shard read again for the wanted documents only ->
//                   their sets and signatures (checked against the digests
//                   of the first reading), one record per verify range
//   verify          pairs and the sets of their documents -> scored pairs
//                   (VerifyPairs)
//   finish          every document table and scored pair -> groups
//                   (GroupPairs) and the three record files' bytes
//   write_kept      a shard's kept documents, in its own format
// Verify and finish are in stages_reduce.cc.
#include <pybind11/stl.h>

#include <algorithm>
#include <cstring>
#include <string>
#include <vector>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/str_cat.h"
#include "convert.h"
#include "kindred/banding.h"
#include "kindred/candidates.h"
#include "kindred/corpus.h"
#include "kindred/errors.h"
#include "kindred/kept_writer.h"
#include "kindred/shingles.h"
#include "kindred/signed_corpus.h"
#include "kindred/signer.h"
#include "kindred/sweep.h"
#include "stage_bytes.h"

namespace kindred::python {
namespace {

// The partition of the bucket (band, key).
uint32_t PartitionOf(uint32_t band, uint64_t key, uint32_t partitions) {
  return static_cast<uint32_t>(Mix(key ^ (uint64_t{band} << 56 | band)) % partitions);
}

// The verify range of document `doc` among `documents`: ranges of
// consecutive documents, so that ranges in order give pairs in order.
uint32_t RangeOf(uint32_t doc, uint64_t documents, uint32_t ranges) {
  return static_cast<uint32_t>(uint64_t{doc} * ranges / std::max<uint64_t>(documents, 1));
}

// A signed shard's records: its document table, the band-key digest of
// each document (to know it again when it is read again), and its band
// keys by partition and band.
struct ShardRecords {
  Out table, digests;
  std::vector<std::vector<Out>> keys;  // [partition][band]
};

// `corpus` is lean (band keys only) under `banding`.
void WriteShardRecords(const SignedCorpus& corpus, Banding banding, uint32_t partitions,
                       ShardRecords* out) {
  out->keys.assign(partitions, std::vector<Out>(banding.bands));
  out->table.Put<uint32_t>(static_cast<uint32_t>(corpus.size()));
  for (uint32_t doc = 0; doc < corpus.size(); ++doc) {
    const KeepFacts& facts = corpus.facts(doc);
    out->table.Put<uint64_t>(facts.length);
    out->table.Put<double>(facts.priority);
    out->table.Put<uint8_t>(facts.has_priority);
    out->table.Put<uint32_t>(corpus.shingle_count(doc));
    out->table.Put<uint64_t>(corpus.origin(doc).line);
    out->table.PutString(corpus.id(doc));
    out->digests.Put<uint32_t>(corpus.band_key_digest(doc));
    if (corpus.shingle_count(doc) == 0) continue;
    for (uint32_t band = 0; band < banding.bands; ++band) {
      const uint64_t key = corpus.band_key(doc, band);
      if (key == kNoBandKey) continue;
      Out& part = out->keys[PartitionOf(band, key, partitions)][band];
      part.Put<uint64_t>(key);
      part.Put<uint32_t>(doc);
    }
  }
}

// sign_shard: reads and signs one shard (SignCorpus, whole), returns
// (document table, [band keys of partition p], band-key digests). Signing
// is lean (band keys only, as a local sweep signs): the sets of candidate
// documents are read again by read_sets.
py::tuple SignShard(const std::string& path, const py::handle& settings_object,
                    const std::string& input_format, const std::string& id_field,
                    const std::string& text_field, const std::string& priority_field,
                    uint32_t bands, uint32_t rows, uint32_t partitions, int threads) {
  const SignatureSettings settings = ToSignature(settings_object);
  const InputOptions input = ToInput(input_format, id_field, text_field, priority_field);
  ShardRecords records;
  absl::Status status;
  {
    py::gil_scoped_release release;
    const Banding banding{bands, rows};
    SignedCorpus corpus = SignedCorpus::Lean(settings.perms, banding);
    auto reader = CorpusReader::Open({path}, input);
    status = reader.status();
    if (status.ok()) {
      SignOptions sign;
      sign.threads = std::max(1, threads);
      SignStats stats;
      status = SignCorpus(**reader, settings, sign, &corpus, &stats);
    }
    if (status.ok()) WriteShardRecords(corpus, banding, partitions, &records);
  }
  Check(status);
  py::list parts;
  for (std::vector<Out>& part : records.keys) {  // per band: u32 count, then (key, doc)s
    Out joined;
    for (Out& band : part) {
      joined.Put<uint32_t>(static_cast<uint32_t>(band.str().size() / 12));
      joined.str().append(band.str());
    }
    parts.append(joined.Bytes());
  }
  return py::make_tuple(records.table.Bytes(), parts, records.digests.Bytes());
}

// candidates: the band keys of one partition from every shard (in shard
// order; shard s numbers its documents from offsets[s]) -> [pairs of range v].
py::list Candidates(const std::vector<py::bytes>& parts, const std::vector<uint64_t>& offsets,
                    uint64_t documents, uint32_t perms, uint32_t bands, uint32_t rows,
                    uint32_t ranges, uint64_t max_bucket) {
  std::vector<std::string_view> views;
  for (const py::bytes& part : parts) views.push_back(View(part));
  std::vector<Out> out(ranges);
  {
    py::gil_scoped_release release;
    // The documents with a key here, by global number; their other bands
    // hold kNoBandKey, so only this partition's buckets propose pairs.
    struct Entry {
      uint32_t doc, band;
      uint64_t key;
    };
    std::vector<Entry> entries;
    for (size_t s = 0; s < views.size(); ++s) {
      In in(views[s]);
      for (uint32_t band = 0; band < bands; ++band) {
        for (uint32_t n = in.Get<uint32_t>(); n > 0; --n) {
          const uint64_t key = in.Get<uint64_t>();
          entries.push_back({static_cast<uint32_t>(offsets[s] + in.Get<uint32_t>()), band, key});
        }
      }
    }
    std::sort(entries.begin(), entries.end(),
              [](const Entry& a, const Entry& b) { return a.doc < b.doc; });
    const Banding banding{bands, rows};
    SignedCorpus local = SignedCorpus::Lean(perms, banding);
    std::vector<uint32_t> global;
    std::vector<uint64_t> keys(bands, kNoBandKey);
    for (size_t i = 0; i < entries.size();) {
      std::fill(keys.begin(), keys.end(), kNoBandKey);
      const uint32_t doc = entries[i].doc;
      for (; i < entries.size() && entries[i].doc == doc; ++i)
        keys[entries[i].band] = entries[i].key;
      global.push_back(doc);
      local.AddWithBandKeys(std::string(), KeepFacts(), DocumentOrigin(), 1, keys);
    }
    CandidateStats stats;
    for (PackedPair pair : FindCandidatePairs(local, banding, 1, &stats, max_bucket)) {
      const uint32_t a = global[PairFirst(pair)], b = global[PairSecond(pair)];
      out[RangeOf(a, documents, ranges)].Put<uint64_t>(PackPair(a, b));
    }
  }
  py::list result;
  for (const Out& o : out) result.append(o.Bytes());
  return result;
}

// verify_plan: range v's pairs from every partition -> (pairs, sorted and
// distinct; [documents wanted from shard s, local numbers]).
py::tuple VerifyPlan(const std::vector<py::bytes>& parts, const std::vector<uint64_t>& offsets) {
  std::vector<std::string_view> views;
  for (const py::bytes& part : parts) views.push_back(View(part));
  Out pairs_out;
  std::vector<Out> wanted(offsets.size());
  {
    py::gil_scoped_release release;
    std::vector<uint64_t> pairs;
    for (std::string_view view : views) {
      const size_t start = pairs.size();
      pairs.resize(start + view.size() / 8);
      std::memcpy(pairs.data() + start, view.data(), view.size() / 8 * 8);
    }
    std::sort(pairs.begin(), pairs.end());
    pairs.erase(std::unique(pairs.begin(), pairs.end()), pairs.end());
    pairs_out.PutAll(absl::MakeConstSpan(pairs));
    std::vector<uint32_t> docs;
    for (uint64_t pair : pairs) {
      docs.push_back(PairFirst(pair));
      docs.push_back(PairSecond(pair));
    }
    std::sort(docs.begin(), docs.end());
    docs.erase(std::unique(docs.begin(), docs.end()), docs.end());
    size_t shard = 0;
    for (uint32_t doc : docs) {
      while (shard + 1 < offsets.size() && doc >= offsets[shard + 1]) ++shard;
      wanted[shard].Put<uint32_t>(static_cast<uint32_t>(doc - offsets[shard]));
    }
  }
  py::list want;
  for (const Out& w : wanted) want.append(w.Bytes());
  return py::make_tuple(pairs_out.Bytes(), want);
}

// Signs the wanted documents of a shard again (read with a filter, so
// that the others are only skipped) and checks each against the band-key
// digest of its first reading. Returns ordinal -> (set size, signature, set).
absl::StatusOr<absl::flat_hash_map<uint32_t, std::string>> SignAgain(
    const std::string& path, const InputOptions& input, const SignatureSettings& settings,
    Banding banding, const std::vector<uint32_t>& digests, const std::vector<uint8_t>& wanted) {
  auto reader = CorpusReader::Open({path}, input);
  if (!reader.ok()) return reader.status();
  auto shingler = Shingler::Create(settings);
  if (!shingler.ok()) return shingler.status();
  (*reader)->SetFilter([&wanted](uint64_t n) { return n < wanted.size() && wanted[n] != 0; });
  const Signer signer(settings);
  std::vector<uint32_t> signature(settings.perms);
  std::vector<uint64_t> keys(banding.bands);
  ShingleSet set;
  std::vector<Document> batch;
  absl::flat_hash_map<uint32_t, std::string> out;
  for (;;) {
    absl::StatusOr<size_t> count = (*reader)->ReadBatch(&batch, 1024, 16 << 20);
    if (!count.ok()) return count.status();
    if (*count == 0) break;
    for (const Document& doc : batch) {
      if (absl::Status s = (*shingler)->Shingle(doc.text, &set); !s.ok()) return s;
      signer.Sign(set, absl::MakeSpan(signature));
      SignedCorpus::LeanBandKeys(banding, set.empty(), signature, absl::MakeSpan(keys));
      if (doc.ordinal >= digests.size() ||
          SignedCorpus::BandKeyDigest(keys) != digests[doc.ordinal]) {
        return InputChanged(absl::StrCat(path, doc.source.line > 0 ? ":" : "",
                                         doc.source.line > 0 ? absl::StrCat(doc.source.line) : "",
                                         ": document \"", doc.id,
                                         "\" changed since it was first read; run again"));
      }
      Out record;
      record.Put<uint32_t>(static_cast<uint32_t>(set.size()));
      record.PutAll(absl::MakeConstSpan(signature));
      record.PutAll(absl::MakeConstSpan(set));
      out[static_cast<uint32_t>(doc.ordinal)] = std::move(record.str());
    }
  }
  return out;
}

// read_sets: a shard read again for the documents each verify range wants
// from it (local numbers) -> per range: (global number, set size,
// signature, set).
py::list ReadSets(const std::string& path, const py::handle& settings_object,
                  const std::string& input_format, const std::string& id_field,
                  const std::string& text_field, const std::string& priority_field, uint32_t bands,
                  uint32_t rows, const py::bytes& digest_bytes,
                  const std::vector<py::bytes>& wanted, uint64_t offset) {
  const SignatureSettings settings = ToSignature(settings_object);
  const InputOptions input = ToInput(input_format, id_field, text_field, priority_field);
  const std::string_view digest_view = View(digest_bytes);
  std::vector<uint32_t> digests(digest_view.size() / 4);
  std::memcpy(digests.data(), digest_view.data(), digests.size() * 4);
  std::vector<std::vector<uint32_t>> lists;
  std::vector<uint8_t> any(digests.size(), 0);
  for (const py::bytes& w : wanted) {
    const std::string_view view = View(w);
    lists.emplace_back(view.size() / 4);
    std::memcpy(lists.back().data(), view.data(), lists.back().size() * 4);
    for (uint32_t doc : lists.back()) any[doc] = 1;
  }
  std::vector<Out> out(lists.size());
  absl::Status status;
  {
    py::gil_scoped_release release;
    auto records = SignAgain(path, input, settings, Banding{bands, rows}, digests, any);
    status = records.status();
    for (size_t v = 0; status.ok() && v < lists.size(); ++v) {
      for (uint32_t doc : lists[v]) {
        auto it = records->find(doc);
        if (it == records->end()) {
          status = InputChanged(absl::StrCat(path, ": fewer documents than when first read"));
          break;
        }
        out[v].Put<uint32_t>(static_cast<uint32_t>(offset + doc));
        out[v].str().append(it->second);
      }
    }
  }
  Check(status);
  py::list result;
  for (const Out& o : out) result.append(o.Bytes());
  return result;
}

// write_kept: a shard's kept documents (all but `dropped`, u32 local
// numbers ascending) into `lines_path` in the shard's own format
// (WriteKept: JSON Lines lines or WARC records, verbatim, whole or not at
// all). Returns the documents kept.
uint64_t WriteKeptShard(const std::string& path, const std::string& input_format,
                        const std::string& id_field, const std::string& text_field,
                        const std::string& priority_field, const py::bytes& dropped_bytes,
                        uint64_t documents, const std::string& lines_path) {
  const InputOptions input = ToInput(input_format, id_field, text_field, priority_field);
  const std::string_view view = View(dropped_bytes);
  std::vector<uint32_t> dropped(view.size() / 4);
  std::memcpy(dropped.data(), view.data(), dropped.size() * 4);
  absl::StatusOr<KeptCounts> counts;
  {
    py::gil_scoped_release release;
    auto reader = CorpusReader::Open({path}, input);
    if (!reader.ok()) {
      counts = reader.status();
    } else {
      KeptRequest request;
      request.inputs = (*reader)->ResolvedInputs();
      request.options = input;
      request.keep = [&dropped](uint64_t ordinal) {
        return !std::binary_search(dropped.begin(), dropped.end(), ordinal);
      };
      request.expected_documents = documents;
      request.output.lines_path = lines_path;
      counts = WriteKept(request);
    }
  }
  return Take(std::move(counts)).kept;
}

}  // namespace

void RegisterStages(py::module_& module) {
  module.def("stage_sign_shard", &SignShard, py::arg("path"), py::arg("settings"),
             py::arg("input_format"), py::arg("id_field"), py::arg("text_field"),
             py::arg("priority_field"), py::arg("bands"), py::arg("rows"), py::arg("partitions"),
             py::arg("threads") = 1);
  module.def("stage_candidates", &Candidates, py::arg("parts"), py::arg("offsets"),
             py::arg("documents"), py::arg("perms"), py::arg("bands"), py::arg("rows"),
             py::arg("ranges"), py::arg("max_bucket"));
  module.def("stage_verify_plan", &VerifyPlan, py::arg("parts"), py::arg("offsets"));
  module.def("stage_read_sets", &ReadSets, py::arg("path"), py::arg("settings"),
             py::arg("input_format"), py::arg("id_field"), py::arg("text_field"),
             py::arg("priority_field"), py::arg("bands"), py::arg("rows"), py::arg("digests"),
             py::arg("wanted"), py::arg("offset"));
  module.def("stage_write_kept", &WriteKeptShard, py::arg("path"), py::arg("input_format"),
             py::arg("id_field"), py::arg("text_field"), py::arg("priority_field"),
             py::arg("dropped"), py::arg("documents"), py::arg("lines_path"));
  RegisterReduceStages(module);
  module.def(
      "choose_banding",
      [](double threshold, uint32_t perms) {
        const Banding b = ChooseBanding(threshold, perms);
        return py::make_tuple(b.bands, b.rows);
      },
      py::arg("threshold"), py::arg("perms"));
}

}  // namespace kindred::python
