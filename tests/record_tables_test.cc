// The sweep's records (document table, band-key table, candidate pairs, set
// store, scored pairs): round trips, fixed bytes, and clear errors on every
// truncation and on damaged bytes.
#include <catch2/catch.hpp>
#include <cstring>
#include <functional>
#include <limits>

#include "kindred/band_key_table.h"
#include "kindred/candidate_pairs.h"
#include "kindred/document_table.h"
#include "kindred/errors.h"
#include "kindred/scored_pairs.h"
#include "kindred/set_store.h"

namespace kindred {
namespace {

DocumentTable SomeDocuments() {
  DocumentTable table;
  table.first_document = 7;
  table.documents.push_back({"a", {120, 0, false}, {0, 1, 0}, 40});
  table.documents.push_back({"b\xE2\x80 x", {5, 2.5, true}, {1, 2, 77}, 0});
  table.documents.push_back({"", {0, -1e300, true}, {3, 0, kUnknownOffset}, 1});
  return table;
}

BandKeyTable SomeBandKeys() {
  BandKeyTable table;
  table.records = {{3, 9, 1}, {0, 5, 2}, {0, 5, 1}, {1, ~uint64_t{0}, 0}, {0, 4, 8}};
  SortBandKeys(&table);
  return table;
}

CandidatePairs SomeCandidates() {
  CandidatePairs pairs;
  pairs.pairs = {PackPair(0, 1), PackPair(0, 9), PackPair(2, 3), PackPair(7, 4000000000u)};
  pairs.stats = {12, 5, 1, 4};
  return pairs;
}

SetStore SomeSets() {
  SetStore store(4);
  store.Add(9, std::vector<uint64_t>{1, 5, ~uint64_t{0}}, std::vector<uint32_t>{1, 2, 3, 4});
  store.Add(2, std::vector<uint64_t>{}, std::vector<uint32_t>{9, 9, 9, 9});
  store.Add(5, std::vector<uint64_t>{42}, std::vector<uint32_t>{0, 0, 7, 0});
  return store;
}

std::vector<ScoredPair> SomeScoredPairs() {
  return {{0, 1, 10, 11, 12, 10.0 / 13, 0.75}, {0, 4, 3, 3, 3, 1.0, 1.0},
          {2, 3, 0, 0, 1, 0, std::numeric_limits<double>::denorm_min()}};
}

// Every cut of `bytes` short of the whole, and every single-bit flip of a
// sample of positions, fails with BadInput naming `what`.
void ExpectDamageRejected(const std::string& bytes, const std::string& what,
                          const std::function<absl::Status(std::string_view)>& parse) {
  REQUIRE(parse(bytes).ok());
  for (size_t length = 0; length < bytes.size(); ++length) {
    const absl::Status status = parse(std::string_view(bytes).substr(0, length));
    INFO("cut at " << length);
    REQUIRE_FALSE(status.ok());
    CHECK(KindOf(status) == ErrorKind::kBadInput);
    CHECK(status.message().find(what) == 0);
  }
  for (size_t at = 0; at < bytes.size(); at += 1 + bytes.size() / 97) {
    for (int bit = 0; bit < 8; bit += 3) {
      std::string damaged = bytes;
      damaged[at] = static_cast<char>(damaged[at] ^ (1 << bit));
      const absl::Status status = parse(damaged);
      INFO("bit " << bit << " of byte " << at);
      REQUIRE_FALSE(status.ok());
      CHECK(KindOf(status) == ErrorKind::kBadInput);
    }
  }
  const absl::Status longer = parse(bytes + "x");
  CHECK_FALSE(longer.ok());
}

TEST_CASE("Document tables round-trip and reject damage", "[records]") {
  const DocumentTable table = SomeDocuments();
  const std::string bytes = SerializeDocumentTable(table);
  auto parsed = ParseDocumentTable(bytes);
  REQUIRE(parsed.ok());
  CHECK(*parsed == table);
  CHECK(SerializeDocumentTable(*parsed) == bytes);
  CHECK(bytes.substr(0, 8) == "KNDRDOCS");
  ExpectDamageRejected(bytes, "document table",
                       [](std::string_view b) { return ParseDocumentTable(b).status(); });
  CHECK(ParseDocumentTable(SerializeDocumentTable(DocumentTable{})).ok());
}

TEST_CASE("A record of another type or version is refused by name", "[records]") {
  const std::string keys = SerializeBandKeyTable(SomeBandKeys());
  const absl::Status wrong_type = ParseDocumentTable(keys).status();
  CHECK(KindOf(wrong_type) == ErrorKind::kBadInput);
  CHECK(wrong_type.message() ==
        "document table: not a document table record (its first bytes are not \"KNDRDOCS\")");
  std::string newer = SerializeDocumentTable(SomeDocuments());
  newer[8] = 2;  // version 2, checksum left as it was: the version is named first
  CHECK(ParseDocumentTable(newer).status().message() ==
        "document table: format version 2 (this build reads version 1)");
}

TEST_CASE("The frame's bytes are fixed: header, little-endian fields, checksum", "[records]") {
  const std::string bytes = SerializeScoredPairs({});
  // 24-byte header, u64 count 0, 8-byte checksum.
  REQUIRE(bytes.size() == 40);
  CHECK(bytes.substr(0, 8) == "KNDRPAIR");
  CHECK(bytes.substr(8, 8) == std::string("\x01\0\0\0\0\0\0\0", 8));
  CHECK(bytes.substr(16, 16) == std::string("\x08\0\0\0\0\0\0\0\0\0\0\0\0\0\0\0", 16));
}

TEST_CASE("Document tables join when consecutive, and repeated ids are refused", "[records]") {
  DocumentTable first, second;
  first.documents.push_back({"x", {}, {0, 1, 0}, 3});
  first.documents.push_back({"y", {}, {0, 2, 10}, 3});
  second.first_document = 2;
  second.documents.push_back({"z", {}, {1, 1, 0}, 3});
  auto joined = JoinDocumentTables({first, second});
  REQUIRE(joined.ok());
  REQUIRE(joined->documents.size() == 3);
  CHECK(joined->documents[2].id == "z");

  DocumentTable gap = second;
  gap.first_document = 3;
  CHECK(KindOf(JoinDocumentTables({first, gap}).status()) == ErrorKind::kInvalidRequest);

  second.documents[0].id = std::string(1, 'x');  // (a literal trips a false -Wrestrict in GCC 12)
  const absl::Status repeated = JoinDocumentTables({first, second}).status();
  CHECK(KindOf(repeated) == ErrorKind::kBadInput);
  CHECK(repeated.message() == "duplicate id \"x\" (input 1 line 1; first seen at input 0 line 1)");
}

TEST_CASE("Band-key tables round-trip, partition whole buckets and merge", "[records]") {
  const BandKeyTable table = SomeBandKeys();
  const std::string bytes = SerializeBandKeyTable(table);
  auto parsed = ParseBandKeyTable(bytes);
  REQUIRE(parsed.ok());
  CHECK(*parsed == table);
  ExpectDamageRejected(bytes, "band-key table",
                       [](std::string_view b) { return ParseBandKeyTable(b).status(); });

  BandKeyTable unsorted;
  unsorted.records = {{1, 5, 0}, {0, 5, 0}};
  CHECK(ParseBandKeyTable(SerializeBandKeyTable(unsorted)).status().message() ==
        "band-key table: rows out of order at row 2");

  // Many keys: every (band, key) lands in one partition; the partitions
  // merged give the table back.
  BandKeyTable big;
  for (uint32_t doc = 0; doc < 500; ++doc) {
    for (uint32_t band = 0; band < 4; ++band) {
      big.records.push_back({band, (doc % 37) * 0x9e3779b97f4a7c15ULL + band + 1, doc});
    }
  }
  SortBandKeys(&big);
  const std::vector<BandKeyTable> parts = PartitionBandKeys(big, 5);
  REQUIRE(parts.size() == 5);
  for (size_t p = 0; p < parts.size(); ++p) {
    CHECK_FALSE(parts[p].records.empty());
    CHECK(std::is_sorted(parts[p].records.begin(), parts[p].records.end()));
    for (const BandKeyRecord& record : parts[p].records) {
      CHECK(BandKeyPartition(record.key, 5) == p);
    }
  }
  CHECK(MergeBandKeys(parts) == big);
  CHECK(PartitionBandKeys(big, 1)[0] == big);
}

TEST_CASE("Candidate pairs round-trip, merge and name their documents", "[records]") {
  const CandidatePairs pairs = SomeCandidates();
  const std::string bytes = SerializeCandidatePairs(pairs);
  auto parsed = ParseCandidatePairs(bytes);
  REQUIRE(parsed.ok());
  CHECK(*parsed == pairs);
  ExpectDamageRejected(bytes, "candidate pairs",
                       [](std::string_view b) { return ParseCandidatePairs(b).status(); });

  CandidatePairs other;
  other.pairs = {PackPair(0, 1), PackPair(1, 2)};
  other.stats = {4, 9, 2, 2};
  const CandidatePairs merged = MergeCandidatePairs({pairs, other});
  CHECK(merged.pairs == std::vector<PackedPair>{PackPair(0, 1), PackPair(0, 9), PackPair(1, 2),
                                                PackPair(2, 3), PackPair(7, 4000000000u)});
  CHECK(merged.stats == CandidateStats{16, 9, 3, 5});
  CHECK(CandidateDocuments(merged.pairs) == std::vector<uint32_t>{0, 1, 2, 3, 7, 9, 4000000000u});

  CandidatePairs backwards;
  backwards.pairs = {PackPair(3, 2)};
  CHECK_FALSE(ParseCandidatePairs(SerializeCandidatePairs(backwards)).ok());
}

TEST_CASE("Set stores round-trip in document order and reject damage", "[records]") {
  const SetStore store = SomeSets();
  const std::string bytes = SerializeSetStore(store);
  auto parsed = ParseSetStore(bytes);
  REQUIRE(parsed.ok());
  CHECK(*parsed == store);
  CHECK(parsed->documents() == std::vector<uint32_t>{2, 5, 9});
  // The same entries added in another order give the same bytes.
  SetStore again(4);
  for (uint32_t doc : {5u, 9u, 2u}) again.Add(doc, store.shingles(doc), store.signature(doc));
  CHECK(SerializeSetStore(again) == bytes);
  ExpectDamageRejected(bytes, "set store",
                       [](std::string_view b) { return ParseSetStore(b).status(); });

  SetStore unsorted(1);
  unsorted.Add(0, std::vector<uint64_t>{5, 5}, std::vector<uint32_t>{1});
  CHECK(ParseSetStore(SerializeSetStore(unsorted)).status().message() ==
        "set store: the set of document 0 is not sorted and repeat-free");
}

TEST_CASE("Scored pairs round-trip bit for bit and merge", "[records]") {
  const std::vector<ScoredPair> pairs = SomeScoredPairs();
  const std::string bytes = SerializeScoredPairs(pairs);
  auto parsed = ParseScoredPairs(bytes);
  REQUIRE(parsed.ok());
  CHECK(*parsed == pairs);
  ExpectDamageRejected(bytes, "scored pairs",
                       [](std::string_view b) { return ParseScoredPairs(b).status(); });
  const std::vector<ScoredPair> merged =
      MergeScoredPairs({std::vector<ScoredPair>{pairs[2]}, std::vector<ScoredPair>{pairs[0]},
                        std::vector<ScoredPair>{pairs[1], pairs[2]}});
  CHECK(merged == pairs);
}

}  // namespace
}  // namespace kindred
