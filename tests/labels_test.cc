// Labels files: the three layouts, the label spellings, headers, errors
// naming file and line, and resolving ids against a corpus.
#include "kindred/labels.h"

#include <catch2/catch.hpp>
#include <string>

namespace kindred {
namespace {

TEST_CASE("every documented label spelling parses, in any case", "[labels]") {
  for (const char* yes : {"duplicate", "DUP", "Yes", "true", "1", "  duplicate "}) {
    INFO(yes);
    REQUIRE(ParseLabel(yes).value() == true);
  }
  for (const char* no : {"distinct", "Different", "not-duplicate", "NO", "false", "0"}) {
    INFO(no);
    REQUIRE(ParseLabel(no).value() == false);
  }
  for (const char* bad : {"", "maybe", "2", "duplicates", "label"}) {
    INFO(bad);
    REQUIRE_FALSE(ParseLabel(bad).ok());
  }
}

TEST_CASE("TSV with a header, blank lines and CRLF", "[labels]") {
  const auto pairs =
      ParseLabels("a\tb\tlabel\r\nx.txt\ty.txt\tduplicate\r\n\r\ny.txt\tz.txt\tno\n", "l.tsv");
  REQUIRE(pairs.ok());
  REQUIRE(pairs->size() == 2);
  CHECK((*pairs)[0].a == "x.txt");
  CHECK((*pairs)[0].b == "y.txt");
  CHECK((*pairs)[0].duplicate);
  CHECK((*pairs)[0].line == 2);
  CHECK_FALSE((*pairs)[1].duplicate);
  CHECK((*pairs)[1].line == 4);
}

TEST_CASE("TSV without a header keeps its first line", "[labels]") {
  const auto pairs = ParseLabels("x\ty\t1\n", "l.tsv");
  REQUIRE(pairs.ok());
  REQUIRE(pairs->size() == 1);
  CHECK((*pairs)[0].line == 1);
}

TEST_CASE("CSV with RFC 4180 quoting", "[labels]") {
  const auto pairs = ParseLabels(
      "a,b,label\n\"dir,with comma/x\",\"say "
      "\"\"hi\"\"\",DUPLICATE\nq,r,distinct\n",
      "l.csv");
  REQUIRE(pairs.ok());
  REQUIRE(pairs->size() == 2);
  CHECK((*pairs)[0].a == "dir,with comma/x");
  CHECK((*pairs)[0].b == "say \"hi\"");
  CHECK((*pairs)[0].duplicate);
  CHECK_FALSE((*pairs)[1].duplicate);
}

TEST_CASE("JSON Lines with string, boolean and numeric labels and integer ids", "[labels]") {
  const auto pairs = ParseLabels(
      "{\"a\":\"x\",\"b\":\"y\",\"label\":\"dup\"}\n\n"
      "{\"a\":7,\"b\":8,\"label\":false}\n{\"label\":1,\"b\":\"q\","
      "\"a\":\"p\"}\n",
      "l.jsonl");
  REQUIRE(pairs.ok());
  REQUIRE(pairs->size() == 3);
  CHECK((*pairs)[0].duplicate);
  CHECK((*pairs)[1].a == "7");
  CHECK((*pairs)[1].b == "8");
  CHECK_FALSE((*pairs)[1].duplicate);
  CHECK((*pairs)[1].line == 3);
  CHECK((*pairs)[2].a == "p");
  CHECK((*pairs)[2].duplicate);
}

TEST_CASE("errors name the file and line", "[labels]") {
  struct Case {
    const char* content;
    const char* message;
  };
  for (const Case& c : {
           Case{"a\tb\tlabel\nx\ty\tmaybe\n", "l:2: unknown label \"maybe\""},
           Case{"x\ty\t1\nx\ty\n", "l:2: expected 3 tab-separated columns (a, b, label), found 2"},
           Case{"x,y,1\n\"x,y,1\n", "l:2: unterminated quoted field"},
           Case{"x\ty\t1\ny\tx\t0\n", "l:2: the pair repeats line 1"},
           Case{"x\tx\t1\n", "l:1: pairs \"x\" with itself"},
           Case{"{\"a\":\"x\",\"label\":1}\n", "l:1: missing field \"b\""},
           Case{"{\"a\":\"x\",\"b\":\"y\",\"label\":2}\n",
                "l:1: field \"label\" is not a label (a spelling, true/false "
                "or 1/0)"},
           Case{"{\"a\":[1],\"b\":\"y\",\"label\":1}\n",
                "l:1: field \"a\" is not a string or an integer"},
       }) {
    INFO(c.content);
    const auto pairs = ParseLabels(c.content, "l");
    REQUIRE_FALSE(pairs.ok());
    CHECK(pairs.status().message() == c.message);
  }
}

TEST_CASE("a missing labels file is NotFound", "[labels]") {
  const auto pairs = ReadLabels("/nonexistent/labels.tsv");
  REQUIRE(pairs.status().code() == absl::StatusCode::kNotFound);
}

TEST_CASE("resolving ids: unknown ids fail or are skipped with a warning", "[labels]") {
  const auto pairs = ParseLabels("a\tb\tlabel\nx\ty\t1\ny\tgone\t0\nz\tx\t0\n", "l.tsv");
  REQUIRE(pairs.ok());
  const std::vector<std::string> ids = {"x", "y", "z"};
  const auto strict = ResolveLabels(*pairs, ids, "l.tsv", false, nullptr);
  REQUIRE_FALSE(strict.ok());
  CHECK(strict.status().message() == "l.tsv:3: id \"gone\" is not in the corpus");

  std::vector<std::string> warnings;
  const auto lenient = ResolveLabels(*pairs, ids, "l.tsv", true, &warnings);
  REQUIRE(lenient.ok());
  REQUIRE(lenient->size() == 2);
  CHECK((*lenient)[0].a == 0);
  CHECK((*lenient)[0].b == 1);
  CHECK((*lenient)[0].duplicate);
  CHECK((*lenient)[1].a == 2);
  CHECK((*lenient)[1].b == 0);
  CHECK((*lenient)[1].label == 2);
  REQUIRE(warnings.size() == 1);
  CHECK(warnings[0] == "l.tsv:3: id \"gone\" is not in the corpus; pair skipped");
}

TEST_CASE("the sample corpus labels parse: 82 pairs, 49 duplicates", "[labels]") {
  // Counts as stated in sample_corpus/README.md.
  const auto pairs = ReadLabels(KINDRED_SOURCE_DIR "/sample_corpus/labels.tsv");
  REQUIRE(pairs.ok());
  CHECK(pairs->size() == 82);
  size_t duplicates = 0;
  for (const LabelledPair& pair : *pairs) duplicates += pair.duplicate;
  CHECK(duplicates == 49);
}

}  // namespace
}  // namespace kindred
