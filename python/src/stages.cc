// The map-side stages of the cluster sweep (kindred.cluster): each a pure
// function from bytes to bytes that calls the library's stage functions
// (kindred/sweep_stages.h) over the records documented in
// src/core/RECORDS.md, so that the cluster and a local sweep share one
// implementation. A task re-run after a lost worker gives the same bytes.
// python/kindred/cluster/RECORDS.md says what each task sends where.
//
//   sign_shard   a shard -> SignShard (lean, documents numbered 0.. in the
//                shard) -> its document table and its band-key table cut
//                into P partitions (ShardOptions::key_partitions: written
//                from the signer's keys)
//   candidates   one partition's band-key tables from every shard, their
//                documents numbered on by the shards' offsets ->
//                MergeBandKeys -> FindPartitionCandidates, cut into V verify
//                ranges of first documents
//   plan         one range's candidate pairs from every partition ->
//                MergeCandidatePairs, and CandidateDocuments by shard
//   read_sets    a shard read again for its wanted documents only ->
//                ReadShardSets (checked against the shard's document
//                table) -> one set store per verify range
//   write_kept   a shard's kept documents, in its own format
// Verify, the connected-components edges and finish are in stages_reduce.cc.
#include <pybind11/stl.h>

#include <algorithm>
#include <cstring>
#include <string>
#include <vector>

#include "convert.h"
#include "kindred/banding.h"
#include "kindred/corpus.h"
#include "kindred/errors.h"
#include "kindred/kept_writer.h"
#include "kindred/sweep_stages.h"
#include "stage_bytes.h"

namespace kindred::python {
namespace {

// The verify range of document `doc` among `documents`: ranges of
// consecutive documents, so that ranges in order give pairs in order.
uint32_t RangeOf(uint32_t doc, uint64_t documents, uint32_t ranges) {
  return static_cast<uint32_t>(uint64_t{doc} * ranges / std::max<uint64_t>(documents, 1));
}

std::vector<uint32_t> U32s(std::string_view bytes) {
  std::vector<uint32_t> out(bytes.size() / 4);
  std::memcpy(out.data(), bytes.data(), out.size() * 4);
  return out;
}

py::bytes U32Bytes(absl::Span<const uint32_t> values) {
  return py::bytes(reinterpret_cast<const char*>(values.data()), values.size() * 4);
}

// sign_shard: (document table, [band-key table of partition p]).
py::tuple SignShardStage(const std::string& path, const py::handle& settings_object,
                         const std::string& input_format, const std::string& id_field,
                         const std::string& text_field, const std::string& priority_field,
                         uint32_t bands, uint32_t rows, uint32_t partitions, int threads) {
  const SignatureSettings settings = ToSignature(settings_object);
  const InputOptions input = ToInput(input_format, id_field, text_field, priority_field);
  std::string table;
  std::vector<std::string> parts;
  absl::Status status;
  {
    py::gil_scoped_release release;
    auto reader = CorpusReader::Open({path}, input);
    status = reader.status();
    if (status.ok()) {
      ShardOptions options;
      options.sign.threads = std::max(1, threads);
      options.key_partitions = std::max<uint32_t>(partitions, 1);
      auto shard = SignShard(**reader, settings, Banding{bands, rows}, options);
      status = shard.status();
      if (status.ok()) {
        table = SerializeDocumentTable(shard->documents);
        parts = std::move(shard->band_key_bytes);
      }
    }
  }
  Check(status);
  py::list out;
  for (const std::string& part : parts) out.append(py::bytes(part));
  return py::make_tuple(py::bytes(table), out);
}

// candidates: one partition's band-key tables, one per shard in order
// (shard s numbers its documents from 0; offsets[s] before it) -> [the
// candidate pairs whose first document is in range v]. The counts of the
// search travel in range 0's record.
py::list CandidatesStage(const std::vector<py::bytes>& parts, const std::vector<uint64_t>& offsets,
                         uint64_t documents, uint32_t ranges, uint64_t max_bucket) {
  std::vector<std::string_view> views;
  for (const py::bytes& part : parts) views.push_back(View(part));
  std::vector<std::string> out(ranges);
  absl::Status status;
  {
    py::gil_scoped_release release;
    std::vector<BandKeyTable> tables;
    for (size_t s = 0; s < views.size() && status.ok(); ++s) {
      auto table = ParseBandKeyTable(views[s]);
      status = table.status();
      if (!status.ok()) break;
      for (BandKeyRecord& row : table->records) row.document += static_cast<uint32_t>(offsets[s]);
      tables.push_back(*std::move(table));
    }
    if (status.ok()) {
      const CandidatePairs found = FindPartitionCandidates(MergeBandKeys(tables), max_bucket);
      std::vector<CandidatePairs> split(ranges);
      split[0].stats = found.stats;
      for (PackedPair pair : found.pairs) {
        split[RangeOf(PairFirst(pair), documents, ranges)].pairs.push_back(pair);
      }
      for (uint32_t v = 0; v < ranges; ++v) {
        split[v].stats.candidate_pairs = split[v].pairs.size();
        out[v] = SerializeCandidatePairs(split[v]);
      }
    }
  }
  Check(status);
  py::list result;
  for (const std::string& o : out) result.append(py::bytes(o));
  return result;
}

// plan: one range's candidate pairs from every partition -> (the pairs
// merged, [documents wanted from shard s: u32 numbers in the whole corpus,
// ascending]).
py::tuple PlanStage(const std::vector<py::bytes>& parts, const std::vector<uint64_t>& offsets) {
  std::vector<std::string_view> views;
  for (const py::bytes& part : parts) views.push_back(View(part));
  std::string merged;
  std::vector<std::vector<uint32_t>> wanted(offsets.size());
  absl::Status status;
  {
    py::gil_scoped_release release;
    std::vector<CandidatePairs> found;
    for (std::string_view view : views) {
      auto pairs = ParseCandidatePairs(view);
      status = pairs.status();
      if (!status.ok()) break;
      found.push_back(*std::move(pairs));
    }
    if (status.ok()) {
      const CandidatePairs all = MergeCandidatePairs(found);
      merged = SerializeCandidatePairs(all);
      size_t shard = 0;
      for (uint32_t doc : CandidateDocuments(all.pairs)) {
        while (shard + 1 < offsets.size() && doc >= offsets[shard + 1]) ++shard;
        wanted[shard].push_back(doc);
      }
    }
  }
  Check(status);
  py::list want;
  for (const std::vector<uint32_t>& w : wanted) want.append(U32Bytes(w));
  return py::make_tuple(py::bytes(merged), want);
}

// read_sets: a shard read again for the documents each verify range wants
// from it (u32 numbers in the whole corpus) -> [set store of range v].
// `table` is the shard's document table from sign_shard: a document that
// differs from its row is an InputChangedError naming the shard and line.
py::list ReadSetsStage(const std::string& path, const py::handle& settings_object,
                       const std::string& input_format, const std::string& id_field,
                       const std::string& text_field, const std::string& priority_field,
                       const py::bytes& table_bytes, const std::vector<py::bytes>& wanted,
                       uint64_t offset) {
  const SignatureSettings settings = ToSignature(settings_object);
  const InputOptions input = ToInput(input_format, id_field, text_field, priority_field);
  const std::string_view table_view = View(table_bytes);
  std::vector<std::vector<uint32_t>> lists;
  for (const py::bytes& w : wanted) lists.push_back(U32s(View(w)));
  std::vector<std::string> out(lists.size());
  absl::Status status;
  {
    py::gil_scoped_release release;
    std::vector<uint32_t> all;
    for (const std::vector<uint32_t>& list : lists) all.insert(all.end(), list.begin(), list.end());
    std::sort(all.begin(), all.end());
    all.erase(std::unique(all.begin(), all.end()), all.end());
    auto table = ParseDocumentTable(table_view);
    auto reader = CorpusReader::Open({path}, input);
    status = table.ok() ? reader.status() : table.status();
    absl::StatusOr<SetStore> sets = SetStore(settings.perms);
    if (status.ok()) {
      ShardOptions options;
      options.first_document = static_cast<uint32_t>(offset);
      options.expected = &*table;
      sets = ReadShardSets(**reader, settings, options, all);
      status = sets.status();
    }
    for (size_t v = 0; status.ok() && v < lists.size(); ++v) {
      SetStore part(settings.perms);
      for (uint32_t doc : lists[v]) part.Add(doc, sets->shingles(doc), sets->signature(doc));
      out[v] = SerializeSetStore(part);
    }
  }
  Check(status);
  py::list result;
  for (const std::string& o : out) result.append(py::bytes(o));
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
  const std::vector<uint32_t> dropped = U32s(View(dropped_bytes));
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
  module.def("stage_sign_shard", &SignShardStage, py::arg("path"), py::arg("settings"),
             py::arg("input_format"), py::arg("id_field"), py::arg("text_field"),
             py::arg("priority_field"), py::arg("bands"), py::arg("rows"), py::arg("partitions"),
             py::arg("threads") = 1);
  module.def("stage_candidates", &CandidatesStage, py::arg("parts"), py::arg("offsets"),
             py::arg("documents"), py::arg("ranges"), py::arg("max_bucket"));
  module.def("stage_plan", &PlanStage, py::arg("parts"), py::arg("offsets"));
  module.def("stage_read_sets", &ReadSetsStage, py::arg("path"), py::arg("settings"),
             py::arg("input_format"), py::arg("id_field"), py::arg("text_field"),
             py::arg("priority_field"), py::arg("table"), py::arg("wanted"), py::arg("offset"));
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
