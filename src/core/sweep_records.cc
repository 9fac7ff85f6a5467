// The pair, group and decision records of a sweep (declared in records.h).
#include <algorithm>

#include "absl/strings/str_cat.h"
#include "kindred/records.h"
#include "kindred/verify.h"

namespace kindred {

void WritePairRecords(RecordFormat format, absl::Span<const ScoredPair> pairs,
                      absl::Span<const std::string> ids, std::string* out) {
  RecordWriter writer(format,
                      {"a", "b", "jaccard", "estimate", "containment_a_in_b", "containment_b_in_a",
                       "shared", "shingles_a", "shingles_b"},
                      out);
  for (const ScoredPair& pair : pairs) {
    const Overlap overlap{pair.shared, pair.size_a, pair.size_b};
    writer.String(ids[pair.a]);
    writer.String(ids[pair.b]);
    writer.Similarity(pair.jaccard);
    writer.Similarity(pair.estimate);
    writer.Similarity(overlap.ContainmentOfAInB());
    writer.Similarity(overlap.ContainmentOfBInA());
    writer.Number(pair.shared);
    writer.Number(pair.size_a);
    writer.Number(pair.size_b);
    writer.EndRow();
  }
}

void WriteGroupRecords(RecordFormat format, absl::Span<const Group> groups,
                       absl::Span<const std::string> ids, KeepPolicy policy, std::string* out) {
  if (format != RecordFormat::kJsonLines) {
    // One row per drop: a list of ids in one field could not be split back
    // when ids hold the separator.
    RecordWriter writer(format, {"group", "size", "keeper", "drop", "policy"}, out);
    for (size_t g = 0; g < groups.size(); ++g) {
      for (uint32_t member : groups[g].members) {
        if (member == groups[g].keeper) continue;
        writer.Number(g + 1);
        writer.Number(groups[g].members.size());
        writer.String(ids[groups[g].keeper]);
        writer.String(ids[member]);
        writer.String(KeepPolicyName(policy));
        writer.EndRow();
      }
    }
    return;
  }
  RecordWriter writer(format, {"group", "size", "keeper", "drops", "policy"}, out);
  std::vector<std::string_view> drops;
  for (size_t g = 0; g < groups.size(); ++g) {
    drops.clear();
    for (uint32_t member : groups[g].members) {
      if (member != groups[g].keeper) drops.push_back(ids[member]);
    }
    writer.Number(g + 1);
    writer.Number(groups[g].members.size());
    writer.String(ids[groups[g].keeper]);
    writer.StringList(drops);
    writer.String(KeepPolicyName(policy));
    writer.EndRow();
  }
}

namespace {

// For each document in a pair: its most similar confirmed partner (ties to
// the partner seen first).
struct BestMatch {
  int64_t partner = -1;
  double jaccard = -1;
};

void Consider(BestMatch* best, uint32_t partner, double jaccard) {
  if (jaccard > best->jaccard || (jaccard == best->jaccard && partner < best->partner)) {
    *best = BestMatch{partner, jaccard};
  }
}

}  // namespace

void WriteDecisionRecords(RecordFormat format, absl::Span<const Group> groups,
                          absl::Span<const ScoredPair> pairs, absl::Span<const std::string> ids,
                          absl::Span<const uint8_t> empty, KeepPolicy policy, std::string* out) {
  RecordWriter writer(
      format, {"id", "decision", "group", "keeper", "best_match", "jaccard", "reason"}, out);
  // (document, group index) of every group member, in document order: the
  // work and memory follow the members, not the corpus.
  std::vector<std::pair<uint32_t, uint32_t>> members;
  for (size_t g = 0; g < groups.size(); ++g) {
    for (uint32_t member : groups[g].members) {
      members.emplace_back(member, static_cast<uint32_t>(g));
    }
  }
  std::sort(members.begin(), members.end());
  std::vector<BestMatch> best(members.size());
  const auto consider = [&](uint32_t doc, uint32_t partner, double jaccard) {
    const auto it =
        std::lower_bound(members.begin(), members.end(), std::pair<uint32_t, uint32_t>{doc, 0});
    if (it != members.end() && it->first == doc) {
      Consider(&best[it - members.begin()], partner, jaccard);
    }
  };
  for (const ScoredPair& pair : pairs) {
    consider(pair.a, pair.b, pair.jaccard);
    consider(pair.b, pair.a, pair.jaccard);
  }
  size_t next = 0;  // next member, in document order
  for (size_t doc = 0; doc < ids.size(); ++doc) {
    if (next == members.size() || members[next].first != doc) {
      if (!empty[doc]) continue;
      writer.String(ids[doc]);
      writer.String("keep");
      writer.Null();
      writer.Null();
      writer.Null();
      writer.Null();
      writer.String("empty document: no shingles, never a duplicate");
      writer.EndRow();
      continue;
    }
    const uint32_t g = members[next].second;
    const BestMatch& match = best[next];
    ++next;
    const Group& group = groups[g];
    const bool keeper = group.keeper == doc;
    writer.String(ids[doc]);
    writer.String(keeper ? "keep" : "drop");
    writer.Number(g + 1);
    writer.String(ids[group.keeper]);
    writer.String(ids[match.partner]);
    writer.Similarity(match.jaccard);
    writer.String(keeper ? absl::StrCat("keeper of its group (policy ", KeepPolicyName(policy), ")")
                         : absl::StrCat("near-duplicate; ", ids[group.keeper], " is kept"));
    writer.EndRow();
  }
}

}  // namespace kindred
