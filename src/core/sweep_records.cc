// The pair, group and decision records of a sweep (declared in records.h).
#include <algorithm>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
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
    writer.String(ids[pair.a]);
    writer.String(ids[pair.b]);
    writer.Similarity(pair.jaccard);
    writer.Similarity(pair.estimate);
    writer.Similarity(pair.ContainmentOfAInB());
    writer.Similarity(pair.ContainmentOfBInA());
    writer.Number(pair.shared);
    writer.Number(pair.size_a);
    writer.Number(pair.size_b);
    writer.EndRow();
  }
}

void WriteGroupRecords(RecordFormat format, absl::Span<const Group> groups,
                       absl::Span<const std::string> ids, KeepPolicy policy, std::string* out,
                       Grouping grouping) {
  const bool keepers = grouping == Grouping::kKeepers;
  if (format != RecordFormat::kJsonLines) {
    // One row per drop: a list of ids in one field could not be split back
    // when ids hold the separator.
    std::vector<std::string> columns = {"group", "size", "keeper", "drop", "policy"};
    if (keepers) columns.push_back("grouping");
    RecordWriter writer(format, std::move(columns), out);
    for (size_t g = 0; g < groups.size(); ++g) {
      for (uint32_t member : groups[g].members) {
        if (member == groups[g].keeper) continue;
        writer.Number(g + 1);
        writer.Number(groups[g].members.size());
        writer.String(ids[groups[g].keeper]);
        writer.String(ids[member]);
        writer.String(KeepPolicyName(policy));
        if (keepers) writer.String(GroupingName(grouping));
        writer.EndRow();
      }
    }
    return;
  }
  std::vector<std::string> columns = {"group", "size", "keeper", "drops", "policy"};
  if (keepers) columns.push_back("grouping");
  RecordWriter writer(format, std::move(columns), out);
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
    if (keepers) writer.String(GroupingName(grouping));
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

std::string PriorityText(const KeepFacts& facts) {
  return facts.has_priority ? absl::StrCat(facts.priority) : "none";
}

// The reason of a group member's decision. `keeper_jaccard` >= 0: the
// drop's similarity with its keeper, shown.
std::string Reason(const Group& group, uint32_t doc, absl::Span<const std::string> ids,
                   KeepPolicy policy, absl::Span<const KeepFacts> facts, double keeper_jaccard) {
  const bool priorities = policy == KeepPolicy::kPriority && !facts.empty();
  if (doc == group.keeper) {
    if (!priorities) return absl::StrCat("keeper of its group (policy ", KeepPolicyName(policy), ")");
    return absl::StrCat("keeper of its group (policy priority, priority ",
                        PriorityText(facts[doc]), ")");
  }
  std::string reason = absl::StrCat("near-duplicate; ", ids[group.keeper], " is kept");
  if (keeper_jaccard >= 0) {
    absl::StrAppend(&reason, absl::StrFormat(" (jaccard %.6f with it)", keeper_jaccard));
  }
  if (priorities) {
    absl::StrAppend(&reason, " (priority ", PriorityText(facts[group.keeper]), " against ",
                    PriorityText(facts[doc]), ")");
  }
  return reason;
}

// Every group member with its group and its best-scoring partner (and,
// around keepers, its Jaccard similarity with its keeper), in document order:
// the work and memory follow the members, not the corpus.
struct MemberMatches {
  std::vector<std::pair<uint32_t, uint32_t>> members;  // (document, group index)
  std::vector<BestMatch> best;
  std::vector<double> with_keeper;  // -1 where unknown; empty unless keepers
};

MemberMatches CollectMemberMatches(absl::Span<const Group> groups,
                                   absl::Span<const ScoredPair> pairs, bool keepers) {
  MemberMatches out;
  std::vector<std::pair<uint32_t, uint32_t>>& members = out.members;
  for (size_t g = 0; g < groups.size(); ++g) {
    for (uint32_t member : groups[g].members) {
      members.emplace_back(member, static_cast<uint32_t>(g));
    }
  }
  std::sort(members.begin(), members.end());
  out.best.resize(members.size());
  out.with_keeper.assign(keepers ? members.size() : 0, -1);
  const auto consider = [&](uint32_t doc, uint32_t partner, double jaccard) {
    const auto it =
        std::lower_bound(members.begin(), members.end(), std::pair<uint32_t, uint32_t>{doc, 0});
    if (it != members.end() && it->first == doc) {
      Consider(&out.best[it - members.begin()], partner, jaccard);
      if (keepers && groups[it->second].keeper == partner) {
        out.with_keeper[it - members.begin()] = jaccard;
      }
    }
  };
  for (const ScoredPair& pair : pairs) {
    consider(pair.a, pair.b, pair.jaccard);
    consider(pair.b, pair.a, pair.jaccard);
  }
  return out;
}

}  // namespace

void WriteDecisionRecords(RecordFormat format, absl::Span<const Group> groups,
                          absl::Span<const ScoredPair> pairs, absl::Span<const std::string> ids,
                          absl::Span<const uint8_t> empty, KeepPolicy policy, std::string* out,
                          absl::Span<const KeepFacts> facts, Grouping grouping) {
  const bool keepers = grouping == Grouping::kKeepers;
  std::vector<std::string> columns = {"id",         "decision", "group", "keeper",
                                      "best_match", "jaccard",  "reason"};
  if (keepers) columns.push_back("grouping");
  RecordWriter writer(format, std::move(columns), out);
  const MemberMatches matches = CollectMemberMatches(groups, pairs, keepers);
  const auto& members = matches.members;
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
      if (keepers) writer.String(GroupingName(grouping));
      writer.EndRow();
      continue;
    }
    const uint32_t g = members[next].second;
    const BestMatch& match = matches.best[next];
    const double keeper_jaccard = keepers ? matches.with_keeper[next] : -1;
    ++next;
    const Group& group = groups[g];
    const bool keeper = group.keeper == doc;
    writer.String(ids[doc]);
    writer.String(keeper ? "keep" : "drop");
    writer.Number(g + 1);
    writer.String(ids[group.keeper]);
    writer.String(ids[match.partner]);
    writer.Similarity(match.jaccard);
    writer.String(Reason(group, static_cast<uint32_t>(doc), ids, policy, facts, keeper_jaccard));
    if (keepers) writer.String(GroupingName(grouping));
    writer.EndRow();
  }
}

}  // namespace kindred
