#include "kindred/signer.h"

#include <algorithm>
#include <array>
#include <bit>

#include "core/contract_internal.h"

namespace kindred {
namespace {

// The 64-bit finalizer of SplitMix64 (Steele, Lea, Flood 2014, "Fast
// splittable pseudorandom number generators"; constants of Stafford's
// "variant 13"). A bijection of 64-bit words with full avalanche.
inline uint64_t Mix64(uint64_t z) {
  z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
  z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
  return z ^ (z >> 31);
}

// Maps the high 32 bits of `hash` onto [0, n) without division (Lemire 2019,
// "Fast random integer generation in an interval", multiply-shift reduction).
inline uint32_t ReduceHigh(uint64_t hash, uint32_t n) {
  return static_cast<uint32_t>(((hash >> 32) * n) >> 32);
}

// Largest slot value of a non-empty set: kEmptySlot is reserved.
constexpr uint32_t kLargestValue = kEmptySlot - 1;
// Settings allow at most this many slots (SignatureSettings::Validate).
constexpr uint32_t kMaxPerms = 4096;
// Densification probes an empty bin's own sequence this many times before
// falling back to a circular scan from the last probe (bounds the cost of very
// short documents at perms * kMaxProbes hashes).
constexpr uint32_t kMaxProbes = 64;
// The first probes of every bin are computed once per Signer and tabled.
constexpr uint32_t kTabledProbes = 16;

// Distinct constants keep the derived seeds of one settings seed apart.
constexpr uint64_t kValueSeedTweak = 0x5ca1ab1e0ddba11ULL;
constexpr uint64_t kProbeSeedTweak = 0x0b5e55edc0ffee11ULL;
constexpr uint64_t kSlotSeedTweak = 0x51075eed5eed5107ULL;

// Classic MinHash inner loop: one shingle against every slot's hash function.
// Written over plain arrays so the compiler vectorizes it; target_clones
// builds an AVX2 copy chosen at load time, with a baseline copy for any
// x86-64.
#if defined(__x86_64__) && defined(__GNUC__) && !defined(__clang__)
__attribute__((target_clones("avx2", "default")))
#endif
void MinOverSlots(const uint64_t* shingles, size_t count, const uint64_t* slot_seeds,
                  uint32_t perms, uint32_t* out) {
  for (size_t s = 0; s < count; ++s) {
    const uint64_t x = shingles[s];
    for (uint32_t i = 0; i < perms; ++i) {
      const uint32_t value = static_cast<uint32_t>(Mix64(x ^ slot_seeds[i]) >> 32);
      out[i] = value < out[i] ? value : out[i];
    }
  }
}

// Bitmap of the bins a set filled before densification (the type of
// Signer::BinBitmap).
using BinBitmap = std::array<uint64_t, kMaxPerms / 64>;

bool Has(const BinBitmap& bins, uint32_t bin) { return (bins[bin >> 6] >> (bin & 63)) & 1; }

// The first filled bin at or after `start`, circularly. Requires at least one.
uint32_t NextFilled(const BinBitmap& bins, uint32_t start, uint32_t perms) {
  const uint32_t words = (perms + 63) / 64;
  uint32_t word = start >> 6;
  uint64_t bits = bins[word] & (~uint64_t{0} << (start & 63));
  for (uint32_t step = 0; step <= words; ++step) {
    if (bits != 0) return word * 64 + static_cast<uint32_t>(std::countr_zero(bits));
    word = word + 1 == words ? 0 : word + 1;
    bits = bins[word];
  }
  internal::RequireContract(false, "densification needs a filled bin");
  return 0;
}

}  // namespace

Signer::Signer(const SignatureSettings& settings)
    : scheme_(settings.scheme),
      perms_(settings.perms),
      value_seed_(Mix64(settings.seed ^ kValueSeedTweak)),
      probe_seed_(Mix64(settings.seed ^ kProbeSeedTweak)) {
  internal::RequireContract(settings.Validate().ok(), "Signer needs valid settings");
  if (scheme_ == SignerScheme::kOnePermutation) {
    probe_table_.resize(size_t{perms_} * kTabledProbes);
    for (uint32_t bin = 0; bin < perms_; ++bin) {
      for (uint32_t attempt = 1; attempt <= kTabledProbes; ++attempt) {
        probe_table_[size_t{bin} * kTabledProbes + attempt - 1] =
            static_cast<uint16_t>(Probe(bin, attempt));
      }
    }
  }
  if (scheme_ == SignerScheme::kClassic) {
    // s_i: SplitMix64 outputs from the settings seed, one per slot.
    slot_seeds_.resize(perms_);
    uint64_t state = settings.seed ^ kSlotSeedTweak;
    for (uint64_t& seed : slot_seeds_) {
      state += 0x9e3779b97f4a7c15ULL;
      seed = Mix64(state);
    }
  }
}

void Signer::Sign(absl::Span<const uint64_t> shingles, absl::Span<uint32_t> out) const {
  internal::RequireContract(out.size() == perms_, "Sign needs out.size() == perms");
  std::fill(out.begin(), out.end(), kEmptySlot);
  if (shingles.empty()) return;
  if (scheme_ == SignerScheme::kClassic) {
    SignClassic(shingles, out);
  } else {
    SignOnePermutation(shingles, out);
  }
}

std::vector<uint32_t> Signer::Sign(absl::Span<const uint64_t> shingles) const {
  std::vector<uint32_t> out(perms_);
  Sign(shingles, absl::MakeSpan(out));
  return out;
}

// Broder 1997, "On the resemblance and containment of documents": slot i is
// min over the set of h_i(x), with h_i(x) = high 32 bits of Mix64(x ^ s_i).
void Signer::SignClassic(absl::Span<const uint64_t> shingles, absl::Span<uint32_t> out) const {
  MinOverSlots(shingles.data(), shingles.size(), slot_seeds_.data(), perms_, out.data());
  for (uint32_t& slot : out) slot = std::min(slot, kLargestValue);
}

// Li, Owen, Zhang 2012, "One Permutation Hashing", then Shrivastava 2017,
// "Optimal Densification for Fast and Accurate Minwise Hashing".
void Signer::SignOnePermutation(absl::Span<const uint64_t> shingles,
                                absl::Span<uint32_t> out) const {
  uint32_t* bins = out.data();
  BinBitmap filled{};
  for (const uint64_t shingle : shingles) {
    const uint64_t hash = Mix64(shingle ^ value_seed_);
    const uint32_t bin = ReduceHigh(hash, perms_);
    const uint32_t value = std::min(static_cast<uint32_t>(hash), kLargestValue);
    bins[bin] = std::min(bins[bin], value);
    filled[bin >> 6] |= uint64_t{1} << (bin & 63);
  }
  const uint32_t words = (perms_ + 63) / 64;
  uint32_t filled_count = 0;
  for (uint32_t word = 0; word < words; ++word) filled_count += std::popcount(filled[word]);
  if (filled_count == perms_) return;
  // Each empty bin copies the first filled bin of its own probe sequence
  // (the same sequence for every document, so copies stay comparable).
  // Only bins filled above are read, so the order of filling does not matter.
  for (uint32_t word = 0; word < words; ++word) {
    uint64_t empty = ~filled[word];
    if (word + 1 == words && perms_ % 64 != 0) empty &= (uint64_t{1} << (perms_ % 64)) - 1;
    while (empty != 0) {
      const uint32_t bin = word * 64 + static_cast<uint32_t>(std::countr_zero(empty));
      empty &= empty - 1;
      bins[bin] = bins[SourceBin(bin, filled)];
    }
  }
}

uint32_t Signer::Probe(uint32_t bin, uint32_t attempt) const {
  const uint64_t key = (uint64_t{bin} << 32) | attempt;
  return ReduceHigh(Mix64(key ^ probe_seed_), perms_);
}

// The first filled bin among Probe(bin, 1), Probe(bin, 2), ...,
// Probe(bin, kMaxProbes); failing those, the first filled bin at or after the
// last probe, circularly. Requires at least one filled bin.
uint32_t Signer::SourceBin(uint32_t bin, const BinBitmap& filled) const {
  // The tabled probes, tested eight at a time without branches.
  const uint16_t* probes = &probe_table_[size_t{bin} * kTabledProbes];
  for (uint32_t group = 0; group < kTabledProbes; group += 8) {
    uint32_t hits = 0;
    for (uint32_t i = 0; i < 8; ++i) hits |= uint32_t{Has(filled, probes[group + i])} << i;
    if (hits != 0) return probes[group + std::countr_zero(hits)];
  }
  uint32_t source = 0;
  for (uint32_t attempt = kTabledProbes + 1; attempt <= kMaxProbes; ++attempt) {
    source = Probe(bin, attempt);
    if (Has(filled, source)) return source;
  }
  return NextFilled(filled, source, perms_);
}

double EstimateJaccard(absl::Span<const uint32_t> a, absl::Span<const uint32_t> b) {
  if (a.size() != b.size() || a.empty()) return 0.0;
  size_t agree = 0;
  for (size_t i = 0; i < a.size(); ++i) {
    // Branch-free count; integer & keeps the loop free of short-circuit jumps.
    agree += static_cast<size_t>(a[i] == b[i]) & static_cast<size_t>(a[i] != kEmptySlot);
  }
  return static_cast<double>(agree) / static_cast<double>(a.size());
}

}  // namespace kindred
