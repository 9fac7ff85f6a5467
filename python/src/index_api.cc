// An index file for Python: kindred.Index (open, create, check, add), the
// steps `kindred check` and `kindred add` run (index_query.h).
#include <pybind11/stl.h>

#include <memory>
#include <optional>

#include "convert.h"
#include "kindred/banding.h"
#include "kindred/errors.h"
#include "kindred/index.h"
#include "kindred/index_writer.h"
#include "kindred/text.h"

namespace kindred::python {
namespace {

// An open index: a reader of the committed file, opened again after an add.
class PyIndex {
 public:
  explicit PyIndex(std::string path) : path_(std::move(path)) { Reopen(); }

  void Reopen() {
    std::unique_ptr<IndexReader> reader;
    absl::Status status;
    {
      py::gil_scoped_release release;
      auto opened = IndexReader::Open(path_);
      if (opened.ok()) reader = *std::move(opened);
      status = opened.status();
    }
    Check(status);
    reader_ = std::move(reader);
  }

  const IndexReader& reader() const { return *reader_; }
  const std::string& path() const { return path_; }

  // Matches of `documents` against the index (check), or the matches and
  // actions of an add under `policy`.
  py::tuple Run(const py::iterable& documents, std::optional<DuplicateIdPolicy> policy,
                const QueryRequest& request, int threads, uint64_t max_bucket) {
    std::vector<TextDocument> docs = ToDocuments(documents);
    auto match = ResolveQueryMatch(reader_->settings(), request);
    if (!match.ok()) Raise(WithKind(match.status(), ErrorKind::kInvalidRequest));
    SignedCorpus batch(reader_->settings().signature.perms);
    std::vector<IndexMatch> matches;
    std::optional<AppendResult> appended;
    absl::Status status;
    {
      py::gil_scoped_release release;
      // An add takes the lock first, as `kindred add` does.
      std::unique_ptr<IndexWriter> writer;
      if (policy.has_value()) {
        auto opened = IndexWriter::Open(path_);
        if (opened.ok()) writer = *std::move(opened);
        status = opened.status();
      }
      if (status.ok()) status = Match(docs, *match, policy, threads, max_bucket, &batch, &matches);
      if (status.ok() && writer != nullptr) {
        auto result = writer->Append(batch, *policy);
        if (result.ok()) appended = *std::move(result);
        status = result.status();
      }
    }
    Check(status);
    py::list out;
    for (const IndexMatch& m : matches) {
      const std::string other =
          m.in_index ? std::string(matched_->id(m.other())) : batch.id(m.other());
      const ScoredPair& p = m.pair;
      out.append(py::make_tuple(batch.id(m.query()), other, m.in_index, p.jaccard, p.estimate,
                                p.shared, p.size_a, p.size_b));
    }
    py::list actions;
    if (appended.has_value()) {
      for (size_t i = 0; i < batch.size(); ++i) {
        actions.append(py::make_tuple(batch.id(i), AddActionName(appended->actions[i])));
      }
      Reopen();
    }
    matched_.reset();
    return py::make_tuple(out, actions);
  }

 private:
  absl::Status Match(const std::vector<TextDocument>& docs, const MatchSettings& match,
                     std::optional<DuplicateIdPolicy> policy, int threads, uint64_t max_bucket,
                     SignedCorpus* batch, std::vector<IndexMatch>* matches) {
    auto signer = TextSigner::Create(reader_->settings().signature);
    if (!signer.ok()) return signer.status();
    if (absl::Status s = (*signer)->Sign(docs, batch); !s.ok()) return s;
    // A reader of its own when the query bands otherwise than the file.
    auto reader = IndexReader::Open(path_);
    if (!reader.ok()) return reader.status();
    if (NeedsOtherBanding((*reader)->settings(), match)) {
      if (absl::Status s = (*reader)->UseBanding(match.bands, match.rows); !s.ok()) return s;
    }
    IndexMatchOptions options{match, std::max(1, threads), false};
    options.max_bucket = max_bucket;
    auto found = MatchForQuery(**reader, *batch, policy, options);
    if (!found.ok()) return found.status();
    *matches = *std::move(found);
    matched_ = *std::move(reader);
    return absl::OkStatus();
  }

  std::string path_;
  std::unique_ptr<IndexReader> reader_;
  std::unique_ptr<IndexReader> matched_;  // the reader of the last query
};

QueryRequest ToRequest(std::optional<double> threshold, std::optional<std::string> measure,
                       uint32_t bands, uint32_t rows) {
  QueryRequest request;
  request.threshold = threshold;
  if (measure.has_value()) {
    auto parsed = ParseMeasure(*measure);
    if (!parsed.ok()) Raise(WithKind(parsed.status(), ErrorKind::kInvalidRequest));
    request.measure = *parsed;
  }
  request.bands = bands;
  request.rows = rows;
  return request;
}

void CreateEmpty(const std::string& path, const py::handle& settings_object, double threshold,
                 uint32_t bands, uint32_t rows) {
  IndexSettings settings;
  settings.signature = ToSignature(settings_object);
  MatchSettings match;
  match.threshold = threshold;
  match.bands = bands;
  match.rows = rows;
  Check(WithKind(match.Validate(settings.signature), ErrorKind::kInvalidRequest));
  const Banding banding = ResolveBanding(match, settings.signature.perms);
  settings.bands = banding.bands;
  settings.rows = banding.rows;
  settings.threshold = threshold;
  settings.unicode_version = UnicodeVersionString();
  absl::Status status;
  {
    py::gil_scoped_release release;
    status = CreateIndex(path, settings, SignedCorpus(settings.signature.perms));
  }
  Check(status);
}

}  // namespace

void RegisterIndex(py::module_& module) {
  module.def("create_index", &CreateEmpty, py::arg("path"), py::arg("settings") = py::none(),
             py::arg("threshold") = 0.8, py::arg("bands") = 0, py::arg("rows") = 0,
             "Creates an empty index file (never replaces a file).");
  py::class_<PyIndex>(module, "IndexHandle", "An open index file (see kindred.Index).")
      .def(py::init<std::string>(), py::arg("path"))
      .def_property_readonly("path", &PyIndex::path)
      .def_property_readonly("documents",
                             [](const PyIndex& index) { return index.reader().live_count(); })
      .def_property_readonly(
          "settings", [](const PyIndex& index) { return index.reader().settings().signature; })
      .def_property_readonly(
          "threshold", [](const PyIndex& index) { return index.reader().settings().threshold; })
      .def_property_readonly("banding",
                             [](const PyIndex& index) {
                               return py::make_tuple(index.reader().settings().bands,
                                                     index.reader().settings().rows);
                             })
      .def("reopen", &PyIndex::Reopen)
      .def(
          "run",
          [](PyIndex& index, const py::iterable& documents, std::optional<std::string> on_duplicate,
             std::optional<double> threshold, std::optional<std::string> measure, uint32_t bands,
             uint32_t rows, int threads, uint64_t max_bucket) {
            std::optional<DuplicateIdPolicy> policy;
            if (on_duplicate.has_value()) {
              auto parsed = ParseDuplicateIdPolicy(*on_duplicate);
              if (!parsed.ok()) Raise(WithKind(parsed.status(), ErrorKind::kInvalidRequest));
              policy = *parsed;
            }
            return index.Run(documents, policy, ToRequest(threshold, measure, bands, rows), threads,
                             max_bucket);
          },
          py::arg("documents"), py::arg("on_duplicate") = py::none(),
          py::arg("threshold") = py::none(), py::arg("measure") = py::none(), py::arg("bands") = 0,
          py::arg("rows") = 0, py::arg("threads") = 1, py::arg("max_bucket") = kDefaultMaxBucket);
}

}  // namespace kindred::python
