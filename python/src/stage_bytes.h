// kindred Python extension: the byte records of the cluster stages
// (python/kindred/cluster/RECORDS.md): writing plain little-endian values
// and reading them back.
#ifndef KINDRED_PYTHON_STAGE_BYTES_H_
#define KINDRED_PYTHON_STAGE_BYTES_H_

#include <cstdint>
#include <cstring>
#include <stdexcept>
#include <string>
#include <string_view>

#include "absl/types/span.h"
#include "convert.h"

namespace kindred::python {

// Appends plain values to a byte string.
class Out {
 public:
  template <typename T>
  void Put(T value) {
    bytes_.append(reinterpret_cast<const char*>(&value), sizeof(T));
  }
  template <typename T>
  void PutAll(absl::Span<const T> values) {
    bytes_.append(reinterpret_cast<const char*>(values.data()), values.size() * sizeof(T));
  }
  void PutString(std::string_view s) {
    Put<uint32_t>(static_cast<uint32_t>(s.size()));
    bytes_.append(s);
  }
  py::bytes Bytes() const { return py::bytes(bytes_); }
  std::string& str() { return bytes_; }

 private:
  std::string bytes_;
};

// Reads them back; a short record is an internal error (records are only
// made by these stages).
class In {
 public:
  explicit In(std::string_view bytes) : bytes_(bytes) {}
  template <typename T>
  T Get() {
    T value;
    Need(sizeof(T));
    std::memcpy(&value, bytes_.data() + at_, sizeof(T));
    at_ += sizeof(T);
    return value;
  }
  template <typename T>
  void GetAll(size_t count, T* out) {
    Need(count * sizeof(T));
    std::memcpy(out, bytes_.data() + at_, count * sizeof(T));
    at_ += count * sizeof(T);
  }
  void Skip(size_t n) {
    Need(n);
    at_ += n;
  }
  std::string GetString() {
    const uint32_t size = Get<uint32_t>();
    Need(size);
    std::string s(bytes_.substr(at_, size));
    at_ += size;
    return s;
  }
  bool done() const { return at_ == bytes_.size(); }

 private:
  void Need(size_t n) const {
    if (bytes_.size() - at_ < n) throw std::runtime_error("kindred: a stage record is truncated");
  }
  std::string_view bytes_;
  size_t at_ = 0;
};

inline std::string_view View(const py::bytes& bytes) {
  char* data;
  py::ssize_t size;
  PyBytes_AsStringAndSize(bytes.ptr(), &data, &size);
  return std::string_view(data, static_cast<size_t>(size));
}

inline uint64_t Mix(uint64_t x) {  // a bijective 64-bit finalizer (SplitMix64's)
  x ^= x >> 30;
  x *= 0xbf58476d1ce4e5b9ULL;
  x ^= x >> 27;
  x *= 0x94d049bb133111ebULL;
  return x ^ (x >> 31);
}

}  // namespace kindred::python

#endif  // KINDRED_PYTHON_STAGE_BYTES_H_
