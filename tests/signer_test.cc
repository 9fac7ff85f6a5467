// Tests of the MinHash signer.
//
// External references:
//  - Broder 1997, "On the resemblance and containment of documents": for one
//    min-wise hash function P[min h(A) = min h(B)] = J(A, B), so the fraction
//    of n agreeing slots is an unbiased estimate of J with variance J(1-J)/n.
//  - Li, Owen, Zhang 2012, "One Permutation Hashing": when no bin is empty the
//    bins sample the union without replacement, so the variance is below
//    J(1-J)/n, by about the factor 1 - (n-1)/(f-1) for a union of f elements
//    (factor quoted from memory; the test only leans on it as a lower bound
//    with a wide tolerance).
//  - Chi-square and normal tolerances: textbook sampling theory; a 4.5-sigma
//    band (two-sided p ~ 7e-6) keeps the fixed-seed runs far from the edge.
#include "kindred/signer.h"

#include <xxhash.h>

#include <algorithm>
#include <catch2/catch.hpp>
#include <cmath>
#include <cstdlib>
#include <new>
#include <string>
#include <vector>

#include "kindred/settings.h"
#include "testlib/similar_sets.h"

// Every allocation of this test program is counted, so that a test can check
// that a call allocates nothing.
static size_t allocations = 0;

// (All plain forms are replaced together so that every new pairs with its
// delete.)
static void* CountedAllocate(size_t size) noexcept {
  ++allocations;
  return std::malloc(size == 0 ? 1 : size);
}
void* operator new(size_t size) {
  if (void* p = CountedAllocate(size)) return p;
  throw std::bad_alloc();
}
void* operator new[](size_t size) {
  if (void* p = CountedAllocate(size)) return p;
  throw std::bad_alloc();
}
void* operator new(size_t size, const std::nothrow_t&) noexcept { return CountedAllocate(size); }
void* operator new[](size_t size, const std::nothrow_t&) noexcept { return CountedAllocate(size); }
void operator delete(void* p) noexcept { std::free(p); }
void operator delete[](void* p) noexcept { std::free(p); }
void operator delete(void* p, size_t) noexcept { std::free(p); }
void operator delete[](void* p, size_t) noexcept { std::free(p); }
void operator delete(void* p, const std::nothrow_t&) noexcept { std::free(p); }
void operator delete[](void* p, const std::nothrow_t&) noexcept { std::free(p); }

namespace kindred {
namespace {

using testing::MakeSetPair;
using testing::SplitMix64;

constexpr double kSigmas = 4.5;

Signer MakeSigner(SignerScheme scheme, uint32_t perms = 128, uint64_t seed = kDefaultSeed) {
  SignatureSettings settings;
  settings.scheme = scheme;
  settings.perms = perms;
  settings.seed = seed;
  REQUIRE(settings.Validate().ok());
  return Signer(settings);
}

// Estimates over many pairs of exactly known Jaccard `jaccard`.
struct EstimateSample {
  std::vector<double> estimates;
  // Sum over pairs of (estimate - J)^2 / (J(1-J)/n): chi-square with
  // `estimates.size()` degrees of freedom when the variance is J(1-J)/n.
  double normalized_squares = 0;
  // The same, with each pair's variance scaled by 1 - (n-1)/(f-1).
  double normalized_squares_without_replacement = 0;

  double Mean() const {
    double sum = 0;
    for (double e : estimates) sum += e;
    return sum / estimates.size();
  }
  double SampleVariance() const {
    const double mean = Mean();
    double sum = 0;
    for (double e : estimates) sum += (e - mean) * (e - mean);
    return sum / (estimates.size() - 1);
  }
};

// `pairs` pairs with union sizes drawn from [min_union, max_union] (multiples
// of 10, so that J * union is a whole number for J in tenths).
EstimateSample SamplePairs(const Signer& signer, int jaccard_tenths, int pairs, uint64_t min_union,
                           uint64_t max_union, uint64_t seed) {
  SplitMix64 random(seed);
  const double jaccard = jaccard_tenths / 10.0;
  const double n = signer.perms();
  const double variance = jaccard * (1 - jaccard) / n;
  std::vector<uint32_t> sig_a(signer.perms()), sig_b(signer.perms());
  EstimateSample sample;
  for (int p = 0; p < pairs; ++p) {
    const uint64_t union_size = 10 * random.Between(min_union / 10, max_union / 10);
    const auto pair = MakeSetPair(random, union_size, union_size * jaccard_tenths / 10);
    signer.Sign(pair.a, absl::MakeSpan(sig_a));
    signer.Sign(pair.b, absl::MakeSpan(sig_b));
    const double estimate = EstimateJaccard(sig_a, sig_b);
    const double square = (estimate - jaccard) * (estimate - jaccard);
    sample.estimates.push_back(estimate);
    sample.normalized_squares += square / variance;
    const double correction = 1 - (n - 1) / (static_cast<double>(union_size) - 1);
    sample.normalized_squares_without_replacement += square / (variance * correction);
  }
  return sample;
}

// Chi-square with `df` degrees of freedom, divided by df: mean 1, standard
// deviation sqrt(2 / df).
double RatioTolerance(double df) { return kSigmas * std::sqrt(2.0 / df); }

TEST_CASE("classic MinHash estimates are unbiased with variance J(1-J)/n", "[signer]") {
  const Signer signer = MakeSigner(SignerScheme::kClassic);
  constexpr int kPairs = 500;
  double pooled = 0;
  for (int tenths : {1, 3, 5, 7, 9}) {
    CAPTURE(tenths);
    const double j = tenths / 10.0;
    const EstimateSample sample = SamplePairs(signer, tenths, kPairs, 500, 1000, 100 + tenths);
    // Broder 1997: E[estimate] = J, Var = J(1-J)/n.
    CHECK(std::abs(sample.Mean() - j) <= kSigmas * std::sqrt(j * (1 - j) / 128 / kPairs));
    CHECK(std::abs(sample.normalized_squares / kPairs - 1) <= RatioTolerance(kPairs));
    pooled += sample.normalized_squares;
  }
  CHECK(std::abs(pooled / (5 * kPairs) - 1) <= RatioTolerance(5 * kPairs));
}

TEST_CASE("one permutation hashing estimates are unbiased, variance at most J(1-J)/n", "[signer]") {
  const Signer signer = MakeSigner(SignerScheme::kOnePermutation);
  constexpr int kPairs = 600;
  double pooled = 0, pooled_without_replacement = 0;
  for (int tenths : {1, 3, 5, 7, 9}) {
    CAPTURE(tenths);
    const double j = tenths / 10.0;
    const EstimateSample sample = SamplePairs(signer, tenths, kPairs, 500, 1500, 200 + tenths);
    // Broder 1997 / Li, Owen, Zhang 2012: E[estimate] = J.
    CHECK(std::abs(sample.Mean() - j) <= kSigmas * std::sqrt(j * (1 - j) / 128 / kPairs));
    // Not above the classic variance J(1-J)/n (one-sided).
    CHECK(sample.normalized_squares / kPairs <= 1 + RatioTolerance(kPairs));
    pooled += sample.normalized_squares;
    pooled_without_replacement += sample.normalized_squares_without_replacement;
  }
  const double df = 5 * kPairs;
  CHECK(pooled / df <= 1 + RatioTolerance(df));
  // Not far below the without-replacement variance either (a signer whose
  // slots were copies of each other, or constant, would fail one side).
  CHECK(pooled_without_replacement / df >= 1 - RatioTolerance(df));
}

TEST_CASE("estimates stay unbiased for sets smaller than the signature", "[signer]") {
  // Unions of 20..60 elements leave most one-permutation bins empty, so the
  // densification fills them; Shrivastava 2017 shows the estimate stays
  // unbiased (its variance is above J(1-J)/n then, not checked here).
  for (SignerScheme scheme : {SignerScheme::kOnePermutation, SignerScheme::kClassic}) {
    const Signer signer = MakeSigner(scheme);
    for (int tenths : {1, 5, 9}) {
      CAPTURE(SignerSchemeName(scheme), tenths);
      constexpr int kPairs = 2000;
      const EstimateSample sample = SamplePairs(signer, tenths, kPairs, 20, 60, 300 + tenths);
      const double standard_error = std::sqrt(sample.SampleVariance() / kPairs);
      CHECK(std::abs(sample.Mean() - tenths / 10.0) <= kSigmas * standard_error);
    }
  }
}

TEST_CASE("estimates are unbiased for other signature lengths", "[signer]") {
  // Broder 1997: E[estimate] = J whatever n; lengths that are not powers of
  // two exercise the bin reduction of one permutation hashing.
  for (SignerScheme scheme : {SignerScheme::kOnePermutation, SignerScheme::kClassic}) {
    for (uint32_t perms : {1u, 100u, 500u}) {
      CAPTURE(SignerSchemeName(scheme), perms);
      const Signer signer = MakeSigner(scheme, perms);
      constexpr int kPairs = 300;
      const EstimateSample sample = SamplePairs(signer, 6, kPairs, 300, 800, 400 + perms);
      CHECK(std::abs(sample.Mean() - 0.6) <= kSigmas * std::sqrt(0.6 * 0.4 / perms / kPairs));
    }
  }
}

// The fixed set: XXH3-64 (seed kDefaultSeed) of "shingle 0" .. "shingle 99".
std::vector<uint64_t> FixedSet() {
  std::vector<uint64_t> set;
  for (int i = 0; i < 100; ++i) {
    const std::string text = "shingle " + std::to_string(i);
    set.push_back(XXH3_64bits_withSeed(text.data(), text.size(), kDefaultSeed));
  }
  std::sort(set.begin(), set.end());
  return set;
}

TEST_CASE("signatures of a fixed set are pinned", "[signer]") {
  // Values recorded from this implementation, and reproduced when recorded by
  // a separate Python implementation of the definitions in signer.h (Python
  // integers and the python3-xxhash package). Stored signatures must not drift
  // between versions: a change here breaks every index file. With 100
  // shingles in 128 bins, 60 one-permutation bins are densified.
  const std::vector<uint64_t> set = FixedSet();
  const std::vector<uint32_t> oph = MakeSigner(SignerScheme::kOnePermutation).Sign(set);
  const std::vector<uint32_t> classic = MakeSigner(SignerScheme::kClassic).Sign(set);
  const std::vector<uint32_t> oph_first(oph.begin(), oph.begin() + 6);
  const std::vector<uint32_t> classic_first(classic.begin(), classic.begin() + 6);
  CHECK(oph_first == std::vector<uint32_t>{0x84f43ec0, 0x14a64fff, 0x59c45d3c, 0xb86460f4,
                                           0x334299ab, 0x82890835});
  CHECK(classic_first == std::vector<uint32_t>{0x023c3130, 0x0302a1c4, 0x005356db, 0x0009ce42,
                                               0x00a7857d, 0x013ee3a5});
}

TEST_CASE("densification of a sparse set is pinned", "[signer]") {
  // Three shingles in 128 bins: of the 125 empty bins, 38 find a filled bin
  // within the first 16 probes, 63 within probes 17..64 and 24 by the
  // circular scan. Recorded with the same separate Python implementation as
  // above. Digit i means the slot holds the i-th smallest of the 3 values.
  std::vector<uint64_t> three;
  for (int i = 0; i < 3; ++i) {
    const std::string text = "shingle " + std::to_string(i);
    three.push_back(XXH3_64bits_withSeed(text.data(), text.size(), kDefaultSeed));
  }
  std::sort(three.begin(), three.end());
  const std::vector<uint32_t> sig = MakeSigner(SignerScheme::kOnePermutation).Sign(three);
  std::vector<uint32_t> values(sig.begin(), sig.end());
  std::sort(values.begin(), values.end());
  values.erase(std::unique(values.begin(), values.end()), values.end());
  CHECK(values == std::vector<uint32_t>{0x0e8bcf4e, 0xfc35096c, 0xfffea11c});
  std::string pattern;
  for (uint32_t slot : sig) {
    pattern +=
        static_cast<char>('0' + (std::find(values.begin(), values.end(), slot) - values.begin()));
  }
  CHECK(pattern ==
        "2012120010010200110012102020222200100111100012211200111211011100"
        "1120002221111110000100000021120011111102022001121002221002020001");
}

TEST_CASE("the empty set's signature is all empty slots and matches nothing", "[signer]") {
  for (SignerScheme scheme : {SignerScheme::kOnePermutation, SignerScheme::kClassic}) {
    const Signer signer = MakeSigner(scheme);
    const std::vector<uint32_t> empty = signer.Sign({});
    CHECK(empty == std::vector<uint32_t>(128, kEmptySlot));
    CHECK(EstimateJaccard(empty, empty) == 0.0);
    CHECK(EstimateJaccard(empty, signer.Sign(FixedSet())) == 0.0);
    CHECK(EstimateJaccard(signer.Sign(FixedSet()), signer.Sign(FixedSet())) == 1.0);
  }
}

TEST_CASE("non-empty sets never produce the empty slot value", "[signer]") {
  SplitMix64 random(7);
  for (SignerScheme scheme : {SignerScheme::kOnePermutation, SignerScheme::kClassic}) {
    for (uint32_t perms : {1u, 7u, 128u, 1000u, 4096u}) {
      const Signer signer = MakeSigner(scheme, perms);
      for (int size : {1, 2, 3, 10, 300}) {
        std::vector<uint64_t> set(size);
        for (uint64_t& x : set) x = random.Next();
        std::sort(set.begin(), set.end());
        const std::vector<uint32_t> sig = signer.Sign(set);
        CHECK(std::count(sig.begin(), sig.end(), kEmptySlot) == 0);
      }
    }
  }
}

TEST_CASE("a one-element set fills every bin with its one value", "[signer]") {
  // Densification copies from filled bins only; with one filled bin every
  // slot holds its value.
  const Signer signer = MakeSigner(SignerScheme::kOnePermutation, 4096);
  const std::vector<uint32_t> sig = signer.Sign(std::vector<uint64_t>{0x1234567890abcdefULL});
  CHECK(std::count(sig.begin(), sig.end(), sig[0]) == 4096);
}

TEST_CASE("seeds, order and repeats", "[signer]") {
  std::vector<uint64_t> set = FixedSet();
  for (SignerScheme scheme : {SignerScheme::kOnePermutation, SignerScheme::kClassic}) {
    CAPTURE(SignerSchemeName(scheme));
    const Signer signer = MakeSigner(scheme);
    const std::vector<uint32_t> sig = signer.Sign(set);
    // Another seed gives another signature: with 128 slots of 32 bits a
    // chance agreement of more than a few slots is negligible.
    const std::vector<uint32_t> other = MakeSigner(scheme, 128, kDefaultSeed + 1).Sign(set);
    CHECK(EstimateJaccard(sig, other) < 0.1);
    // The same settings always give the same signature.
    CHECK(MakeSigner(scheme).Sign(set) == sig);
    // Order and repeats do not matter.
    std::vector<uint64_t> shuffled(set.rbegin(), set.rend());
    shuffled.push_back(set[3]);
    CHECK(signer.Sign(shuffled) == sig);
  }
}

TEST_CASE("Sign() allocates nothing", "[signer]") {
  SplitMix64 random(11);
  std::vector<std::vector<uint64_t>> sets;
  for (int size : {0, 1, 3, 50, 128, 1000}) {
    std::vector<uint64_t> set(size);
    for (uint64_t& x : set) x = random.Next();
    sets.push_back(set);
  }
  for (SignerScheme scheme : {SignerScheme::kOnePermutation, SignerScheme::kClassic}) {
    const Signer signer = MakeSigner(scheme, 256);
    std::vector<uint32_t> out(256);
    const size_t before = allocations;
    for (const auto& set : sets) signer.Sign(set, absl::MakeSpan(out));
    CHECK(allocations == before);
    // The counter is live: the convenience overload allocates its vector.
    CHECK(signer.Sign(sets[3]).size() == 256);
    CHECK(allocations > before);
  }
}

TEST_CASE("EstimateJaccard counts agreeing non-empty slots", "[signer]") {
  const std::vector<uint32_t> a = {1, 2, 3, kEmptySlot};
  const std::vector<uint32_t> b = {1, 5, 3, kEmptySlot};
  CHECK(EstimateJaccard(a, b) == 0.5);
  CHECK(EstimateJaccard(a, a) == 0.75);
  CHECK(EstimateJaccard(a, std::vector<uint32_t>{1, 2}) == 0.0);
  CHECK(EstimateJaccard({}, {}) == 0.0);
}

}  // namespace
}  // namespace kindred
