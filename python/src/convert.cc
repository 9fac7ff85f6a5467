#include "convert.h"

#include <string_view>

#include "kindred/errors.h"

namespace kindred::python {

void Raise(const absl::Status& status) {
  py::module_ errors = py::module_::import("kindred.errors");
  py::object type = errors.attr("error_class")(std::string(ErrorKindName(KindOf(status))));
  py::object error = type(std::string(status.message()));
  PyErr_SetObject(type.ptr(), error.ptr());
  throw py::error_already_set();
}

SignatureSettings ToSignature(const py::handle& settings) {
  if (settings.is_none()) return SignatureSettings();
  return settings.cast<SignatureSettings>();
}

namespace {

std::string StringOf(const py::handle& value, const char* what) {
  if (py::isinstance<py::bytes>(value)) return value.cast<std::string>();
  if (py::isinstance<py::str>(value)) return value.cast<std::string>();
  if (py::isinstance<py::int_>(value) && std::string_view(what) == "id") {
    return py::str(value).cast<std::string>();
  }
  throw py::type_error(std::string("document ") + what + " must be str or bytes");
}

}  // namespace

std::vector<TextDocument> ToDocuments(const py::iterable& documents) {
  std::vector<TextDocument> out;
  for (const py::handle item : documents) {
    py::tuple pair = py::reinterpret_borrow<py::object>(item).cast<py::tuple>();
    if (pair.size() != 2) throw py::value_error("documents are (id, text) pairs");
    out.push_back(TextDocument{StringOf(pair[0], "id"), StringOf(pair[1], "text")});
  }
  return out;
}

void RegisterSettings(py::module_& module) {
  py::class_<SignatureSettings>(module, "Settings",
                                "The settings that decide a signature: shingle unit and size, "
                                "hash seed, MinHash scheme and length. Two signatures or shingle "
                                "sets compare only under equal settings.")
      .def(py::init([](const std::string& shingle, uint32_t k, uint32_t perms, uint64_t seed,
                       const std::string& signer) {
             SignatureSettings settings;
             settings.mode = Take(ParseShingleMode(shingle));
             settings.k = k;
             settings.perms = perms;
             settings.seed = seed;
             settings.scheme = Take(ParseSignerScheme(signer));
             Check(WithKind(settings.Validate(), ErrorKind::kInvalidRequest));
             return settings;
           }),
           py::arg("shingle") = "word", py::arg("k") = 5, py::arg("perms") = 128,
           py::arg("seed") = kDefaultSeed, py::arg("signer") = "oph",
           "Settings(shingle='word', k=5, perms=128, seed=0x6b696e6472656431, signer='oph').\n"
           "shingle: 'word' or 'char'; k: 1..64; perms: 1..4096; signer: 'oph' (one "
           "permutation hashing) or 'classic'. Raises InvalidRequestError when out of range.")
      .def_property_readonly("shingle",
                             [](const SignatureSettings& s) { return ShingleModeName(s.mode); })
      .def_readonly("k", &SignatureSettings::k)
      .def_readonly("perms", &SignatureSettings::perms)
      .def_readonly("seed", &SignatureSettings::seed)
      .def_property_readonly("signer",
                             [](const SignatureSettings& s) { return SignerSchemeName(s.scheme); })
      .def("__eq__", [](const SignatureSettings& a, const SignatureSettings& b) { return a == b; })
      .def(py::pickle(
          [](const SignatureSettings& s) {
            return py::make_tuple(ShingleModeName(s.mode), s.k, s.perms, s.seed,
                                  SignerSchemeName(s.scheme));
          },
          [](const py::tuple& t) {
            SignatureSettings settings;
            settings.mode = Take(ParseShingleMode(t[0].cast<std::string>()));
            settings.k = t[1].cast<uint32_t>();
            settings.perms = t[2].cast<uint32_t>();
            settings.seed = t[3].cast<uint64_t>();
            settings.scheme = Take(ParseSignerScheme(t[4].cast<std::string>()));
            return settings;
          }))
      .def("__repr__",
           [](const SignatureSettings& s) { return "kindred.Settings(" + s.ToString() + ")"; });
}

InputOptions ToInput(const std::string& input_format, const std::string& id_field,
                     const std::string& text_field, const std::string& priority_field) {
  InputOptions input;
  input.format = Take(ParseInputFormat(input_format));
  input.id_field = id_field;
  input.text_field = text_field;
  input.priority_field = priority_field;
  return input;
}

}  // namespace kindred::python
