// Pairs of documents from pairs of groups of identical sets.
#include "core/group_members.h"

#include <algorithm>

#include "kindred/candidates.h"
#include "kindred/signer.h"
#include "kindred/sweep.h"
#include "kindred/verify.h"

namespace kindred {
namespace {

bool ByDocuments(const ScoredPair& x, const ScoredPair& y) {
  return x.a != y.a ? x.a < y.a : x.b < y.b;
}

// Appends (x, y) scored as `scored`, which measured x's set as set a.
void AppendOrdered(uint32_t x, uint32_t y, const ScoredPair& scored, std::vector<ScoredPair>* out) {
  ScoredPair pair = scored;
  if (x < y) {
    pair.a = x;
    pair.b = y;
  } else {
    pair.a = y;
    pair.b = x;
    std::swap(pair.size_a, pair.size_b);
  }
  out->push_back(pair);
}

}  // namespace

std::vector<ScoredPair> ExpandGroups(const SignedCorpus& corpus, const GroupMembers& groups,
                                     absl::Span<const ScoredPair> rep_pairs,
                                     const MatchSettings& match) {
  // The pairs counted first, so that `out` is allocated once (growing it
  // by doubling copied it and faulted in fresh pages, on one thread).
  size_t count = 0;
  for (const ScoredPair& rep_pair : rep_pairs) {
    count += groups.of(rep_pair.a).size() * groups.of(rep_pair.b).size();
  }
  const auto same_set_pairs = [&](size_t rep) -> size_t {
    const uint32_t size = corpus.shingle_count(rep);
    const size_t members = groups.of(static_cast<uint32_t>(rep)).size();
    if (members < 2 || size == 0 || !PassesThreshold(size, size, size, match)) return 0;
    return members * (members - 1) / 2;
  };
  for (size_t rep = 0; rep < corpus.size(); ++rep) count += same_set_pairs(rep);
  std::vector<ScoredPair> out;
  out.reserve(count);
  for (const ScoredPair& rep_pair : rep_pairs) {
    for (uint32_t x : groups.of(rep_pair.a)) {
      for (uint32_t y : groups.of(rep_pair.b)) AppendOrdered(x, y, rep_pair, &out);
    }
  }
  for (size_t rep = 0; rep < corpus.size(); ++rep) {
    if (same_set_pairs(rep) == 0) continue;
    const uint32_t size = corpus.shingle_count(rep);
    const absl::Span<const uint32_t> members = groups.of(static_cast<uint32_t>(rep));
    ScoredPair same;
    same.shared = same.size_a = same.size_b = size;
    same.jaccard = JaccardOf(size, size, size);
    same.estimate = EstimateJaccard(corpus.signature(rep), corpus.signature(rep));
    for (size_t x = 0; x < members.size(); ++x) {
      for (size_t y = x + 1; y < members.size(); ++y) {
        AppendOrdered(members[x], members[y], same, &out);
      }
    }
  }
  std::sort(out.begin(), out.end(), ByDocuments);
  return out;
}

std::vector<uint32_t> RepresentativesToRead(const SignedCorpus& corpus,
                                            absl::Span<const uint64_t> pairs) {
  std::vector<uint32_t> reps;
  reps.reserve(2 * pairs.size());
  for (PackedPair pair : pairs) {
    reps.push_back(corpus.representative(PairFirst(pair)));
    reps.push_back(corpus.representative(PairSecond(pair)));
  }
  for (size_t doc = 0; doc < corpus.size(); ++doc) {
    if (corpus.group_size(doc) >= 2 && corpus.shingle_count(doc) > 0) {
      reps.push_back(static_cast<uint32_t>(doc));
    }
  }
  std::sort(reps.begin(), reps.end());
  reps.erase(std::unique(reps.begin(), reps.end()), reps.end());
  reps.erase(std::remove_if(reps.begin(), reps.end(),
                            [&](uint32_t rep) { return corpus.has_shingles(rep); }),
             reps.end());
  return reps;
}

}  // namespace kindred
