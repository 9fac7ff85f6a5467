#include "testlib/similar_sets.h"

#include <algorithm>
#include <stdexcept>

namespace kindred::testing {

uint64_t SplitMix64::Next() {
  uint64_t z = (state_ += 0x9e3779b97f4a7c15ULL);
  z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
  z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
  return z ^ (z >> 31);
}

uint64_t SplitMix64::Between(uint64_t low, uint64_t high) {
  return low + (Next() >> 32) * (high - low + 1) / (uint64_t{1} << 32);
}

SetPair MakeSetPair(SplitMix64& random, uint64_t union_size, uint64_t intersection) {
  std::vector<uint64_t> elements(union_size);
  for (uint64_t& e : elements) e = random.Next();
  std::vector<uint64_t> check = elements;
  std::sort(check.begin(), check.end());
  if (std::adjacent_find(check.begin(), check.end()) != check.end()) {
    throw std::runtime_error("MakeSetPair drew a repeated element");
  }
  const uint64_t only_a = random.Between(0, union_size - intersection);
  SetPair pair;
  pair.intersection = intersection;
  pair.union_size = union_size;
  pair.a.assign(elements.begin(), elements.begin() + intersection + only_a);
  pair.b.assign(elements.begin(), elements.begin() + intersection);
  pair.b.insert(pair.b.end(), elements.begin() + intersection + only_a, elements.end());
  std::sort(pair.a.begin(), pair.a.end());
  std::sort(pair.b.begin(), pair.b.end());
  return pair;
}

}  // namespace kindred::testing
