// explain: marked spans and aligned passages on hand-built texts, and the
// numbers against the signing path.
#include "kindred/explain.h"

#include <algorithm>
#include <catch2/catch.hpp>
#include <string>

#include "kindred/shingles.h"
#include "kindred/signer.h"
#include "kindred/verify.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

SignatureSettings Words(uint32_t k) {
  SignatureSettings settings;
  settings.k = k;
  return settings;
}

std::vector<TextSpan> Spans(std::initializer_list<std::pair<uint32_t, uint32_t>> list) {
  std::vector<TextSpan> spans;
  for (const auto& [begin, end] : list) spans.push_back({begin, end});
  return spans;
}

TEST_CASE("word 2-shingles: the shared run is marked in both texts", "[explain]") {
  // a: the[0,3) cat[4,7) sat[8,11) on[12,14) the[15,18) mat[19,22)
  // b: a[0,1) cat[2,5) sat[6,9) on[10,12) a[13,14) mat[15,18)
  // Shared 2-shingles: "cat sat" and "sat on". Each text has 5 distinct.
  const auto e = Explain("The cat sat on the mat.", "A cat sat on a mat", Words(2));
  REQUIRE(e.ok());
  CHECK(e->measure.shared == 2);
  CHECK(e->measure.size_a == 5);
  CHECK(e->measure.size_b == 5);
  CHECK(e->measure.jaccard == Approx(2.0 / 8));
  CHECK(e->measure.ContainmentOfAInB() == Approx(0.4));
  CHECK(e->measure.ContainmentOfBInA() == Approx(0.4));
  CHECK(e->marked_a == Spans({{4, 14}}));
  CHECK(e->marked_b == Spans({{2, 12}}));
  REQUIRE(e->passages.size() == 1);
  CHECK(e->passages[0].a == TextSpan{4, 14});
  CHECK(e->passages[0].b == TextSpan{2, 12});
  CHECK(e->passages[0].shingles == 2);
}

TEST_CASE("separate runs stay separate; overlapping runs merge", "[explain]") {
  // k = 2: "a b" [0,3) and "c d" [4,7) are shared, "b c" is not: two runs
  // whose spans do not overlap.
  auto e = Explain("a b c d", "a b z c d", Words(2));
  REQUIRE(e.ok());
  CHECK(e->marked_a == Spans({{0, 3}, {4, 7}}));
  CHECK(e->marked_b == Spans({{0, 3}, {6, 9}}));
  // k = 3: "a b c" [0,5) and "c d e" [4,9) are shared, "b c d" is not; the
  // two runs overlap on "c" and merge into one range.
  e = Explain("a b c d e", "a b c x c d e", Words(3));
  REQUIRE(e.ok());
  CHECK(e->marked_a == Spans({{0, 9}}));
  CHECK(e->marked_b == Spans({{0, 5}, {8, 13}}));
  CHECK(e->measure.shared == 2);
}

TEST_CASE("char shingles map back to original bytes of multi-byte text", "[explain]") {
  // "naïve café": ï and é are two bytes each; "café" is bytes [7, 12).
  SignatureSettings settings;
  settings.mode = ShingleMode::kChar;
  settings.k = 4;
  const auto e = Explain("naïve café", "CAFÉ", settings);
  REQUIRE(e.ok());
  CHECK(e->measure.shared == 1);
  CHECK(e->measure.size_b == 1);
  CHECK(e->marked_a == Spans({{7, 12}}));
  CHECK(e->marked_b == Spans({{0, 5}}));
}

TEST_CASE("aligned passages: the longest run first, with both ranges", "[explain]") {
  // a: one[0,3) two[4,7) three[8,13) four[14,18) five six
  // b: six[0,3) one[4,7) two three four[18,22) ... seven
  const auto e = Explain("one two three four five six",
                         "six one two three four seven eight five six", Words(2));
  REQUIRE(e.ok());
  REQUIRE(e->passages.size() == 2);
  CHECK(e->passages[0].shingles == 3);
  CHECK(e->passages[0].a == TextSpan{0, 18});
  CHECK(e->passages[0].b == TextSpan{4, 22});
  CHECK(e->passages[1].shingles == 1);
  CHECK(e->passages[1].a == TextSpan{19, 27});
}

TEST_CASE("empty and disjoint texts mark nothing", "[explain]") {
  auto e = Explain("", "anything at all here", Words(3));
  REQUIRE(e.ok());
  CHECK(e->measure.size_a == 0);
  CHECK(e->measure.jaccard == 0);
  CHECK(e->measure.estimate == 0);
  CHECK(e->marked_a.empty());
  CHECK(e->marked_b.empty());
  e = Explain("red green blue", "one two three", Words(1));
  REQUIRE(e.ok());
  CHECK(e->measure.shared == 0);
  CHECK(e->passages.empty());
}

TEST_CASE("numbers agree with the signing path", "[explain]") {
  const std::string a =
      "The harbour board met on Tuesday evening to discuss the dredging of the "
      "north channel, "
      "which has silted up badly since the winter storms. Fishermen told the "
      "board that boats "
      "with a deep keel can no longer reach the fuel dock at low tide.";
  const std::string b = a + " Reprinted with permission of the Lantern.";
  const SignatureSettings settings = Words(5);
  const auto e = Explain(a, b, settings);
  REQUIRE(e.ok());
  auto shingler = Shingler::Create(settings);
  REQUIRE(shingler.ok());
  ShingleSet set_a, set_b;
  REQUIRE((*shingler)->Shingle(a, &set_a).ok());
  REQUIRE((*shingler)->Shingle(b, &set_b).ok());
  const ScoredPair overlap = MeasureOverlap(set_a, set_b);
  CHECK(e->measure.shared == overlap.shared);
  CHECK(e->measure.size_a == set_a.size());
  CHECK(e->measure.size_b == set_b.size());
  const Signer signer(settings);
  CHECK(e->measure.estimate == EstimateJaccard(signer.Sign(set_a), signer.Sign(set_b)));
  // All of a lies inside b: the whole of a's words is marked.
  CHECK(e->measure.ContainmentOfAInB() == 1.0);
  REQUIRE(e->marked_a.size() == 1);
  CHECK(e->marked_a[0] == TextSpan{0, static_cast<uint32_t>(a.size() - 1)});  // no final '.'
}

// For k >= 2 consecutive shingles overlap, so the marked bytes are exactly
// the bytes covered by some shingle the other text shares: a brute-force
// per-byte check.
TEST_CASE("marked bytes are exactly those covered by shared shingles", "[explain]") {
  const std::string a =
      "Lost cat: grey tabby answering to Pepper, last seen "
      "near the lighthouse road on Sunday. "
      "Reward offered, call the number at the bakery. Pepper "
      "is shy but friendly.";
  const std::string b =
      "Found: a grey tabby near the lighthouse road on Sunday evening. "
      "Answering to Pepper? "
      "Call the number at the bakery, reward not needed. Shy but friendly cat.";
  for (uint32_t k : {2u, 3u}) {
    const SignatureSettings settings = Words(k);
    const auto e = Explain(a, b, settings);
    REQUIRE(e.ok());
    const auto shingles_a = ShingleTexts(a, settings);
    auto shingler = Shingler::Create(settings);
    ShingleSet set_b;
    REQUIRE((*shingler)->Shingle(b, &set_b).ok());
    std::vector<bool> expected(a.size(), false), marked(a.size(), false);
    for (const ShingleText& s : *shingles_a) {
      if (std::binary_search(set_b.begin(), set_b.end(), HashShingle(s.text, settings.seed))) {
        for (uint32_t i = s.begin; i < s.end; ++i) expected[i] = true;
      }
    }
    for (const TextSpan& span : e->marked_a) {
      for (uint32_t i = span.begin; i < span.end; ++i) marked[i] = true;
    }
    CHECK(marked == expected);
    CHECK(std::count(marked.begin(), marked.end(), true) > 0);
  }
}

TEST_CASE("MarkSpans wraps each span", "[explain]") {
  CHECK(MarkSpans("abcdefgh", Spans({{1, 3}, {5, 8}}), "[[", "]]") == "a[[bc]]de[[fgh]]");
  CHECK(MarkSpans("abc", {}, "[[", "]]") == "abc");
}

TEST_CASE("ReadTexts finds documents by id in a corpus", "[explain]") {
  const std::string root = KINDRED_SOURCE_DIR "/sample_corpus/archive";
  auto reader = CorpusReader::Open({root}, InputOptions{});
  REQUIRE(reader.ok());
  const std::vector<std::string> ids = {"odd/one-word.txt",
                                        "2023/01/new-bus-route-links-the-town.txt"};
  auto texts = ReadTexts(**reader, ids);
  if (!texts.ok()) FAIL(texts.status().message());
  CHECK((*texts)[1].find("bus") != std::string::npos);
  reader = CorpusReader::Open({root}, InputOptions{});
  const std::vector<std::string> missing = {"no/such/doc.txt"};
  auto not_found = ReadTexts(**reader, missing);
  REQUIRE(not_found.status().code() == absl::StatusCode::kNotFound);
  CHECK(not_found.status().message() == "id \"no/such/doc.txt\" is not in the corpus");
}

}  // namespace
}  // namespace kindred
