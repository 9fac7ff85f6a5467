// A sweep for Python: kindred.sweep over files (RunSweep, as `kindred sweep`
// runs it) or over in-memory (id, text) documents (TextSigner, then
// MatchCorpus), and its pairs, groups and decision records.
#include <pybind11/stl.h>

#include <memory>

#include "convert.h"
#include "kindred/errors.h"
#include "kindred/records.h"
#include "kindred/sweep.h"

namespace kindred::python {
namespace {

struct PySweep {
  std::shared_ptr<SweepResult> result;
  SweepOptions options;
};

// The sweep options of the keyword arguments; errors are InvalidRequest.
SweepOptions ToOptions(const py::handle& settings, double threshold, const std::string& measure,
                       uint32_t bands, uint32_t rows, uint32_t min_contained_size,
                       const std::string& keep, const std::string& grouping, uint64_t max_bucket,
                       bool exhaustive, int threads) {
  SweepOptions options;
  options.signature = ToSignature(settings);
  options.match.threshold = threshold;
  options.match.measure = Take(ParseMeasure(measure));
  options.match.bands = bands;
  options.match.rows = rows;
  options.match.min_contained_size = min_contained_size;
  Check(WithKind(options.match.Validate(options.signature), ErrorKind::kInvalidRequest));
  options.keep = Take(ParseKeepPolicy(keep));
  options.grouping = Take(ParseGrouping(grouping));
  if (max_bucket < 2) Raise(InvalidRequest("max_bucket must be at least 2"));
  options.max_bucket = max_bucket;
  options.exhaustive = exhaustive;
  options.sign.threads = std::max(1, threads);
  return options;
}

PySweep SweepFiles(std::vector<std::string> inputs, const SweepOptions& options,
                   const InputOptions& input) {
  if (inputs.empty()) Raise(InvalidRequest("give at least one input"));
  if (options.keep == KeepPolicy::kPriority && input.priority_field.empty()) {
    Raise(InvalidRequest("keep='priority' needs priority_field"));
  }
  PySweep sweep{nullptr, options};
  absl::Status status;
  {
    py::gil_scoped_release release;
    auto reader = CorpusReader::Open(std::move(inputs), input);
    if (reader.ok()) {
      auto result = RunSweep(**reader, options);
      if (result.ok()) sweep.result = std::make_shared<SweepResult>(*std::move(result));
      status = result.status();
    } else {
      status = reader.status();
    }
  }
  Check(status);
  return sweep;
}

PySweep SweepTexts(const py::iterable& documents, const SweepOptions& options) {
  std::vector<TextDocument> docs = ToDocuments(documents);
  PySweep sweep{std::make_shared<SweepResult>(options.signature.perms), options};
  absl::Status status;
  {
    py::gil_scoped_release release;
    auto signer = TextSigner::Create(options.signature);
    status = signer.ok() ? (*signer)->Sign(docs, &sweep.result->corpus, &sweep.result->stats.sign)
                         : signer.status();
    if (status.ok()) MatchCorpus(sweep.result->corpus, options, sweep.result.get());
  }
  Check(status);
  return sweep;
}

std::string Records(const PySweep& sweep, const std::string& kind, const std::string& format_name) {
  const RecordFormat format = Take(ParseRecordFormat(format_name));
  const SweepResult& result = *sweep.result;
  const auto ids = result.corpus.ids();
  std::string out;
  if (kind == "pairs") {
    WritePairRecords(format, result.pairs, ids, &out);
  } else if (kind == "groups") {
    WriteGroupRecords(format, result.groups, ids, sweep.options.keep, &out, sweep.options.grouping);
  } else if (kind == "decisions") {
    std::vector<uint8_t> empty(result.corpus.size());
    for (size_t doc = 0; doc < empty.size(); ++doc) {
      empty[doc] = result.corpus.shingle_count(doc) == 0;
    }
    WriteDecisionRecords(format, result.groups, result.pairs, ids, empty, sweep.options.keep, &out,
                         result.corpus.all_facts(), sweep.options.grouping);
  } else {
    Raise(InvalidRequest("records: expected pairs, groups or decisions, not \"" + kind + "\""));
  }
  return out;
}

py::dict Stats(const PySweep& sweep) {
  const SweepStats& s = sweep.result->stats;
  py::dict out;
  out["documents"] = s.sign.documents;
  out["empty_documents"] = s.sign.empty_documents;
  out["bytes"] = s.sign.bytes;
  out["bands"] = s.banding.bands;
  out["rows"] = s.banding.rows;
  out["candidate_pairs"] = s.candidates.candidate_pairs;
  out["largest_bucket"] = s.candidates.largest_bucket;
  out["oversized_buckets"] = s.candidates.oversized_buckets;
  out["confirmed_pairs"] = s.confirmed_pairs;
  out["groups"] = s.groups;
  out["drops"] = s.drops;
  out["sign_seconds"] = s.sign_seconds;
  out["match_seconds"] = s.match_seconds;
  return out;
}

void RegisterSweepHandle(py::module_& module) {
  py::class_<PySweep>(module, "SweepHandle", "The result of a sweep (see kindred.SweepResult).")
      .def_property_readonly("ids",
                             [](const PySweep& s) {
                               py::list ids;
                               for (const std::string& id : s.result->corpus.ids()) ids.append(id);
                               return ids;
                             })
      .def_property_readonly("pairs",
                             [](const PySweep& s) {
                               py::list out;
                               for (const ScoredPair& p : s.result->pairs) {
                                 out.append(py::make_tuple(p.a, p.b, p.jaccard, p.estimate,
                                                           p.shared, p.size_a, p.size_b));
                               }
                               return out;
                             })
      .def_property_readonly("groups",
                             [](const PySweep& s) {
                               py::list out;
                               for (const Group& g : s.result->groups) {
                                 out.append(py::make_tuple(g.keeper, g.members));
                               }
                               return out;
                             })
      .def_property_readonly("empty",
                             [](const PySweep& s) {
                               py::list out;
                               for (size_t d = 0; d < s.result->corpus.size(); ++d) {
                                 out.append(s.result->corpus.shingle_count(d) == 0);
                               }
                               return out;
                             })
      .def_property_readonly("stats", &Stats)
      .def("records", &Records, py::arg("kind"), py::arg("format") = "jsonl");
}

}  // namespace

void RegisterSweep(py::module_& module) {
  RegisterSweepHandle(module);

  auto options = [](const py::kwargs& kw) {
    auto get = [&](const char* name, auto fallback) {
      return kw.contains(name) ? kw[name].cast<decltype(fallback)>() : fallback;
    };
    return ToOptions(kw.contains("settings") ? kw["settings"] : py::none(), get("threshold", 0.8),
                     get("measure", std::string("jaccard")), get("bands", uint32_t{0}),
                     get("rows", uint32_t{0}), get("min_contained_size", kDefaultMinContainedSize),
                     get("keep", std::string("first")), get("grouping", std::string("components")),
                     get("max_bucket", kDefaultMaxBucket), get("exhaustive", false),
                     get("threads", 1));
  };
  module.def(
      "sweep_files",
      [options](std::vector<std::string> inputs, const std::string& input_format,
                const std::string& id_field, const std::string& text_field,
                const std::string& priority_field, const py::kwargs& kw) {
        return SweepFiles(std::move(inputs), options(kw),
                          ToInput(input_format, id_field, text_field, priority_field));
      },
      py::arg("inputs"), py::arg("input_format") = "auto", py::arg("id_field") = "id",
      py::arg("text_field") = "text", py::arg("priority_field") = "");
  module.def(
      "sweep_texts",
      [options](const py::iterable& documents, const py::kwargs& kw) {
        return SweepTexts(documents, options(kw));
      },
      py::arg("documents"));
}

}  // namespace kindred::python
