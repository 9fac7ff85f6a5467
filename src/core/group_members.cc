// Pairs of documents from pairs of groups of identical sets.
#include "core/group_members.h"

#include <algorithm>

#include "core/parallel.h"
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
                                     const MatchSettings& match, int threads) {
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
  ParallelSort(out.begin(), out.end(), ByDocuments, threads);  // pairs are distinct
  return out;
}

std::vector<uint32_t> RepresentativesToRead(const SignedCorpus& corpus,
                                            absl::Span<const uint64_t> pairs) {
  // Marks over the corpus, not a sort of the pairs' ends: a corpus of
  // duplicates has many more candidate pairs than documents.
  std::vector<uint8_t> needed(corpus.size(), 0);
  for (PackedPair pair : pairs) {
    needed[corpus.representative(PairFirst(pair))] = 1;
    needed[corpus.representative(PairSecond(pair))] = 1;
  }
  std::vector<uint32_t> reps;
  for (size_t doc = 0; doc < corpus.size(); ++doc) {
    const bool group = corpus.group_size(doc) >= 2 && corpus.shingle_count(doc) > 0;
    if ((needed[doc] != 0 || group) && !corpus.has_shingles(doc)) {
      reps.push_back(static_cast<uint32_t>(doc));
    }
  }
  return reps;
}

}  // namespace kindred
