#include "kindred/candidate_pairs.h"

#include <algorithm>
#include <utility>

#include "absl/strings/str_cat.h"
#include "core/record_codec.h"

namespace kindred {
namespace {

constexpr std::string_view kTag = "CAND";
constexpr std::string_view kWhat = "candidate pairs";

}  // namespace

CandidatePairs MergeCandidatePairs(absl::Span<const CandidatePairs> parts) {
  CandidatePairs out;
  size_t total = 0;
  for (const CandidatePairs& part : parts) {
    total += part.pairs.size();
    out.stats.bucket_entries += part.stats.bucket_entries;
    out.stats.largest_bucket = std::max(out.stats.largest_bucket, part.stats.largest_bucket);
    out.stats.oversized_buckets += part.stats.oversized_buckets;
  }
  out.pairs.reserve(total);
  for (const CandidatePairs& part : parts) {
    out.pairs.insert(out.pairs.end(), part.pairs.begin(), part.pairs.end());
  }
  std::sort(out.pairs.begin(), out.pairs.end());
  out.pairs.erase(std::unique(out.pairs.begin(), out.pairs.end()), out.pairs.end());
  out.stats.candidate_pairs = out.pairs.size();
  return out;
}

std::vector<uint32_t> CandidateDocuments(absl::Span<const PackedPair> pairs) {
  std::vector<uint32_t> documents;
  documents.reserve(2 * pairs.size());
  for (const PackedPair pair : pairs) {
    documents.push_back(PairFirst(pair));
    documents.push_back(PairSecond(pair));
  }
  std::sort(documents.begin(), documents.end());
  documents.erase(std::unique(documents.begin(), documents.end()), documents.end());
  return documents;
}

std::string SerializeCandidatePairs(const CandidatePairs& pairs) {
  internal::RecordBuilder out(kTag);
  out.Reserve(40 + 8 * pairs.pairs.size());
  out.U64(pairs.stats.bucket_entries);
  out.U64(pairs.stats.largest_bucket);
  out.U64(pairs.stats.oversized_buckets);
  out.U64(pairs.stats.candidate_pairs);
  out.U64(pairs.pairs.size());
  for (const PackedPair pair : pairs.pairs) out.U64(pair);
  return std::move(out).Finish();
}

absl::StatusOr<CandidatePairs> ParseCandidatePairs(std::string_view bytes) {
  internal::RecordParser in(bytes, kTag, kWhat);
  CandidatePairs out;
  uint64_t count = 0;
  if (in.U64(&out.stats.bucket_entries) && in.U64(&out.stats.largest_bucket) &&
      in.U64(&out.stats.oversized_buckets) && in.U64(&out.stats.candidate_pairs) &&
      in.U64(&count)) {
    if (count != in.remaining() / 8 || in.remaining() % 8 != 0) {
      return in.Corrupt(absl::StrCat("counts ", count, " pairs in ", in.remaining(), " bytes"));
    }
    out.pairs.resize(count);
    for (size_t i = 0; i < count; ++i) {
      in.U64(&out.pairs[i]);
      if (PairFirst(out.pairs[i]) >= PairSecond(out.pairs[i]) ||
          (i > 0 && out.pairs[i] <= out.pairs[i - 1])) {
        return in.Corrupt(absl::StrCat("pair ", i + 1, " is not a < b in ascending order"));
      }
    }
  }
  if (absl::Status status = in.Finish(); !status.ok()) return status;
  return out;
}

}  // namespace kindred
