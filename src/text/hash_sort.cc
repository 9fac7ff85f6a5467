#include "text/hash_sort.h"

#include <algorithm>
#include <bit>

namespace kindred::text_internal {
namespace {

constexpr size_t kSmallSort = 32;      // below this, insertion sort directly
constexpr uint32_t kSmallBucket = 32;  // buckets up to this size: insertion

// Insertion sort: linear when every element is near its place.
void InsertionSort(uint64_t* begin, uint64_t* end) {
  for (uint64_t* i = begin + 1; i < end; ++i) {
    const uint64_t value = *i;
    uint64_t* j = i;
    while (j > begin && *(j - 1) > value) {
      *j = *(j - 1);
      --j;
    }
    *j = value;
  }
}

// Distributes `in` into `out` by the top bits; returns the largest bucket.
// On return count[b] is where bucket b ends.
uint32_t Distribute(const std::vector<uint64_t>& in, int shift, size_t buckets,
                    uint32_t* count, uint64_t* out) {
  for (uint64_t h : in) ++count[(h >> shift) + 1];
  uint32_t largest = 0;
  for (size_t b = 1; b <= buckets; ++b) {
    largest = std::max(largest, count[b]);
    count[b] += count[b - 1];
  }
  // count[b] is where bucket b starts; scattering advances it to where
  // bucket b ends.
  for (uint64_t h : in) out[count[h >> shift]++] = h;
  return largest;
}

}  // namespace

void SortUniqueHashes(std::vector<uint64_t>* hashes,
                      std::vector<uint64_t>* scratch,
                      std::vector<uint32_t>* counts) {
  const size_t n = hashes->size();
  if (n < kSmallSort) {
    InsertionSort(hashes->data(), hashes->data() + n);
  } else {
    // About one element per bucket, and at most 2^24 buckets (64 MiB of
    // counts) for huge documents.
    const int bits =
        static_cast<int>(std::min<size_t>(std::bit_width(n - 1), 24));
    const size_t buckets = size_t{1} << bits;
    counts->assign(buckets + 1, 0);
    if (scratch->size() < n) scratch->resize(n);
    uint64_t* out = scratch->data();
    const uint32_t largest =
        Distribute(*hashes, 64 - bits, buckets, counts->data(), out);
    if (largest <= kSmallBucket) {
      // Elements are in bucket order, so none is more than one bucket from
      // its place: one pass of insertion sort finishes the job.
      InsertionSort(out, out + n);
    } else {
      uint32_t start = 0;
      for (size_t b = 0; b < buckets; ++b) {
        const uint32_t end = (*counts)[b];
        if (end - start <= kSmallBucket) {
          InsertionSort(out + start, out + end);
        } else {
          std::sort(out + start, out + end);
        }
        start = end;
      }
    }
    // Copy back, dropping repeats.
    uint64_t* to = hashes->data();
    *to = out[0];
    for (size_t i = 1; i < n; ++i) {
      if (out[i] != *to) *++to = out[i];
    }
    hashes->resize(to - hashes->data() + 1);
    return;
  }
  hashes->erase(std::unique(hashes->begin(), hashes->end()), hashes->end());
}

}  // namespace kindred::text_internal
