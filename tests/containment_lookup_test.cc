// The containment search tables of an index reader (index/containment_lookup.h):
// an index that stores no containment keys (version 2) answers containment
// queries from a table built from its signatures, once per reader and
// extended with appended documents, never once per query.
#include "index/containment_lookup.h"

#include <catch2/catch.hpp>
#include <tuple>
#include <vector>

#include "kindred/index.h"
#include "kindred/index_match.h"
#include "kindred/index_writer.h"
#include "kindred/sweep.h"
#include "testlib/index_fixture.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

using testing::Slice;

std::vector<std::tuple<uint32_t, bool, uint32_t, uint32_t>> Found(const IndexReader& reader,
                                                                  const SignedCorpus& batch,
                                                                  const MatchSettings& match) {
  auto matches = MatchAgainstIndex(reader, batch, IndexMatchOptions{match, 1, false});
  REQUIRE(matches.ok());
  std::vector<std::tuple<uint32_t, bool, uint32_t, uint32_t>> out;
  for (const IndexMatch& m : *matches) {
    out.emplace_back(m.query(), m.in_index, m.other(), m.pair.shared);
  }
  return out;
}

size_t SelfMatches(const std::vector<std::tuple<uint32_t, bool, uint32_t, uint32_t>>& found,
                   const IndexReader& reader, const SignedCorpus& batch) {
  size_t count = 0;
  for (const auto& [query, in_index, other, shared] : found) {
    count += in_index && reader.id(other) == batch.id(query);
  }
  return count;
}

TEST_CASE("containment lookups of a version-2 index: built once per reader, extended after adds",
          "[containment]") {
  testing::TempDir dir;
  const std::string path = dir.File("v2.kin");
  const IndexSettings settings = testing::TestIndexSettings();  // Jaccard: no stored keys
  auto texts = testing::MakeTexts(5, 30, 40, "c");
  const SignedCorpus all = testing::SignTexts(texts, settings.signature);
  REQUIRE(CreateIndex(path, settings, Slice(all, 0, 20)).ok());
  auto reader = IndexReader::Open(path);
  REQUIRE(reader.ok());
  REQUIRE((*reader)->format_version() == 2);
  MatchSettings match;
  match.measure = Measure::kContainment;
  match.threshold = 0.7;
  REQUIRE(UsesContainmentSearch(match));

  index::ContainmentLookupCache& cache = (*reader)->containment_lookups();
  auto first = cache.For(**reader, match);
  REQUIRE_FALSE(first->stored());
  REQUIRE(first->covered() == 20);
  const auto before = Found(**reader, all, match);
  REQUIRE(Found(**reader, all, match) == before);
  REQUIRE(cache.tables_built() == 1);  // the queries used the kept table
  REQUIRE(cache.For(**reader, match) == first);
  REQUIRE(SelfMatches(before, **reader, all) == 20);

  // Ten documents added and document 3 replaced by another text.
  {
    auto writer = IndexWriter::Open(path);
    REQUIRE(writer.ok());
    REQUIRE((*writer)->Append(Slice(all, 20, 30), DuplicateIdPolicy::kError).ok());
    const SignedCorpus replacement =
        testing::SignTexts({{texts[3].first, texts[29].second}}, settings.signature);
    REQUIRE((*writer)->Append(replacement, DuplicateIdPolicy::kReplace).ok());
  }
  REQUIRE((*reader)->ReadAppended().ok());
  REQUIRE_FALSE((*reader)->is_live(3));
  auto second = cache.For(**reader, match);
  REQUIRE(second != first);
  REQUIRE(second->covered() == 31);
  const auto after = Found(**reader, all, match);
  REQUIRE(cache.tables_built() == 2);  // extended once, for the 11 new documents
  REQUIRE(cache.For(**reader, match) == second);
  for (const auto& [query, in_index, other, shared] : after) {
    REQUIRE_FALSE((in_index && other == 3));  // retired: never proposed
  }
  REQUIRE(SelfMatches(after, **reader, all) == 29);  // document 3's text is gone

  // The same matches as a reader opened afresh, which builds its table whole.
  auto fresh = IndexReader::Open(path);
  REQUIRE(fresh.ok());
  REQUIRE(Found(**fresh, all, match) == after);
}

}  // namespace
}  // namespace kindred
