// kindred._kindred: the library's API for Python (pybind11). The package
// kindred (python/kindred/) wraps it; see kindred/__init__.pyi for the
// documented signatures.
#include "convert.h"

PYBIND11_MODULE(_kindred, module) {
  module.doc() = "kindred's library, bound for Python (use the package kindred)";
  kindred::python::RegisterSettings(module);
  kindred::python::RegisterText(module);
  kindred::python::RegisterIndex(module);
  kindred::python::RegisterSweep(module);
  kindred::python::RegisterStages(module);
}
