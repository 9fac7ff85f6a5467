// Shingles, signatures and exact measures for Python: kindred.shingles,
// kindred.sign, kindred.jaccard, kindred.containment, kindred.overlap.
#include <pybind11/numpy.h>
#include <pybind11/stl.h>

#include <memory>
#include <mutex>

#include "convert.h"
#include "core/parallel.h"
#include "kindred/shingles.h"
#include "kindred/signer.h"
#include "kindred/verify.h"

namespace kindred::python {
namespace {

using U64Array = py::array_t<uint64_t, py::array::c_style | py::array::forcecast>;

std::string TextOf(const py::handle& text) {
  if (py::isinstance<py::bytes>(text) || py::isinstance<py::str>(text)) {
    return text.cast<std::string>();
  }
  throw py::type_error("a text must be str or bytes");
}

U64Array Shingles(const py::handle& text, const py::handle& settings_object) {
  const SignatureSettings settings = ToSignature(settings_object);
  const std::string utf8 = TextOf(text);
  ShingleSet set;
  {
    py::gil_scoped_release release;
    auto shingler = Shingler::Create(settings);
    absl::Status status = shingler.ok() ? (*shingler)->Shingle(utf8, &set) : shingler.status();
    py::gil_scoped_acquire acquire;
    Check(status);
  }
  U64Array out(static_cast<py::ssize_t>(set.size()));
  std::copy(set.begin(), set.end(), out.mutable_data());
  return out;
}

// The signatures of `texts`, one row each, signed on `threads` threads.
py::array_t<uint32_t> Sign(const py::iterable& texts, const py::handle& settings_object,
                           int threads) {
  const SignatureSettings settings = ToSignature(settings_object);
  std::vector<std::string> utf8;
  for (const py::handle text : texts) utf8.push_back(TextOf(text));
  py::array_t<uint32_t> out(
      {static_cast<py::ssize_t>(utf8.size()), static_cast<py::ssize_t>(settings.perms)});
  uint32_t* rows = out.mutable_data();
  absl::Status status;
  {
    py::gil_scoped_release release;
    threads = std::max(1, threads);
    auto shinglers = Shingler::CreateMany(settings, threads);
    if (!shinglers.ok()) {
      status = shinglers.status();
    } else {
      const Signer signer(settings);
      std::mutex mu;
      size_t first_failed = utf8.size();
      ParallelFor(utf8.size(), threads, [&](size_t begin, size_t end, int worker) {
        ShingleSet set;
        for (size_t i = begin; i < end; ++i) {
          absl::Status shingled = (*shinglers)[worker]->Shingle(utf8[i], &set);
          if (!shingled.ok()) {
            std::lock_guard<std::mutex> lock(mu);
            if (i < first_failed) first_failed = i, status = shingled;
            return;
          }
          signer.Sign(set, absl::MakeSpan(rows + i * settings.perms, settings.perms));
        }
      });
    }
  }
  Check(status);
  return out;
}

absl::Span<const uint64_t> SpanOf(const U64Array& set) {
  return absl::MakeConstSpan(set.data(), static_cast<size_t>(set.size()));
}

// The sets as given must be sorted and repeat-free (what shingles() returns).
void CheckSet(const U64Array& set, const char* name) {
  const uint64_t* data = set.data();
  for (py::ssize_t i = 1; i < set.size(); ++i) {
    if (data[i - 1] >= data[i]) {
      throw py::value_error(std::string(name) +
                            ": a shingle set is sorted ascending, without "
                            "repeats (as kindred.shingles returns it)");
    }
  }
}

ScoredPair OverlapOf(const U64Array& a, const U64Array& b) {
  CheckSet(a, "a");
  CheckSet(b, "b");
  py::gil_scoped_release release;
  return MeasureOverlap(SpanOf(a), SpanOf(b));
}

}  // namespace

void RegisterText(py::module_& module) {
  module.def("shingles", &Shingles, py::arg("text"), py::arg("settings") = py::none(),
             "The shingle set of one text: sorted, distinct 64-bit XXH3 hashes (numpy uint64).");
  module.def("sign", &Sign, py::arg("texts"), py::arg("settings") = py::none(),
             py::arg("threads") = 1,
             "MinHash signatures of texts: a numpy uint32 array, one row of settings.perms "
             "slots per text. Releases the GIL; `threads` worker threads.");
  module.def(
      "sign_set",
      [](const U64Array& set, const py::handle& settings_object) {
        CheckSet(set, "set");
        const SignatureSettings settings = ToSignature(settings_object);
        py::array_t<uint32_t> out(static_cast<py::ssize_t>(settings.perms));
        Signer(settings).Sign(SpanOf(set), absl::MakeSpan(out.mutable_data(), settings.perms));
        return out;
      },
      py::arg("set"), py::arg("settings") = py::none(),
      "The MinHash signature of a shingle set (numpy uint32, settings.perms slots).");
  module.def(
      "estimate",
      [](const py::array_t<uint32_t, py::array::c_style | py::array::forcecast>& a,
         const py::array_t<uint32_t, py::array::c_style | py::array::forcecast>& b) {
        return EstimateJaccard(absl::MakeConstSpan(a.data(), a.size()),
                               absl::MakeConstSpan(b.data(), b.size()));
      },
      py::arg("a"), py::arg("b"),
      "The signature estimate of Jaccard similarity: the fraction of agreeing slots.");
  module.def(
      "overlap",
      [](const U64Array& a, const U64Array& b) {
        const ScoredPair o = OverlapOf(a, b);
        return py::make_tuple(o.shared, o.size_a, o.size_b);
      },
      py::arg("a"), py::arg("b"), "(shared, size_a, size_b) of two shingle sets.");
  module.def(
      "jaccard", [](const U64Array& a, const U64Array& b) { return OverlapOf(a, b).jaccard; },
      py::arg("a"), py::arg("b"),
      "Exact Jaccard similarity |A n B| / |A u B| of two shingle sets (0 for two empty sets).");
  module.def(
      "containment",
      [](const U64Array& a, const U64Array& b) { return OverlapOf(a, b).Containment(); },
      py::arg("a"), py::arg("b"),
      "Exact containment |A n B| / min(|A|, |B|): the smaller set inside the larger.");
}

}  // namespace kindred::python
