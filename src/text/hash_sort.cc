#include "text/hash_sort.h"

#include <algorithm>
#include <bit>
#include <cstring>

namespace kindred::text_internal {
namespace {

constexpr size_t kSmallSort = 32;       // below this, insertion sort directly
constexpr uint32_t kSmallBucket = 32;   // buckets up to this size: insertion
constexpr size_t kTwoLevels = 1 << 16;  // from here, split by the top bits
constexpr int kTopBits = 12;            // first of two levels: 4096 buckets

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

// Scatters in[0, n) to out[0, n) by the `bits` bits below the top `used`
// ones. On return count[b] is where bucket b ends. Returns the largest
// bucket's size.
uint32_t Distribute(const uint64_t* in, size_t n, int used, int bits,
                    uint32_t* count, uint64_t* out) {
  const size_t buckets = size_t{1} << bits;
  const auto bucket = [used, bits](uint64_t h) {
    return (h << used) >> (64 - bits);
  };
  std::memset(count, 0, (buckets + 1) * sizeof(uint32_t));
  for (size_t i = 0; i < n; ++i) ++count[bucket(in[i]) + 1];
  uint32_t largest = 0;
  for (size_t b = 1; b <= buckets; ++b) {
    largest = std::max(largest, count[b]);
    count[b] += count[b - 1];
  }
  // count[b] is where bucket b starts; scattering advances it to where
  // bucket b ends.
  for (size_t i = 0; i < n; ++i) out[count[bucket(in[i])]++] = in[i];
  return largest;
}

// Sorts in[0, n) into out[0, n); every key shares its top `used` bits.
// `counts` is work space.
void BucketSort(const uint64_t* in, size_t n, int used, uint64_t* out,
                std::vector<uint32_t>* counts) {
  if (n < kSmallSort) {
    std::copy(in, in + n, out);
    InsertionSort(out, out + n);
    return;
  }
  // About one element per bucket, at most 2^24 buckets (64 MiB of counts).
  const int bits = std::min(static_cast<int>(std::bit_width(n - 1)), 24);
  counts->resize((size_t{1} << bits) + 1);
  uint32_t* count = counts->data();
  const uint32_t largest = Distribute(in, n, used, bits, count, out);
  if (largest <= kSmallBucket) {
    // Elements are in bucket order, so none is more than one bucket from
    // its place: one pass of insertion sort finishes the job.
    InsertionSort(out, out + n);
    return;
  }
  uint32_t start = 0;
  for (size_t b = 0; b < (size_t{1} << bits); ++b) {
    const uint32_t end = count[b];
    if (end - start <= kSmallBucket) {
      InsertionSort(out + start, out + end);
    } else {
      std::sort(out + start, out + end);
    }
    start = end;
  }
}

}  // namespace

void SortUniqueHashes(std::vector<uint64_t>* hashes,
                      std::vector<uint64_t>* scratch,
                      std::vector<uint32_t>* counts) {
  const size_t n = hashes->size();
  if (n < 2) return;
  if (scratch->size() < n) scratch->resize(n);
  uint64_t* data = hashes->data();
  uint64_t* work = scratch->data();
  if (n < kTwoLevels) {
    BucketSort(data, n, 0, work, counts);
    // Copy back, dropping repeats.
    uint64_t* to = data;
    *to = work[0];
    for (size_t i = 1; i < n; ++i) {
      if (work[i] != *to) *++to = work[i];
    }
    hashes->resize(to - data + 1);
    return;
  } else {
    // Two levels keep each scatter within the cache: first by the top 12
    // bits into `work`, then each of those buckets back into `data`.
    counts->resize((size_t{1} << kTopBits) + 1);
    Distribute(data, n, 0, kTopBits, counts->data(), work);
    std::vector<uint32_t> ends(counts->begin(),
                               counts->begin() + (size_t{1} << kTopBits));
    uint32_t start = 0;
    for (const uint32_t end : ends) {
      BucketSort(work + start, end - start, kTopBits, data + start, counts);
      start = end;
    }
  }
  hashes->erase(std::unique(hashes->begin(), hashes->end()), hashes->end());
}

}  // namespace kindred::text_internal
