// Output records: JSON string escaping, TSV escaping and CSV quoting
// (RFC 4180), and the three record kinds of a sweep.
#include "kindred/records.h"

#include <algorithm>
#include <catch2/catch.hpp>
#include <string>
#include <vector>

#include "absl/strings/str_cat.h"
#include "kindred/groups.h"
#include "kindred/text.h"

namespace kindred {
namespace {

std::string Json(std::string_view text) {
  std::string out;
  AppendJsonString(&out, text);
  return out;
}

TEST_CASE("JSON strings escape quotes, backslashes and control characters", "[records]") {
  CHECK(Json("plain") == "\"plain\"");
  CHECK(Json("a\"b\\c") == "\"a\\\"b\\\\c\"");
  CHECK(Json(std::string_view("\n\t\x01\0", 4)) == "\"\\u000a\\u0009\\u0001\\u0000\"");
  CHECK(Json("caf\xC3\xA9 \xE6\x97\xA5") == "\"caf\xC3\xA9 \xE6\x97\xA5\"");
}

TEST_CASE("Invalid UTF-8 in a JSON string becomes U+FFFD", "[records]") {
  CHECK(Json("a\xFF"
             "b") ==
        "\"a\xEF\xBF\xBD"
        "b\"");
  CHECK(Json("\xC3") == "\"\xEF\xBF\xBD\"");                                  // truncated sequence
  CHECK(Json("\xED\xA0\x80") == "\"\xEF\xBF\xBD\xEF\xBF\xBD\xEF\xBF\xBD\"");  // surrogate
  CHECK(Json("\xC0\xAF") == "\"\xEF\xBF\xBD\xEF\xBF\xBD\"");                  // overlong
}

// Reference: The Unicode Standard 15.0, section 3.9, "U+FFFD Substitution of
// Maximal Subparts": E2 80 is a maximal subpart (a truncated three-byte
// sequence) and becomes exactly one U+FFFD, in every output format alike.
TEST_CASE("An id with a truncated sequence gets one U+FFFD in JSON, TSV and CSV", "[records]") {
  const std::vector<std::string> ids = {"a\xE2\x80"
                                        "b",
                                        "c"};
  ScoredPair pair;
  pair.a = 0;
  pair.b = 1;
  pair.shared = 1;
  pair.size_a = 1;
  pair.size_b = 1;
  pair.jaccard = 1;
  pair.estimate = 1;
  const std::vector<ScoredPair> pairs = {pair};
  const std::string repaired = "a\xEF\xBF\xBD"
                               "b";
  for (RecordFormat format : {RecordFormat::kJsonLines, RecordFormat::kTsv, RecordFormat::kCsv}) {
    std::string out;
    WritePairRecords(format, pairs, ids, &out);
    INFO(RecordFormatSuffix(format) << ": " << out);
    size_t replacements = 0;
    for (size_t at = out.find("\xEF\xBF\xBD"); at != std::string::npos;
         at = out.find("\xEF\xBF\xBD", at + 1)) {
      ++replacements;
    }
    CHECK(replacements == 1);
    CHECK(out.find(repaired) != std::string::npos);
    CHECK(out.find("\xE2\x80" "b") == std::string::npos);
  }
  CHECK(Json(ids[0]) == absl::StrCat("\"", repaired, "\""));
  CHECK(Json(ids[0]) == absl::StrCat("\"", RepairUtf8(ids[0]), "\""));
}

TEST_CASE("Similarities have six decimals", "[records]") {
  std::string out;
  AppendSimilarity(&out, 2.0 / 3.0);
  CHECK(out == "0.666667");
}

TEST_CASE("TSV and CSV rows escape their separators", "[records]") {
  std::string tsv;
  RecordWriter tsv_writer(RecordFormat::kTsv, {"id", "n"}, &tsv);
  tsv_writer.String("a\tb\nc\\");
  tsv_writer.Number(3);
  tsv_writer.EndRow();
  CHECK(tsv == "id\tn\na\\tb\\nc\\\\\t3\n");

  std::string csv;
  RecordWriter csv_writer(RecordFormat::kCsv, {"id", "n"}, &csv);
  csv_writer.String("say \"hi\", then go");
  csv_writer.Null();
  csv_writer.EndRow();
  CHECK(csv == "id,n\n\"say \"\"hi\"\", then go\",\n");
}

TEST_CASE("Sweep records name documents by id", "[records]") {
  const std::vector<std::string> ids = {"a.txt", "b.txt", "c.txt", "empty.txt"};
  ScoredPair pair;
  pair.a = 0;
  pair.b = 2;
  pair.shared = 8;
  pair.size_a = 10;
  pair.size_b = 9;
  pair.jaccard = 8.0 / 11.0;
  pair.estimate = 0.75;
  const std::vector<ScoredPair> pairs = {pair};
  std::string out;
  WritePairRecords(RecordFormat::kJsonLines, pairs, ids, &out);
  CHECK(out ==
        "{\"a\":\"a.txt\",\"b\":\"c.txt\",\"jaccard\":0.727273,\"estimate\":0.750000,"
        "\"containment_a_in_b\":0.800000,\"containment_b_in_a\":0.888889,\"shared\":8,"
        "\"shingles_a\":10,\"shingles_b\":9}\n");

  const std::vector<Group> groups = {Group{2, {0, 2}}};
  out.clear();
  WriteGroupRecords(RecordFormat::kJsonLines, groups, ids, KeepPolicy::kLongest, &out);
  CHECK(out ==
        "{\"group\":1,\"size\":2,\"keeper\":\"c.txt\",\"drops\":[\"a.txt\"],"
        "\"policy\":\"longest\"}\n");

  out.clear();
  const std::vector<uint8_t> empty = {0, 0, 0, 1};
  WriteDecisionRecords(RecordFormat::kTsv, groups, pairs, ids, empty, KeepPolicy::kLongest, &out);
  CHECK(out ==
        "id\tdecision\tgroup\tkeeper\tbest_match\tjaccard\treason\n"
        "a.txt\tdrop\t1\tc.txt\tc.txt\t0.727273\tnear-duplicate; c.txt is kept\n"
        "c.txt\tkeep\t1\tc.txt\ta.txt\t0.727273\tkeeper of its group (policy longest)\n"
        "empty.txt\tkeep\t\t\t\t\tempty document: no shingles, never a duplicate\n");
}

TEST_CASE("Decisions match a per-document brute force over random groups", "[records]") {
  // The oracle scans every document and every pair for each one; ties in
  // similarity go to the smaller partner.
  const std::vector<KeepFacts> facts(60);
  for (uint64_t seed = 1; seed <= 20; ++seed) {
    uint64_t state = seed;
    const auto next = [&state](uint32_t bound) {
      state = state * 6364136223846793005ULL + 1442695040888963407ULL;
      return static_cast<uint32_t>((state >> 33) % bound);
    };
    const size_t n = facts.size();
    std::vector<std::string> ids;
    std::vector<uint8_t> empty(n);
    for (size_t doc = 0; doc < n; ++doc) {
      ids.push_back(absl::StrCat("d", doc));
      empty[doc] = next(6) == 0;
    }
    std::vector<ScoredPair> pairs;
    for (int i = 0; i < 25; ++i) {
      ScoredPair pair;
      pair.a = next(n);
      pair.b = next(n);
      if (pair.a == pair.b || empty[pair.a] || empty[pair.b]) continue;
      if (pair.a > pair.b) std::swap(pair.a, pair.b);
      pair.jaccard = 0.8 + 0.05 * next(4);  // repeated values: ties happen
      pairs.push_back(pair);
    }
    std::sort(pairs.begin(), pairs.end(), [](const ScoredPair& x, const ScoredPair& y) {
      return std::pair(x.a, x.b) < std::pair(y.a, y.b);
    });
    pairs.erase(std::unique(pairs.begin(), pairs.end(),
                            [](const ScoredPair& x, const ScoredPair& y) {
                              return x.a == y.a && x.b == y.b;
                            }),
                pairs.end());
    const std::vector<Group> groups = GroupPairs(pairs, facts, KeepPolicy::kFirst);

    std::string expected;
    RecordWriter writer(RecordFormat::kTsv,
                        {"id", "decision", "group", "keeper", "best_match", "jaccard", "reason"},
                        &expected);
    for (size_t doc = 0; doc < n; ++doc) {
      int64_t group = -1;
      for (size_t g = 0; g < groups.size(); ++g) {
        for (uint32_t member : groups[g].members) {
          if (member == doc) group = static_cast<int64_t>(g);
        }
      }
      if (group < 0) {
        if (!empty[doc]) continue;
        writer.String(ids[doc]);
        writer.String("keep");
        for (int i = 0; i < 4; ++i) writer.Null();
        writer.String("empty document: no shingles, never a duplicate");
        writer.EndRow();
        continue;
      }
      int64_t partner = -1;
      double best = -1;
      for (const ScoredPair& pair : pairs) {
        if (pair.a != doc && pair.b != doc) continue;
        const int64_t other = pair.a == doc ? pair.b : pair.a;
        if (pair.jaccard > best || (pair.jaccard == best && other < partner)) {
          partner = other;
          best = pair.jaccard;
        }
      }
      const uint32_t keeper = groups[group].keeper;
      writer.String(ids[doc]);
      writer.String(keeper == doc ? "keep" : "drop");
      writer.Number(group + 1);
      writer.String(ids[keeper]);
      writer.String(ids[partner]);
      writer.Similarity(best);
      writer.String(keeper == doc ? "keeper of its group (policy first)"
                                  : "near-duplicate; " + ids[keeper] + " is kept");
      writer.EndRow();
    }
    std::string out;
    WriteDecisionRecords(RecordFormat::kTsv, groups, pairs, ids, empty, KeepPolicy::kFirst, &out);
    CHECK(out == expected);
  }
}

TEST_CASE("TSV and CSV groups: one row per drop, ids with separators kept whole", "[records]") {
  const std::vector<std::string> ids = {"a b.txt", "tab\there", "x,\"y\"", "line\nbreak",
                                        "back\\slash"};
  const std::vector<Group> groups = {Group{1, {0, 1, 2}}, Group{3, {3, 4}}};
  std::string out;
  WriteGroupRecords(RecordFormat::kTsv, groups, ids, KeepPolicy::kFirst, &out);
  CHECK(out ==
        "group\tsize\tkeeper\tdrop\tpolicy\n"
        "1\t3\ttab\\there\ta b.txt\tfirst\n"
        "1\t3\ttab\\there\tx,\"y\"\tfirst\n"
        "2\t2\tline\\nbreak\tback\\\\slash\tfirst\n");
  out.clear();
  WriteGroupRecords(RecordFormat::kCsv, groups, ids, KeepPolicy::kFirst, &out);
  CHECK(out ==
        "group,size,keeper,drop,policy\n"
        "1,3,tab\there,a b.txt,first\n"
        "1,3,tab\there,\"x,\"\"y\"\"\",first\n"
        "2,2,\"line\nbreak\",back\\slash,first\n");
  out.clear();
  WriteGroupRecords(RecordFormat::kJsonLines, groups, ids, KeepPolicy::kFirst, &out);
  CHECK(out ==
        "{\"group\":1,\"size\":3,\"keeper\":\"tab\\u0009here\",\"drops\":[\"a b.txt\",\"x,\\\"y\\\"\"],"
        "\"policy\":\"first\"}\n"
        "{\"group\":2,\"size\":2,\"keeper\":\"line\\u000abreak\",\"drops\":[\"back\\\\slash\"],"
        "\"policy\":\"first\"}\n");
}

// Enough rows that several threads format each kind in parts: the bytes
// must not depend on where the parts begin and end.
TEST_CASE("Records formatted in parts on threads are the bytes of one pass", "[records]") {
  constexpr uint32_t kDocuments = 30000;
  std::vector<std::string> ids;
  std::vector<uint8_t> empty(kDocuments, 0);
  for (uint32_t doc = 0; doc < kDocuments; ++doc) {
    ids.push_back(
        absl::StrCat(doc % 7 == 0 ? "tab\t,\"" : "doc", doc, doc % 11 == 0 ? "\xFF" : ""));
    empty[doc] = doc % 13 == 5;
  }
  std::vector<Group> groups;
  std::vector<ScoredPair> pairs;
  for (uint32_t first = 0; first + 2 < kDocuments; first += 5) {
    groups.push_back(Group{first + first % 3, {first, first + 1, first + 2}});
    for (uint32_t b : {first + 1, first + 2}) {
      ScoredPair pair;
      pair.a = first;
      pair.b = b;
      pair.size_a = 100 + first % 50;
      pair.size_b = 90 + b % 40;
      pair.shared = 80 + (first + b) % 9;
      pair.jaccard = static_cast<double>(pair.shared) / (pair.size_a + pair.size_b - pair.shared);
      pair.estimate = (first % 128) / 128.0;
      pairs.push_back(pair);
    }
  }
  for (RecordFormat format : {RecordFormat::kJsonLines, RecordFormat::kTsv, RecordFormat::kCsv}) {
    for (Grouping grouping : {Grouping::kComponents, Grouping::kKeepers}) {
      std::string one[3];
      for (int threads : {1, 2, 5}) {
        std::string out[3] = {"x", "y", "z"};  // appended to, never replaced
        WritePairRecords(format, pairs, ids, &out[0], threads);
        WriteGroupRecords(format, groups, ids, KeepPolicy::kFirst, &out[1], grouping, threads);
        WriteDecisionRecords(format, groups, pairs, ids, empty, KeepPolicy::kFirst, &out[2], {},
                             grouping, threads);
        if (threads == 1) {
          for (int kind = 0; kind < 3; ++kind) one[kind] = out[kind];
          const size_t header = format == RecordFormat::kJsonLines ? 0 : 1;
          CHECK(std::count(one[0].begin(), one[0].end(), '\n') == pairs.size() + header);
          continue;
        }
        for (int kind = 0; kind < 3; ++kind) CHECK(out[kind] == one[kind]);
      }
    }
  }
}

}  // namespace
}  // namespace kindred
