// Output records: JSON string escaping, TSV escaping and CSV quoting
// (RFC 4180), and the three record kinds of a sweep.
#include "kindred/records.h"

#include <catch2/catch.hpp>

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

}  // namespace
}  // namespace kindred
