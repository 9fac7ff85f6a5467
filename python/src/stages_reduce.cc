// The reduce-side stages of the cluster sweep (see stages.cc for the
// others): verify a range's candidate pairs on their sets, the edges of the
// confirmed pairs for the connected-components rounds, and finish: groups
// and the record files' bytes. Pure functions from bytes to bytes over the
// library's stage functions (kindred/sweep_stages.h) and records.
#include <pybind11/stl.h>

#include <algorithm>
#include <cstring>
#include <optional>
#include <string>
#include <vector>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/str_cat.h"
#include "convert.h"
#include "kindred/errors.h"
#include "kindred/groups.h"
#include "kindred/records.h"
#include "kindred/sweep_stages.h"
#include "stage_bytes.h"

namespace kindred::python {
namespace {

// verify: a range's candidate pairs and the set stores of their documents
// (one per shard) -> scored pairs, ascending (VerifyCandidates).
py::bytes VerifyStage(const py::bytes& pairs_bytes, const std::vector<py::bytes>& sets,
                      double threshold, uint32_t bands, uint32_t rows) {
  MatchSettings match;
  match.threshold = threshold;
  match.bands = bands;
  match.rows = rows;
  const std::string_view pair_view = View(pairs_bytes);
  std::vector<std::string_view> views;
  for (const py::bytes& s : sets) views.push_back(View(s));
  std::string out;
  absl::Status status;
  {
    py::gil_scoped_release release;
    auto pairs = ParseCandidatePairs(pair_view);
    status = pairs.status();
    SetStore store;
    for (size_t s = 0; status.ok() && s < views.size(); ++s) {
      auto part = ParseSetStore(views[s]);
      status = part.status();
      if (!status.ok()) break;
      if (s == 0) store = SetStore(part->perms());
      store.Merge(*part);
    }
    if (status.ok()) {
      auto scored = VerifyCandidates(pairs->pairs, store, match, 1);
      status = scored.status();
      if (status.ok()) out = SerializeScoredPairs(*scored);
    }
  }
  Check(status);
  return py::bytes(out);
}

// pair_ends: scored pairs -> their two documents, u32 a then u32 b each.
py::bytes PairEnds(const py::bytes& scored) {
  const std::string_view view = View(scored);
  std::vector<uint32_t> ends;
  absl::Status status;
  {
    py::gil_scoped_release release;
    auto pairs = ParseScoredPairs(view);
    status = pairs.status();
    if (status.ok()) {
      ends.reserve(pairs->size() * 2);
      for (const ScoredPair& p : *pairs) {
        ends.push_back(p.a);
        ends.push_back(p.b);
      }
    }
  }
  Check(status);
  return py::bytes(reinterpret_cast<const char*>(ends.data()), ends.size() * 4);
}

// Every shard's document table joined into the whole corpus's (shard s's
// rows numbered on from the documents before it, DocumentOrigin::input set
// to s); an id repeated across or within shards is the error a local sweep
// reports, worded alike, naming the shards.
absl::StatusOr<DocumentTable> JoinTables(const std::vector<std::string_view>& views,
                                         const std::vector<std::string>& shards) {
  std::vector<DocumentTable> parts;
  size_t total = 0;
  for (size_t s = 0; s < views.size(); ++s) {
    auto table = ParseDocumentTable(views[s]);
    if (!table.ok()) return table.status();
    total += table->documents.size();
    parts.push_back(*std::move(table));
  }
  // The rows concatenated here (the numbers follow from the order), and
  // the ids checked once, in a map sized for them up front: this runs over
  // every document of the corpus in one task.
  DocumentTable all;
  all.documents.reserve(total);
  for (size_t s = 0; s < parts.size(); ++s) {
    for (DocumentRecord& row : parts[s].documents) {
      row.origin.input = static_cast<uint32_t>(s);
      all.documents.push_back(std::move(row));
    }
  }
  parts.clear();
  auto where = [&](const DocumentOrigin& origin) {
    return origin.line > 0 ? absl::StrCat(shards[origin.input], ":", origin.line)
                           : shards[origin.input];
  };
  absl::flat_hash_map<std::string_view, uint32_t> seen;
  seen.reserve(total);
  for (size_t i = 0; i < all.documents.size(); ++i) {
    const DocumentRecord& doc = all.documents[i];
    auto [it, added] = seen.emplace(doc.id, static_cast<uint32_t>(i));
    if (added) continue;
    const DocumentOrigin& was = all.documents[it->second].origin;
    return BadInput(absl::StrCat(
        where(doc.origin), ": duplicate id \"", doc.id, "\" (first seen at ", where(was), ")",
        was.input != doc.origin.input ? "; --ids-with-path makes ids name their files" : ""));
  }
  return all;
}

// The drops of `groups`, by shard, as local numbers ascending.
std::vector<std::vector<uint32_t>> DropsByShard(const std::vector<Group>& groups,
                                                const DocumentTable& table, size_t shards) {
  std::vector<uint32_t> drops;
  for (const Group& group : groups) {
    for (uint32_t member : group.members) {
      if (member != group.keeper) drops.push_back(member);
    }
  }
  std::sort(drops.begin(), drops.end());
  std::vector<uint32_t> first(shards, 0);  // the number of each shard's first document
  for (uint32_t doc = table.documents.size(); doc-- > 0;) {
    first[table.documents[doc].origin.input] = doc;
  }
  std::vector<std::vector<uint32_t>> out(shards);
  for (uint32_t doc : drops) {
    const uint32_t shard = table.documents[doc].origin.input;
    out[shard].push_back(doc - first[shard]);
  }
  return out;
}

// finish: every shard's document table (its name for messages), every
// range's scored pairs in order, and the components as star edges (u32
// member, u32 smallest member of its component; from the
// connected-components rounds; None with grouping "keepers", which is not
// a components question) -> (pairs, groups, decisions record bytes, [drops
// of shard s, u32 local numbers]).
py::tuple FinishStage(const std::vector<py::bytes>& tables, const std::vector<std::string>& shards,
                      const std::vector<py::bytes>& scored, const std::optional<py::bytes>& stars,
                      const std::string& keep_name, const std::string& grouping_name,
                      const std::string& format_name) {
  SweepRecordOptions options;
  options.keep = Take(ParseKeepPolicy(keep_name));
  options.grouping = Take(ParseGrouping(grouping_name));
  options.format = Take(ParseRecordFormat(format_name));
  std::vector<std::string_view> table_views, scored_views;
  for (const py::bytes& t : tables) table_views.push_back(View(t));
  for (const py::bytes& s : scored) scored_views.push_back(View(s));
  const std::string_view star_view = stars ? View(*stars) : std::string_view();
  SweepRecords records;
  std::vector<std::vector<uint32_t>> dropped;
  absl::Status status;
  {
    py::gil_scoped_release release;
    auto table = JoinTables(table_views, shards);
    status = table.status();
    std::vector<std::vector<ScoredPair>> parts;
    for (size_t v = 0; status.ok() && v < scored_views.size(); ++v) {
      auto part = ParseScoredPairs(scored_views[v]);
      status = part.status();
      if (status.ok()) parts.push_back(*std::move(part));
    }
    if (status.ok()) {
      const std::vector<ScoredPair> pairs = MergeScoredPairs(parts);
      // A star per component (its smallest member and every other member)
      // has the components of the confirmed pairs; grouping it is linear.
      std::vector<ScoredPair> star;
      for (size_t i = 0; i + 8 <= star_view.size(); i += 8) {
        ScoredPair edge;
        std::memcpy(&edge.b, star_view.data() + i, 4);
        std::memcpy(&edge.a, star_view.data() + i + 4, 4);
        star.push_back(edge);
      }
      const bool by_star = stars.has_value() && options.grouping == Grouping::kComponents;
      const std::vector<Group> groups =
          GroupDocuments(*table, by_star ? star : pairs, options.keep, options.grouping);
      dropped = DropsByShard(groups, *table, tables.size());
      // FormatSweepRecords's columns, the ids moved out rather than copied.
      std::vector<std::string> ids;
      std::vector<KeepFacts> facts;
      std::vector<uint8_t> empty;
      ids.reserve(table->documents.size());
      facts.reserve(table->documents.size());
      empty.reserve(table->documents.size());
      for (DocumentRecord& doc : table->documents) {
        ids.push_back(std::move(doc.id));
        facts.push_back(doc.facts);
        empty.push_back(doc.shingle_count == 0);
      }
      WriteSweepRecords(options, pairs, groups, ids, facts, empty, &records);
    }
  }
  Check(status);
  py::list drops;
  for (const std::vector<uint32_t>& d : dropped) {
    drops.append(py::bytes(reinterpret_cast<const char*>(d.data()), d.size() * 4));
  }
  return py::make_tuple(py::bytes(records.pairs), py::bytes(records.groups),
                        py::bytes(records.decisions), drops);
}

}  // namespace

void RegisterReduceStages(py::module_& module) {
  module.def("stage_verify", &VerifyStage, py::arg("pairs"), py::arg("sets"), py::arg("threshold"),
             py::arg("bands"), py::arg("rows"));
  module.def("stage_pair_ends", &PairEnds, py::arg("scored"));
  module.def("stage_finish", &FinishStage, py::arg("tables"), py::arg("shards"), py::arg("scored"),
             py::arg("stars"), py::arg("keep"), py::arg("grouping"), py::arg("format"));
}

}  // namespace kindred::python
