// RecordWriter's fields beyond strings and counts, and its nested JSON
// lists: the forms info, explain, plan and tune print. Expected strings are
// written by hand from RFC 8259 (JSON) and the C printf conversions.
#include <catch2/catch.hpp>
#include <string>
#include <vector>

#include "kindred/records.h"

namespace kindred {
namespace {

TEST_CASE("booleans, fixed decimals and %g numbers", "[record_writer]") {
  std::string out;
  RecordWriter row(RecordFormat::kJsonLines, {"ok", "p", "share", "t", "tiny"}, &out);
  row.Bool(true);
  row.Fixed(0.1234567, 6);
  row.Fixed(12.25, 1);
  row.Real(0.8);
  row.Real(1e-05);
  row.EndRow();
  CHECK(out == "{\"ok\":true,\"p\":0.123457,\"share\":12.2,\"t\":0.8,\"tiny\":1e-05}\n");
}

TEST_CASE("a fixed number wider than a short buffer is written whole", "[record_writer]") {
  std::string out;
  RecordWriter row(RecordFormat::kJsonLines, {"big"}, &out);
  row.Fixed(1e80, 2);
  row.EndRow();
  CHECK(out.size() == std::string("{\"big\":}\n").size() + 81 + 3);
  CHECK(out.rfind(".00}\n") == out.size() - 5);
}

TEST_CASE("number lists: a JSON array, space-joined in TSV and CSV", "[record_writer]") {
  const std::vector<uint64_t> lines = {3, 17, 40};
  std::string json, tsv, csv;
  for (auto [format, out] : {std::pair{RecordFormat::kJsonLines, &json},
                             std::pair{RecordFormat::kTsv, &tsv},
                             std::pair{RecordFormat::kCsv, &csv}}) {
    RecordWriter row(format, {"id", "lines"}, out);
    row.String("a");
    row.NumberList(lines);
    row.EndRow();
  }
  CHECK(json == "{\"id\":\"a\",\"lines\":[3,17,40]}\n");
  CHECK(tsv == "id\tlines\na\t3 17 40\n");
  CHECK(csv == "id,lines\na,3 17 40\n");
}

TEST_CASE("nested lists of records and of number pairs", "[record_writer]") {
  std::string out;
  RecordWriter row(RecordFormat::kJsonLines, {"id", "spans", "parts", "empty"}, &out);
  row.String("x");
  row.BeginList();
  row.NumberItem({0, 5});
  row.NumberItem({9, 12});
  row.EndList();
  row.BeginList();
  for (uint64_t n : {1, 2}) {
    RecordWriter item = row.ListItem({"n", "name"});
    item.Number(n);
    item.String(n == 1 ? "one" : "t\"wo");
    item.EndItem();
  }
  row.EndList();
  row.BeginList();
  row.EndList();
  row.EndRow();
  CHECK(out ==
        "{\"id\":\"x\",\"spans\":[[0,5],[9,12]],"
        "\"parts\":[{\"n\":1,\"name\":\"one\"},{\"n\":2,\"name\":\"t\\\"wo\"}],\"empty\":[]}\n");
}

}  // namespace
}  // namespace kindred
