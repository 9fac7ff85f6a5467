// kindred: MinHash signatures of shingle sets.
//
// A signature is `perms` 32-bit slots summarizing a shingle set (a sorted,
// duplicate-free vector of 64-bit shingle hashes) so that the fraction of
// slots two signatures share estimates the Jaccard similarity of their sets:
// P[slot i agrees] = J (Broder 1997, "On the resemblance and containment of
// documents"), so the estimate is unbiased with variance about J(1-J)/perms.
//
// Two schemes (SignatureSettings::scheme), both seeded by
// SignatureSettings::seed and fully deterministic:
//  - kClassic: `perms` independent hash functions h_i(x) = Mix64(x ^ s_i),
//    where Mix64 is a bijective 64-bit finalizer and s_i are per-slot seeds
//    drawn from the settings seed; slot i keeps the least high 32 bits of
//    h_i over the set. Cost O(m * perms) for m shingles.
//  - kOnePermutation (default): one permutation hashing (Li, Owen, Zhang
//    2012, "One Permutation Hashing") with optimal densification
//    (Shrivastava 2017, "Optimal Densification for Fast and Accurate Minwise
//    Hashing"). Each shingle is hashed once; the high bits pick one of `perms`
//    bins, the low 32 bits are its value, and each bin keeps its least value.
//    An empty bin b copies the value of the first bin filled by the set among
//    the probes Mix64(probe_seed ^ (b << 32 | a)) reduced to [0, perms), for
//    a = 1, 2, ..., 64; if none of the 64 is filled (only for sets much
//    smaller than perms), the first filled bin at or after the 64th probe,
//    circularly. The sequences are the same for every document, so copies
//    stay comparable and the estimate stays unbiased. Cost O(m + perms) in
//    expectation, at most O(m + 64 * perms).
//
// Slot values of a non-empty set are never kEmptySlot; every slot of the empty
// set's signature is kEmptySlot, and empty slots never agree, so an empty
// document matches nothing.
//
// Thread-safety: a Signer is immutable after construction; Sign() is const and
// may be called from any number of threads at once.
#ifndef KINDRED_SIGNER_H_
#define KINDRED_SIGNER_H_

#include <array>
#include <cstdint>
#include <vector>

#include "absl/types/span.h"
#include "kindred/settings.h"

namespace kindred {

// The value of every slot of the empty set's signature. Never produced for a
// non-empty set (values that would equal it are lowered by one).
inline constexpr uint32_t kEmptySlot = 0xFFFFFFFF;

class Signer {
 public:
  // Requires settings.Validate().ok(). Only `scheme`, `perms` and `seed`
  // matter; the Signer copies what it needs and keeps no reference.
  explicit Signer(const SignatureSettings& settings);

  Signer(const Signer&) = default;
  Signer& operator=(const Signer&) = default;

  // Signature length (slots per signature).
  uint32_t perms() const { return perms_; }
  SignerScheme scheme() const { return scheme_; }

  // Writes the signature of `shingles` into `out`.
  // Requires: out.size() == perms(); `shingles` is the set's hashes (sorted
  // and duplicate-free as a ShingleSet is; order and repeats do not change the
  // result). Borrows both spans for the call only. Never allocates.
  void Sign(absl::Span<const uint64_t> shingles, absl::Span<uint32_t> out) const;

  // Convenience: the signature as a new vector (allocates).
  std::vector<uint32_t> Sign(absl::Span<const uint64_t> shingles) const;

 private:
  void SignClassic(absl::Span<const uint64_t> shingles, absl::Span<uint32_t> out) const;
  void SignOnePermutation(absl::Span<const uint64_t> shingles, absl::Span<uint32_t> out) const;

  // Densification (one permutation): the bins a set filled, one bit each.
  using BinBitmap = std::array<uint64_t, 64>;
  uint32_t Probe(uint32_t bin, uint32_t attempt) const;
  uint32_t SourceBin(uint32_t bin, const BinBitmap& filled) const;

  SignerScheme scheme_;
  uint32_t perms_;
  uint64_t value_seed_;               // one permutation: the seed re-mixed into each shingle
  uint64_t probe_seed_;               // one permutation: the seed of the probe sequences
  std::vector<uint64_t> slot_seeds_;  // classic: s_i, one per slot
  // One permutation: Probe(bin, 1..kTabledProbes) for each bin.
  std::vector<uint16_t> probe_table_;
};

// The signature estimate of Jaccard similarity: the fraction of slots where
// `a` and `b` agree, counting kEmptySlot as never agreeing. Returns 0 when the
// sizes differ or are zero. Borrows both spans for the call only.
double EstimateJaccard(absl::Span<const uint32_t> a, absl::Span<const uint32_t> b);

}  // namespace kindred

#endif  // KINDRED_SIGNER_H_
