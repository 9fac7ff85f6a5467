#include "kindred/verify.h"

#include <algorithm>

namespace kindred {
namespace {

// Branch-light merge count of two sorted runs.
uint32_t MergeCount(const uint64_t* a, const uint64_t* a_end, const uint64_t* b,
                    const uint64_t* b_end) {
  uint32_t shared = 0;
  while (a != a_end && b != b_end) {
    const uint64_t x = *a;
    const uint64_t y = *b;
    shared += (x == y);
    a += (x <= y);
    b += (y <= x);
  }
  return shared;
}

// For each element of the small set, gallops forward in the large one.
uint32_t GallopCount(absl::Span<const uint64_t> small, absl::Span<const uint64_t> large) {
  uint32_t shared = 0;
  const uint64_t* base = large.data();
  const uint64_t* end = large.data() + large.size();
  for (uint64_t x : small) {
    size_t step = 1;
    const uint64_t* probe = base;
    while (probe + step < end && probe[step] < x) {
      probe += step;
      step <<= 1;
    }
    const uint64_t* limit = std::min(end, probe + step + 1);
    base = std::lower_bound(probe, limit, x);
    if (base == end) break;
    if (*base == x) {
      ++shared;
      ++base;
    }
  }
  return shared;
}

}  // namespace

double Overlap::Jaccard() const {
  const uint64_t uni = uint64_t{size_a} + size_b - shared;
  return uni == 0 ? 0.0 : static_cast<double>(shared) / static_cast<double>(uni);
}

double Overlap::ContainmentOfAInB() const {
  return size_a == 0 ? 0.0 : static_cast<double>(shared) / size_a;
}

double Overlap::ContainmentOfBInA() const {
  return size_b == 0 ? 0.0 : static_cast<double>(shared) / size_b;
}

double Overlap::Containment() const { return std::max(ContainmentOfAInB(), ContainmentOfBInA()); }

Overlap MeasureOverlap(absl::Span<const uint64_t> a, absl::Span<const uint64_t> b) {
  Overlap overlap;
  overlap.size_a = static_cast<uint32_t>(a.size());
  overlap.size_b = static_cast<uint32_t>(b.size());
  if (a.empty() || b.empty()) return overlap;
  // Disjoint ranges share nothing.
  if (a.back() < b.front() || b.back() < a.front()) return overlap;
  const bool a_small = a.size() * 16 < b.size();
  const bool b_small = b.size() * 16 < a.size();
  if (a_small) {
    overlap.shared = GallopCount(a, b);
  } else if (b_small) {
    overlap.shared = GallopCount(b, a);
  } else {
    overlap.shared = MergeCount(a.data(), a.data() + a.size(), b.data(), b.data() + b.size());
  }
  return overlap;
}

}  // namespace kindred
