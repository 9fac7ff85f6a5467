#include "kindred/scored_pairs.h"

#include <algorithm>
#include <utility>

#include "absl/strings/str_cat.h"
#include "core/record_codec.h"

namespace kindred {
namespace {

constexpr std::string_view kTag = "PAIR";
constexpr std::string_view kWhat = "scored pairs";
constexpr size_t kRowBytes = 5 * 4 + 2 * 8;

bool Before(const ScoredPair& x, const ScoredPair& y) {
  return x.a != y.a ? x.a < y.a : x.b < y.b;
}

}  // namespace

std::string SerializeScoredPairs(absl::Span<const ScoredPair> pairs) {
  internal::RecordBuilder out(kTag);
  out.Reserve(8 + pairs.size() * kRowBytes);
  out.U64(pairs.size());
  for (const ScoredPair& pair : pairs) {
    out.U32(pair.a);
    out.U32(pair.b);
    out.U32(pair.shared);
    out.U32(pair.size_a);
    out.U32(pair.size_b);
    out.F64(pair.jaccard);
    out.F64(pair.estimate);
  }
  return std::move(out).Finish();
}

absl::StatusOr<std::vector<ScoredPair>> ParseScoredPairs(std::string_view bytes) {
  internal::RecordParser in(bytes, kTag, kWhat);
  std::vector<ScoredPair> pairs;
  uint64_t count = 0;
  if (in.U64(&count)) {
    if (count != in.remaining() / kRowBytes || in.remaining() % kRowBytes != 0) {
      return in.Corrupt(absl::StrCat("counts ", count, " pairs in ", in.remaining(), " bytes"));
    }
    pairs.resize(count);
    for (size_t i = 0; i < count; ++i) {
      ScoredPair& pair = pairs[i];
      in.U32(&pair.a);
      in.U32(&pair.b);
      in.U32(&pair.shared);
      in.U32(&pair.size_a);
      in.U32(&pair.size_b);
      in.F64(&pair.jaccard);
      in.F64(&pair.estimate);
      if (pair.a >= pair.b || (i > 0 && !Before(pairs[i - 1], pair))) {
        return in.Corrupt(absl::StrCat("pair ", i + 1, " is not a < b in ascending order"));
      }
    }
  }
  if (absl::Status status = in.Finish(); !status.ok()) return status;
  return pairs;
}

std::vector<ScoredPair> MergeScoredPairs(absl::Span<const std::vector<ScoredPair>> parts) {
  std::vector<ScoredPair> all;
  for (const auto& part : parts) all.insert(all.end(), part.begin(), part.end());
  std::stable_sort(all.begin(), all.end(), Before);
  all.erase(std::unique(all.begin(), all.end(),
                        [](const ScoredPair& x, const ScoredPair& y) {
                          return x.a == y.a && x.b == y.b;
                        }),
            all.end());
  return all;
}

}  // namespace kindred
