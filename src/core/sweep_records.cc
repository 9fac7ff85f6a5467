// The pair, group and decision records of a sweep (declared in records.h).
//
// Each kind is a header (TSV, CSV) and then rows, each row's text a function
// of its own record: rows are formatted in parts on several threads and
// joined in order, which gives the bytes one pass gives.
#include <algorithm>
#include <functional>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "core/parallel.h"
#include "kindred/records.h"
#include "kindred/verify.h"

namespace kindred {
namespace {

// Rows per part: enough that a part's own string and task cost little
// beside its formatting.
constexpr size_t kRowsPerPart = 2048;

// Appends to *parts the header of `writer_columns` (TSV, CSV) and then rows
// [0, rows): format(begin, end, part) appends rows [begin, end) to *part (no
// header). With several threads, the rows are formatted in parts
// concurrently.
void FormatRows(RecordFormat format, std::vector<std::string> columns, size_t rows, int threads,
                RecordParts* parts,
                const std::function<void(size_t, size_t, std::string*)>& format_rows) {
  std::string header;
  RecordWriter(format, std::move(columns), &header);
  if (!header.empty()) parts->push_back(std::move(header));
  const size_t count = std::min<size_t>(rows / kRowsPerPart, size_t{8} * std::max(1, threads));
  if (threads <= 1 || count <= 1) {
    parts->emplace_back();
    format_rows(0, rows, &parts->back());
    return;
  }
  const size_t first = parts->size();
  parts->resize(first + count);
  ParallelFor(count, threads, [&](size_t begin, size_t end, int) {
    for (size_t p = begin; p < end; ++p) {
      format_rows(rows * p / count, rows * (p + 1) / count, &(*parts)[first + p]);
    }
  });
}

std::vector<std::string> PairColumns() {
  return {
      "a",      "b",          "jaccard",   "estimate", "containment_a_in_b", "containment_b_in_a",
      "shared", "shingles_a", "shingles_b"};
}

void PairRows(RecordFormat format, absl::Span<const ScoredPair> pairs,
              absl::Span<const std::string> ids, std::string* out) {
  RecordWriter writer = RecordWriter::Continuing(format, PairColumns(), out);
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

std::vector<std::string> GroupColumns(RecordFormat format, Grouping grouping) {
  // TSV and CSV: one row per drop, as a list of ids in one field could not
  // be split back when ids hold the separator.
  std::vector<std::string> columns = {
      "group", "size", "keeper", format == RecordFormat::kJsonLines ? "drops" : "drop", "policy"};
  if (grouping == Grouping::kKeepers) columns.push_back("grouping");
  return columns;
}

// The rows of groups [begin, end).
void GroupRows(RecordFormat format, absl::Span<const Group> groups, size_t begin, size_t end,
               absl::Span<const std::string> ids, KeepPolicy policy, std::string* out,
               Grouping grouping) {
  const bool keepers = grouping == Grouping::kKeepers;
  RecordWriter writer = RecordWriter::Continuing(format, GroupColumns(format, grouping), out);
  if (format != RecordFormat::kJsonLines) {
    for (size_t g = begin; g < end; ++g) {
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
  std::vector<std::string_view> drops;
  for (size_t g = begin; g < end; ++g) {
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
    if (!priorities)
      return absl::StrCat("keeper of its group (policy ", KeepPolicyName(policy), ")");
    return absl::StrCat("keeper of its group (policy priority, priority ", PriorityText(facts[doc]),
                        ")");
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

std::vector<std::string> DecisionColumns(Grouping grouping) {
  std::vector<std::string> columns = {"id",         "decision", "group", "keeper",
                                      "best_match", "jaccard",  "reason"};
  if (grouping == Grouping::kKeepers) columns.push_back("grouping");
  return columns;
}

// What the decision rows are made of.
struct DecisionInputs {
  RecordFormat format;
  absl::Span<const Group> groups;
  absl::Span<const std::string> ids;
  absl::Span<const uint8_t> empty;
  KeepPolicy policy;
  absl::Span<const KeepFacts> facts;
  Grouping grouping;
  MemberMatches matches;
};

// The decision rows of documents [begin, end).
void DecisionRows(const DecisionInputs& in, size_t begin, size_t end, std::string* out) {
  const bool keepers = in.grouping == Grouping::kKeepers;
  RecordWriter writer = RecordWriter::Continuing(in.format, DecisionColumns(in.grouping), out);
  const auto& members = in.matches.members;
  // The next member, in document order.
  size_t next = std::lower_bound(members.begin(), members.end(),
                                 std::pair<uint32_t, uint32_t>{static_cast<uint32_t>(begin), 0}) -
                members.begin();
  for (size_t doc = begin; doc < end; ++doc) {
    if (next == members.size() || members[next].first != doc) {
      if (!in.empty[doc]) continue;
      writer.String(in.ids[doc]);
      writer.String("keep");
      for (int field = 0; field < 4; ++field) writer.Null();
      writer.String("empty document: no shingles, never a duplicate");
      if (keepers) writer.String(GroupingName(in.grouping));
      writer.EndRow();
      continue;
    }
    const uint32_t g = members[next].second;
    const BestMatch& match = in.matches.best[next];
    const double keeper_jaccard = keepers ? in.matches.with_keeper[next] : -1;
    ++next;
    const Group& group = in.groups[g];
    writer.String(in.ids[doc]);
    writer.String(group.keeper == doc ? "keep" : "drop");
    writer.Number(g + 1);
    writer.String(in.ids[group.keeper]);
    writer.String(in.ids[match.partner]);
    writer.Similarity(match.jaccard);
    writer.String(
        Reason(group, static_cast<uint32_t>(doc), in.ids, in.policy, in.facts, keeper_jaccard));
    if (keepers) writer.String(GroupingName(in.grouping));
    writer.EndRow();
  }
}

}  // namespace

void JoinParts(const RecordParts& parts, std::string* out) {
  size_t size = out->size();
  for (const std::string& part : parts) size += part.size();
  out->reserve(size);
  for (const std::string& part : parts) out->append(part);
}

void WritePairRecords(RecordFormat format, absl::Span<const ScoredPair> pairs,
                      absl::Span<const std::string> ids, RecordParts* parts, int threads) {
  FormatRows(format, PairColumns(), pairs.size(), threads, parts,
             [&](size_t begin, size_t end, std::string* part) {
               PairRows(format, pairs.subspan(begin, end - begin), ids, part);
             });
}

void WriteGroupRecords(RecordFormat format, absl::Span<const Group> groups,
                       absl::Span<const std::string> ids, KeepPolicy policy, RecordParts* parts,
                       Grouping grouping, int threads) {
  FormatRows(format, GroupColumns(format, grouping), groups.size(), threads, parts,
             [&](size_t begin, size_t end, std::string* part) {
               GroupRows(format, groups, begin, end, ids, policy, part, grouping);
             });
}

void WriteDecisionRecords(RecordFormat format, absl::Span<const Group> groups,
                          absl::Span<const ScoredPair> pairs, absl::Span<const std::string> ids,
                          absl::Span<const uint8_t> empty, KeepPolicy policy, RecordParts* parts,
                          absl::Span<const KeepFacts> facts, Grouping grouping, int threads) {
  const DecisionInputs inputs{
      format,   groups,
      ids,      empty,
      policy,   facts,
      grouping, CollectMemberMatches(groups, pairs, grouping == Grouping::kKeepers)};
  FormatRows(
      format, DecisionColumns(grouping), ids.size(), threads, parts,
      [&](size_t begin, size_t end, std::string* part) { DecisionRows(inputs, begin, end, part); });
}

void WritePairRecords(RecordFormat format, absl::Span<const ScoredPair> pairs,
                      absl::Span<const std::string> ids, std::string* out, int threads) {
  RecordParts parts;
  WritePairRecords(format, pairs, ids, &parts, threads);
  JoinParts(parts, out);
}

void WriteGroupRecords(RecordFormat format, absl::Span<const Group> groups,
                       absl::Span<const std::string> ids, KeepPolicy policy, std::string* out,
                       Grouping grouping, int threads) {
  RecordParts parts;
  WriteGroupRecords(format, groups, ids, policy, &parts, grouping, threads);
  JoinParts(parts, out);
}

void WriteDecisionRecords(RecordFormat format, absl::Span<const Group> groups,
                          absl::Span<const ScoredPair> pairs, absl::Span<const std::string> ids,
                          absl::Span<const uint8_t> empty, KeepPolicy policy, std::string* out,
                          absl::Span<const KeepFacts> facts, Grouping grouping, int threads) {
  RecordParts parts;
  WriteDecisionRecords(format, groups, pairs, ids, empty, policy, &parts, facts, grouping, threads);
  JoinParts(parts, out);
}

}  // namespace kindred
