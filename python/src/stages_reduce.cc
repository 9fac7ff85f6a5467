// The last stages of the cluster sweep (see stages.cc for the list): verify
// a range's pairs on their sets, and finish: groups and the record files'
// bytes. Pure functions from bytes to bytes over the public API.
#include <pybind11/stl.h>

#include <algorithm>
#include <string>
#include <vector>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/str_cat.h"
#include "convert.h"
#include "kindred/errors.h"
#include "kindred/groups.h"
#include "kindred/records.h"
#include "kindred/signed_corpus.h"
#include "kindred/sweep.h"
#include "stage_bytes.h"

namespace kindred::python {
namespace {

// The extracted sets of a range (from every shard), as a whole corpus of
// those documents in ascending global order; global[i] is the number of
// its document i.
SignedCorpus ReadExtracted(const std::vector<std::string_view>& views, uint32_t perms,
                           std::vector<uint32_t>* global) {
  struct Doc {
    uint32_t global;
    std::string_view record;  // set size, signature, set
  };
  std::vector<Doc> docs;
  for (std::string_view view : views) {
    In in(view);
    size_t at = 0;
    while (!in.done()) {
      const uint32_t number = in.Get<uint32_t>();
      const uint32_t size = in.Get<uint32_t>();
      const size_t rest = perms * sizeof(uint32_t) + size * sizeof(uint64_t);
      in.Skip(rest);
      docs.push_back({number, view.substr(at + 4, 4 + rest)});
      at += 8 + rest;
    }
  }
  std::sort(docs.begin(), docs.end(),
            [](const Doc& a, const Doc& b) { return a.global < b.global; });
  SignedCorpus corpus(perms);
  std::vector<uint32_t> signature(perms);
  std::vector<uint64_t> set;
  for (const Doc& doc : docs) {
    In in(doc.record);
    set.resize(in.Get<uint32_t>());
    in.GetAll(signature.size(), signature.data());
    in.GetAll(set.size(), set.data());
    corpus.Add(std::string(), KeepFacts(), DocumentOrigin(), set, signature);
    global->push_back(doc.global);
  }
  return corpus;
}

void PutScored(const ScoredPair& p, Out* out) {
  out->Put<uint32_t>(p.a);
  out->Put<uint32_t>(p.b);
  out->Put<uint32_t>(p.shared);
  out->Put<uint32_t>(p.size_a);
  out->Put<uint32_t>(p.size_b);
  out->Put<uint32_t>(0);
  out->Put<double>(p.jaccard);
  out->Put<double>(p.estimate);
}

ScoredPair GetScored(In* in) {
  ScoredPair p;
  p.a = in->Get<uint32_t>();
  p.b = in->Get<uint32_t>();
  p.shared = in->Get<uint32_t>();
  p.size_a = in->Get<uint32_t>();
  p.size_b = in->Get<uint32_t>();
  in->Get<uint32_t>();
  p.jaccard = in->Get<double>();
  p.estimate = in->Get<double>();
  return p;
}

// verify: a range's pairs and the sets of their documents (from every
// shard) -> scored pairs, ascending (40 bytes each; RECORDS.md).
py::bytes Verify(const py::bytes& pairs_bytes, const std::vector<py::bytes>& sets,
                 const py::handle& settings_object, double threshold, uint32_t bands,
                 uint32_t rows) {
  const SignatureSettings settings = ToSignature(settings_object);
  MatchSettings match;
  match.threshold = threshold;
  match.bands = bands;
  match.rows = rows;
  const std::string_view pair_view = View(pairs_bytes);
  std::vector<std::string_view> views;
  for (const py::bytes& s : sets) views.push_back(View(s));
  Out out;
  {
    py::gil_scoped_release release;
    std::vector<uint32_t> global;
    const SignedCorpus local = ReadExtracted(views, settings.perms, &global);
    std::vector<PackedPair> pairs(pair_view.size() / 8);
    std::memcpy(pairs.data(), pair_view.data(), pairs.size() * 8);
    auto local_of = [&global](uint32_t doc) {
      return static_cast<uint32_t>(std::lower_bound(global.begin(), global.end(), doc) -
                                   global.begin());
    };
    for (PackedPair& pair : pairs)
      pair = PackPair(local_of(PairFirst(pair)), local_of(PairSecond(pair)));
    for (ScoredPair p : VerifyPairs(local, pairs, match, 1)) {
      p.a = global[p.a];
      p.b = global[p.b];
      PutScored(p, &out);
    }
  }
  return out.Bytes();
}

// What finish needs of every document, from the document tables.
struct Documents {
  std::vector<std::string> ids;
  std::vector<KeepFacts> facts;
  std::vector<uint8_t> empty;
  std::vector<std::pair<uint32_t, uint64_t>> places;  // shard, line
};

Documents ReadTables(const std::vector<std::string_view>& views) {
  Documents docs;
  for (size_t s = 0; s < views.size(); ++s) {
    In in(views[s]);
    const uint32_t count = in.Get<uint32_t>();
    for (uint32_t doc = 0; doc < count; ++doc) {
      KeepFacts f;
      f.length = in.Get<uint64_t>();
      f.priority = in.Get<double>();
      f.has_priority = in.Get<uint8_t>() != 0;
      docs.facts.push_back(f);
      docs.empty.push_back(in.Get<uint32_t>() == 0);
      docs.places.emplace_back(static_cast<uint32_t>(s), in.Get<uint64_t>());
      docs.ids.push_back(in.GetString());
    }
  }
  return docs;
}

// The error a local sweep reports for the first repeated id, worded alike.
absl::Status CheckUniqueIds(const Documents& docs, const std::vector<std::string>& shards) {
  auto where = [&](const std::pair<uint32_t, uint64_t>& place) {
    return place.second > 0 ? absl::StrCat(shards[place.first], ":", place.second)
                            : shards[place.first];
  };
  absl::flat_hash_map<std::string_view, uint32_t> seen;
  for (uint32_t doc = 0; doc < docs.ids.size(); ++doc) {
    auto [it, added] = seen.emplace(docs.ids[doc], doc);
    if (added) continue;
    const auto& first = docs.places[it->second];
    const auto& place = docs.places[doc];
    return BadInput(absl::StrCat(
        where(place), ": duplicate id \"", docs.ids[doc], "\" (first seen at ", where(first), ")",
        first.first != place.first ? "; --ids-with-path makes ids name their files" : ""));
  }
  return absl::OkStatus();
}

// The drops of `groups`, by shard, as local numbers ascending.
void DropsByShard(const std::vector<Group>& groups, const Documents& docs, std::vector<Out>* out) {
  std::vector<uint32_t> drops;
  for (const Group& group : groups) {
    for (uint32_t member : group.members) {
      if (member != group.keeper) drops.push_back(member);
    }
  }
  std::sort(drops.begin(), drops.end());
  std::vector<uint32_t> first(out->size(), 0);  // the number of each shard's first document
  for (uint32_t doc = docs.places.size(); doc-- > 0;) first[docs.places[doc].first] = doc;
  for (uint32_t doc : drops) {
    const uint32_t shard = docs.places[doc].first;
    (*out)[shard].Put<uint32_t>(doc - first[shard]);
  }
}

// finish: every shard's document table (its name for messages) and every
// range's scored pairs, in order -> (pairs, groups, decisions) record bytes.
py::tuple Finish(const std::vector<py::bytes>& tables, const std::vector<std::string>& shards,
                 const std::vector<py::bytes>& scored, const std::string& keep_name,
                 const std::string& grouping_name, const std::string& format_name) {
  const KeepPolicy keep = Take(ParseKeepPolicy(keep_name));
  const Grouping grouping = Take(ParseGrouping(grouping_name));
  const RecordFormat format = Take(ParseRecordFormat(format_name));
  std::vector<std::string_view> table_views, scored_views;
  for (const py::bytes& t : tables) table_views.push_back(View(t));
  for (const py::bytes& s : scored) scored_views.push_back(View(s));
  std::string pairs_out, groups_out, decisions_out;
  std::vector<Out> dropped(tables.size());  // per shard: u32 local numbers of its drops
  absl::Status status;
  {
    py::gil_scoped_release release;
    const Documents docs = ReadTables(table_views);
    status = CheckUniqueIds(docs, shards);
    if (status.ok()) {
      std::vector<ScoredPair> pairs;
      for (std::string_view view : scored_views) {
        for (In in(view); !in.done();) pairs.push_back(GetScored(&in));
      }
      const std::vector<Group> groups = GroupPairs(pairs, docs.facts, keep, grouping);
      WritePairRecords(format, pairs, docs.ids, &pairs_out);
      WriteGroupRecords(format, groups, docs.ids, keep, &groups_out, grouping);
      WriteDecisionRecords(format, groups, pairs, docs.ids, docs.empty, keep, &decisions_out,
                           docs.facts, grouping);
      DropsByShard(groups, docs, &dropped);
    }
  }
  Check(status);
  py::list drops;
  for (const Out& d : dropped) drops.append(d.Bytes());
  return py::make_tuple(py::bytes(pairs_out), py::bytes(groups_out), py::bytes(decisions_out),
                        drops);
}

}  // namespace

void RegisterReduceStages(py::module_& module) {
  module.def("stage_verify", &Verify, py::arg("pairs"), py::arg("sets"), py::arg("settings"),
             py::arg("threshold"), py::arg("bands"), py::arg("rows"));
  module.def("stage_finish", &Finish, py::arg("tables"), py::arg("shards"), py::arg("scored"),
             py::arg("keep"), py::arg("grouping"), py::arg("format"));
}

}  // namespace kindred::python
