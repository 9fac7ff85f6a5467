// kindred Python extension: what every binding shares. Statuses become
// Python exceptions of kindred.errors (one class per ErrorKind, under
// KindredError), and keyword settings become the library's settings.
#ifndef KINDRED_PYTHON_CONVERT_H_
#define KINDRED_PYTHON_CONVERT_H_

#include <pybind11/pybind11.h>

#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "kindred/corpus.h"
#include "kindred/index_query.h"
#include "kindred/settings.h"

namespace kindred::python {

namespace py = pybind11;

// Raises the kindred.errors class of status's kind with its message. The
// GIL must be held. Requires !status.ok().
[[noreturn]] void Raise(const absl::Status& status);

// Raises unless ok.
inline void Check(const absl::Status& status) {
  if (!status.ok()) Raise(status);
}
template <typename T>
T Take(absl::StatusOr<T> value) {
  if (!value.ok()) Raise(value.status());
  return *std::move(value);
}

// The signature settings of the Python Settings object (kindred.Settings).
SignatureSettings ToSignature(const py::handle& settings);

// The input options the sweep and the shard stages take (format name, and
// the JSON field names; empty keeps the defaults).
InputOptions ToInput(const std::string& input_format, const std::string& id_field,
                     const std::string& text_field, const std::string& priority_field);

// Documents given as an iterable of (id, text) pairs (str or bytes each),
// read with the GIL held.
std::vector<TextDocument> ToDocuments(const py::iterable& documents);

// Registers Settings, and the functions of text_api.cc, index_api.cc,
// sweep_api.cc and stages.cc on `module`.
void RegisterSettings(py::module_& module);
void RegisterText(py::module_& module);
void RegisterIndex(py::module_& module);
void RegisterSweep(py::module_& module);
void RegisterStages(py::module_& module);
void RegisterReduceStages(py::module_& module);

}  // namespace kindred::python

#endif  // KINDRED_PYTHON_CONVERT_H_
