// kindred: why two documents match.
//
// Explain() shingles two texts with the same SignatureSettings and reports
// the exact measures (Jaccard, containment both ways, shared and unique
// shingle counts), the MinHash signature estimate, and where the shared
// shingles lie in each original text:
//   - marked spans: every byte range of a text covered by a shingle whose
//     hash the other text also has. A maximal run of consecutive shared
//     shingles becomes one range, from the first shingle's start to the
//     largest end in the run; ranges that overlap are merged. The ranges are
//     ascending and disjoint.
//   - aligned passages: runs of shingles that follow one another in both
//     texts (shingle i + t of A equals shingle j + t of B for t = 0..n-1),
//     found by scanning A from the start and extending each match as far as
//     it goes (B's first occurrence of a shingle is the anchor); longest
//     first. Each names its byte range in both texts.
// Spans are byte offsets in the ORIGINAL input (before repair of invalid
// UTF-8 and normalization), as ShingleTexts() gives them.
//
// Pure functions; thread-safe.
#ifndef KINDRED_EXPLAIN_H_
#define KINDRED_EXPLAIN_H_

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/statusor.h"
#include "absl/types/span.h"
#include "kindred/corpus.h"
#include "kindred/scored_pairs.h"
#include "kindred/settings.h"
#include "kindred/shingles.h"

namespace kindred {

// A byte range [begin, end) of an original text.
struct TextSpan {
  uint32_t begin = 0;
  uint32_t end = 0;
  friend bool operator==(const TextSpan&, const TextSpan&) = default;
};

// A run of shingles shared in order by both texts.
struct AlignedPassage {
  TextSpan a;
  TextSpan b;
  uint32_t shingles = 0;  // length of the run
};

struct Explanation {
  SignatureSettings settings;
  // The two texts measured (a = 0, b = 1): shared, size_a, size_b
  // (distinct shingles), the exact Jaccard, the signature estimate with
  // settings.perms slots; the containments are its ContainmentOfAInB() and
  // ContainmentOfBInA().
  ScoredPair measure;
  std::vector<TextSpan> marked_a;  // ascending, disjoint
  std::vector<TextSpan> marked_b;
  std::vector<AlignedPassage> passages;  // longest first
};

// The marked spans of `shingles` (one text's shingles in document order, as
// ShingleTexts gives them): the shingles whose hash (HashShingle with
// `seed`) is in `other` (a sorted ShingleSet of the other text) become
// ranges as described in the file comment.
std::vector<TextSpan> SharedSpans(absl::Span<const ShingleText> shingles,
                                  absl::Span<const uint64_t> other, uint64_t seed);

// The aligned passages of two shingle sequences (document order), longest
// first; ties by position in A.
std::vector<AlignedPassage> AlignPassages(absl::Span<const ShingleText> a,
                                          absl::Span<const ShingleText> b, uint64_t seed);

// Shingles and signs both texts per `settings` and fills an Explanation.
// Fails like ShingleTexts (invalid settings, ICU failure, a text of 4 GiB or
// more). Cost: linear in the texts, plus a signature each.
absl::StatusOr<Explanation> Explain(std::string_view text_a, std::string_view text_b,
                                    const SignatureSettings& settings);

// Fills out->measure (b = 1, the counts, jaccard, estimate) from
// two sorted shingle sets and their signatures (equal lengths, from the same
// settings). Leaves the spans and passages alone.
void MeasureExplanation(absl::Span<const uint64_t> set_a, absl::Span<const uint64_t> set_b,
                        absl::Span<const uint32_t> signature_a,
                        absl::Span<const uint32_t> signature_b, Explanation* out);

// The texts of the documents named `ids`, in the order of `ids`, read from
// `reader` (one pass; only the wanted texts are kept). NotFound names the
// first id the corpus does not hold. Errors of the reader pass through.
absl::StatusOr<std::vector<std::string>> ReadTexts(CorpusReader& reader,
                                                   absl::Span<const std::string> ids);

// Renders `text` with `spans` marked: each span is wrapped in `open` and
// `close`. Bytes outside the spans are copied as they are; invalid UTF-8 is
// left to the caller. Requires spans ascending, disjoint and within text.
std::string MarkSpans(std::string_view text, absl::Span<const TextSpan> spans,
                      std::string_view open, std::string_view close);

}  // namespace kindred

#endif  // KINDRED_EXPLAIN_H_
