// kindred Python extension: the bytes of the cluster stages' records, seen
// without a copy.
#ifndef KINDRED_PYTHON_STAGE_BYTES_H_
#define KINDRED_PYTHON_STAGE_BYTES_H_

#include <string_view>

#include "convert.h"

namespace kindred::python {

// The bytes of a Python bytes object (valid while it lives).
inline std::string_view View(const py::bytes& bytes) {
  char* data;
  py::ssize_t size;
  PyBytes_AsStringAndSize(bytes.ptr(), &data, &size);
  return std::string_view(data, static_cast<size_t>(size));
}

}  // namespace kindred::python

#endif  // KINDRED_PYTHON_STAGE_BYTES_H_
