// The sweep's records (document table, band-key table, candidate pairs, set
// store, scored pairs): round trips, fixed bytes, and clear errors on every
// truncation and on damaged bytes.
#include <catch2/catch.hpp>
#include <cstring>
#include <functional>
#include <limits>

#include "core/record_codec.h"
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
  return {{0, 1, 10, 11, 12, 10.0 / 13, 0.75},
          {0, 4, 3, 3, 3, 1.0, 1.0},
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

// A version 2 document table of one row: u32 first document 0, u64 count 1,
// then what `row` appends.
std::string DocumentBytes(const std::function<void(internal::RecordBuilder&)>& row) {
  internal::RecordBuilder out("DOCS", 2);
  out.U32(0);
  out.U64(1);
  row(out);
  return std::move(out).Finish();
}

TEST_CASE("Document tables of version 2 use varints, and version 1 is still read", "[records]") {
  const DocumentTable table = SomeDocuments();
  const std::string bytes = SerializeDocumentTable(table);
  CHECK(bytes.substr(8, 4) == std::string("\x02\0\0\0", 4));
  // Row 1: id 1+1, length 1, flags 1, input 1, line 1, offset 1, shingles 1.
  CHECK(bytes.size() < 24 + 12 + 8 + 3 * 18 + 2 * 8);
  internal::RecordBuilder v1("DOCS", 1);
  v1.U32(table.first_document);
  v1.U64(table.documents.size());
  for (const DocumentRecord& doc : table.documents) {
    v1.Bytes(doc.id);
    v1.U64(doc.facts.length);
    v1.F64(doc.facts.priority);
    v1.U8(doc.facts.has_priority ? 1 : 0);
    v1.U32(doc.origin.input);
    v1.U64(doc.origin.line);
    v1.U64(doc.origin.offset);
    v1.U32(doc.shingle_count);
  }
  auto old = ParseDocumentTable(std::move(v1).Finish());
  REQUIRE(old.ok());
  CHECK(*old == table);

  const auto error = [](const std::string& b) {
    const absl::Status status = ParseDocumentTable(b).status();
    CHECK(KindOf(status) == ErrorKind::kBadInput);
    return std::string(status.message());
  };
  // id "a", length 3, flags, [priority], input, line, [offset], shingles.
  CHECK(ParseDocumentTable(DocumentBytes([](auto& out) {
          out.Varint(1), out.Raw("a"), out.Varint(3), out.U8(1 | 2), out.F64(-2.5);
          out.Varint(4), out.Varint(5), out.Varint(6), out.Varint(7);
        }))->documents[0] == DocumentRecord{"a", {3, -2.5, true}, {4, 5, 6}, 7});
  CHECK(error(DocumentBytes([](auto& out) {
          out.Varint(1), out.Raw("a"), out.Varint(3), out.U8(8);
          out.Varint(4), out.Varint(5), out.Varint(6), out.Varint(7);
        })) == "document table: unknown flags 8 in a row");
  CHECK(error(DocumentBytes([](auto& out) {
          out.Varint(1), out.Raw("a"), out.Varint(3), out.U8(2), out.F64(0.0);
          out.Varint(4), out.Varint(5), out.Varint(6), out.Varint(7);
        })) == "document table: a priority of +0.0 written out");
  CHECK(error(DocumentBytes([](auto& out) {
          out.Varint(1), out.Raw("a"), out.Varint(3), out.U8(0);
          out.Varint(4), out.Varint(5), out.Varint(~uint64_t{0}), out.Varint(7);
        })) == "document table: an offset of 2^64-1 written out");
  CHECK(error(DocumentBytes([](auto& out) {
          out.Varint(1), out.Raw("a"), out.Varint(3), out.U8(4);
          out.Varint(uint64_t{1} << 32), out.Varint(5), out.Varint(7);
        })) == "document table: an input number or shingle count beyond 32 bits");
  CHECK(error(DocumentBytes([](auto& out) {  // the id runs past the end
          out.Varint(9), out.Raw("abcdef");
        })) == "document table: payload ends inside a field (its counts are damaged)");
}

TEST_CASE("A record of another type or version is refused by name", "[records]") {
  const std::string keys = SerializeBandKeyTable(SomeBandKeys());
  const absl::Status wrong_type = ParseDocumentTable(keys).status();
  CHECK(KindOf(wrong_type) == ErrorKind::kBadInput);
  CHECK(wrong_type.message() ==
        "document table: not a document table record (its first bytes are not \"KNDRDOCS\")");
  std::string newer = SerializeDocumentTable(SomeDocuments());
  newer[8] = 3;  // version 3, checksum left as it was: the version is named first
  CHECK(ParseDocumentTable(newer).status().message() ==
        "document table: format version 3 (this build reads versions 1 to 2)");
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
  // Tables that interleave (keys above and below 2^32, repeated records,
  // an empty table) merge into the order std::sort gives their rows.
  std::vector<BandKeyTable> runs(4);
  BandKeyTable all;
  for (uint32_t i = 0; i < 3000; ++i) {
    const BandKeyRecord row{i % 3, (i * 0x9e3779b97f4a7c15ULL) >> (i % 2 ? 0 : 40), i % 700};
    runs[i % 3].records.push_back(row);
    all.records.push_back(row);
  }
  for (BandKeyTable& run : runs) SortBandKeys(&run);
  SortBandKeys(&all);
  CHECK(MergeBandKeys(runs) == all);
  // Nothing to merge; rows of one band and one key only (one bucket).
  CHECK(MergeBandKeys({}).records.empty());
  CHECK(MergeBandKeys(std::vector<BandKeyTable>(3)).records.empty());
  std::vector<BandKeyTable> same(2);
  for (uint32_t i = 0; i < 200; ++i) same[i % 2].records.push_back({7, 5, 199 - i});
  for (BandKeyTable& run : same) SortBandKeys(&run);
  const BandKeyTable merged = MergeBandKeys(same);
  REQUIRE(merged.records.size() == 200);
  CHECK(std::is_sorted(merged.records.begin(), merged.records.end()));
}

// A version 2 band-key payload written field by field: u64 count, u32 base,
// u8 document bytes, then what `rows` appends.
std::string BandKeyBytes(uint64_t count, uint32_t base, uint8_t width,
                         const std::function<void(internal::RecordBuilder&)>& rows,
                         uint32_t version = 2) {
  internal::RecordBuilder out("BKEY", version);
  out.U64(count);
  out.U32(base);
  out.U8(width);
  rows(out);
  return std::move(out).Finish();
}

std::string BandKeyError(const std::string& bytes) {
  const absl::Status status = ParseBandKeyTable(bytes).status();
  CHECK(KindOf(status) == ErrorKind::kBadInput);
  return std::string(status.message());
}

TEST_CASE("Band-key tables of version 2 are compact, and version 1 is still read", "[records]") {
  // 3 bands x 2000 documents numbered from 1000000, keys of a 64-bit mix.
  BandKeyTable big;
  uint64_t x = 7;
  for (uint32_t doc = 1000000; doc < 1002000; ++doc) {
    for (uint32_t band = 0; band < 3; ++band) {
      x = x * 6364136223846793005ULL + 1442695040888963407ULL;  // Knuth's MMIX LCG
      big.records.push_back({band, x | 1, doc});
    }
  }
  big.records.push_back({2, big.records[5].key, 999999});  // a bucket of two
  SortBandKeys(&big);
  const std::string bytes = SerializeBandKeyTable(big);
  auto parsed = ParseBandKeyTable(bytes);
  REQUIRE(parsed.ok());
  CHECK(*parsed == big);
  CHECK(bytes.substr(8, 4) == std::string("\x02\0\0\0", 4));
  // About 2^64 / 2000 between keys: 6 low bytes, 1 varint byte, 2 bytes of
  // document (against 16 bytes a row in version 1).
  CHECK(bytes.size() < 9.1 * big.records.size() + 64);
  const std::vector<BandKeyTable> parts = PartitionBandKeys(big, 3);
  const std::vector<std::string> part_bytes = SerializeBandKeyPartitions(big, 3);
  REQUIRE(part_bytes.size() == 3);
  for (size_t p = 0; p < 3; ++p) CHECK(part_bytes[p] == SerializeBandKeyTable(parts[p]));
  CHECK(SerializeBandKeyPartitions(big, 1)[0] == bytes);
  CHECK(SerializeBandKeyPartitions(BandKeyTable{}, 2)[1] == SerializeBandKeyTable(BandKeyTable{}));
  CHECK(ParseBandKeyTable(SerializeBandKeyTable(BandKeyTable{})).ok());

  internal::RecordBuilder v1("BKEY", 1);
  v1.U64(big.records.size());
  for (const BandKeyRecord& row : big.records) {
    v1.U32(row.band);
    v1.U64(row.key);
    v1.U32(row.document);
  }
  auto old = ParseBandKeyTable(std::move(v1).Finish());
  REQUIRE(old.ok());
  CHECK(*old == big);

  CHECK(BandKeyError(BandKeyBytes(
            0, 0, 0, [](auto&) {}, 3)) ==
        "band-key table: format version 3 (this build reads versions 1 to 2)");
}

TEST_CASE("Band keys by columns give the sorted table and its partitions' bytes", "[records]") {
  // 3 bands x 300 documents numbered from 40: some keys absent, some
  // documents absent, keys repeated (buckets) and spread over 64 bits.
  std::vector<std::vector<uint64_t>> columns(3, std::vector<uint64_t>(300));
  std::vector<uint8_t> present(300);
  BandKeyTable expected;
  for (uint32_t i = 0; i < 300; ++i) {
    present[i] = i % 17 != 5;
    for (uint32_t band = 0; band < 3; ++band) {
      const uint64_t key = i % 11 == 3 ? 0 : ((i % 97) + 1) * 0x9e3779b97f4a7c15ULL + band;
      columns[band][i] = key;
      if (present[i] && key != 0) expected.records.push_back({band, key, 40 + i});
    }
  }
  SortBandKeys(&expected);
  std::vector<absl::Span<const uint64_t>> spans(columns.begin(), columns.end());
  const BandKeyColumns keys{spans, present, 40};
  CHECK(BandKeyTableOf(keys) == expected);
  for (const uint32_t parts : {1u, 4u}) {
    CHECK(SerializeBandKeyColumns(keys, parts) == SerializeBandKeyPartitions(expected, parts));
  }
}

TEST_CASE("A version 2 band-key table is read only when intact and sorted", "[records]") {
  const auto row = [](internal::RecordBuilder& out, uint64_t high, uint64_t low, int low_bytes,
                      uint64_t doc) {
    out.Varint(high);
    out.Low(low, low_bytes);
    out.U8(static_cast<uint8_t>(doc));
  };
  // Band 0: keys 5 and 7; band 3: key 2^56 + 1 (one low byte).
  const std::string good = BandKeyBytes(3, 10, 1, [&](auto& out) {
    out.Varint(0), out.Varint(2), out.U8(0), row(out, 5, 0, 0, 1), row(out, 2, 0, 0, 0);
    out.Varint(3), out.Varint(1), out.U8(1), row(out, uint64_t{1} << 48, 1, 1, 4);
  });
  auto parsed = ParseBandKeyTable(good);
  REQUIRE(parsed.ok());
  CHECK(parsed->records ==
        std::vector<BandKeyRecord>{{0, 5, 11}, {0, 7, 10}, {3, (uint64_t{1} << 56) + 1, 14}});

  const std::string order = "band-key table: rows out of order at row 2";
  CHECK(BandKeyError(BandKeyBytes(2, 0, 1, [&](auto& out) {  // the same band twice
          out.Varint(1), out.Varint(1), out.U8(0), row(out, 5, 0, 0, 0);
          out.Varint(1), out.Varint(1), out.U8(0), row(out, 6, 0, 0, 0);
        })) == order);
  CHECK(BandKeyError(BandKeyBytes(2, 0, 1, [&](auto& out) {  // an equal key, a smaller document
          out.Varint(1), out.Varint(2), out.U8(0), row(out, 5, 0, 0, 3), row(out, 0, 0, 0, 2);
        })) == order);
  CHECK(BandKeyError(BandKeyBytes(2, 0, 1, [&](auto& out) {  // a key past 2^64 - 1
          out.Varint(1), out.Varint(2), out.U8(0), row(out, ~uint64_t{0}, 0, 0, 3),
              row(out, 1, 0, 0, 4);
        })) == order);
  CHECK(BandKeyError(BandKeyBytes(1, 0, 1, [&](auto& out) {  // a difference past 64 bits
          out.Varint(1), out.Varint(1), out.U8(7), row(out, 256, 0, 7, 3);
        })) == "band-key table: rows out of order at row 1");
  CHECK(BandKeyError(BandKeyBytes(1, ~uint32_t{0}, 1, [&](auto& out) {  // a document past 2^32
          out.Varint(1), out.Varint(1), out.U8(0), row(out, 9, 0, 0, 1);
        })) == "band-key table: rows out of order at row 1");
  CHECK(BandKeyError(BandKeyBytes(1, 0, 1, [&](auto& out) {
          out.Varint(1), out.Varint(2), out.U8(0), row(out, 9, 0, 0, 1);
        })) == "band-key table: a band of 2 rows with 0 low bytes at row 1 of 1");
  CHECK(BandKeyError(BandKeyBytes(1, 0, 1, [&](auto& out) {
          out.Varint(1), out.Varint(1), out.U8(8), row(out, 9, 0, 0, 1);
        })) == "band-key table: a band of 1 rows with 8 low bytes at row 1 of 1");
  CHECK(BandKeyError(BandKeyBytes(1, 0, 5, [](auto&) {})) ==
        "band-key table: documents of 5 bytes in 1 rows");
  CHECK(BandKeyError(BandKeyBytes(9, 0, 1, [&](auto& out) {
          out.Varint(1), out.Varint(1), out.U8(0), row(out, 9, 0, 0, 1);
        })) == "band-key table: counts 9 rows in 5 bytes");
  // A varint longer than its shortest form: 5 as 0x85 0x00.
  CHECK(BandKeyError(BandKeyBytes(1, 0, 1, [&](auto& out) {
          out.Varint(1), out.Varint(1), out.U8(0), out.U8(0x85), out.U8(0), out.U8(1);
        })) == "band-key table: a varint longer than its shortest form or than 64 bits");
  CHECK(BandKeyError(BandKeyBytes(1, 0, 1, [&](auto& out) {  // 2^64 as a varint
          out.Varint(1), out.Varint(1), out.U8(0);
          for (int i = 0; i < 9; ++i) out.U8(0x80);
          out.U8(2), out.U8(1);
        })) == "band-key table: a varint longer than its shortest form or than 64 bits");
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
