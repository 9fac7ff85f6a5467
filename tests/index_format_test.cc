// Unit tests of the index byte format: codec, file header, segment layout.
#include <catch2/catch.hpp>

#include "index/codec.h"
#include "index/format.h"
#include "index/segment.h"
#include "kindred/banding.h"
#include "kindred/signer.h"
#include "testlib/index_fixture.h"

namespace kindred::index {
namespace {

std::string Hex(std::string_view bytes) {
  std::string out;
  for (unsigned char c : bytes) {
    static const char kDigits[] = "0123456789abcdef";
    out += kDigits[c >> 4];
    out += kDigits[c & 15];
  }
  return out;
}

TEST_CASE("fixed-width values are little-endian", "[codec]") {
  std::string out;
  ByteWriter writer(&out);
  writer.U32(0x01020304);
  writer.U64(0x0102030405060708ULL);
  writer.F64(1.0);  // IEEE 754 binary64: 1.0 is 0x3FF0000000000000
  REQUIRE(Hex(out) ==
          "04030201"
          "0807060504030201"
          "000000000000f03f");
  ByteReader reader(out);
  uint32_t a;
  uint64_t b;
  double c;
  REQUIRE(reader.U32(&a));
  REQUIRE(reader.U64(&b));
  REQUIRE(reader.F64(&c));
  REQUIRE(a == 0x01020304);
  REQUIRE(b == 0x0102030405060708ULL);
  REQUIRE(c == 1.0);
  REQUIRE_FALSE(reader.U8(nullptr));  // nothing left: fails before writing
}

TEST_CASE("varints are unsigned LEB128", "[codec]") {
  // Worked examples of unsigned LEB128 (DWARF 5 standard, section 7.6, and
  // the Wikipedia article's 624485 -> E5 8E 26).
  struct Case {
    uint64_t value;
    const char* hex;
  } cases[] = {
      {0, "00"},     {2, "02"},       {127, "7f"},        {128, "8001"},
      {129, "8101"}, {12857, "b964"}, {624485, "e58e26"}, {UINT64_MAX, "ffffffffffffffffff01"}};
  for (const Case& c : cases) {
    std::string out;
    ByteWriter(&out).Varint(c.value);
    REQUIRE(Hex(out) == c.hex);
    ByteReader reader(out);
    uint64_t back = 0;
    REQUIRE(reader.Varint(&back));
    REQUIRE(back == c.value);
    REQUIRE(reader.remaining() == 0);
  }
}

TEST_CASE("varint decoder rejects malformed input", "[codec]") {
  uint64_t v;
  for (std::string bad : {std::string("\x80", 1), std::string("\xff\xff", 2),
                          std::string("\x80\x00", 2),  // overlong zero
                          std::string("\xff\xff\xff\xff\xff\xff\xff\xff\xff\x02", 10),
                          std::string("\x80\x80\x80\x80\x80\x80\x80\x80\x80\x80\x01", 11)}) {
    ByteReader reader(bad);
    REQUIRE_FALSE(reader.Varint(&v));
  }
}

TEST_CASE("shingle sets round-trip as delta varints", "[codec]") {
  std::vector<uint64_t> set = {1, 2, 300, 0x8000000000000000ULL, UINT64_MAX};
  std::string bytes;
  EncodeShingleSet(set, &bytes);
  // 1, +1, +298, +(2^63-300), +(2^63-1): worked by hand.
  REQUIRE(Hex(bytes.substr(0, 4)) == "0101aa02");
  std::vector<uint64_t> back;
  REQUIRE(DecodeShingleSet(bytes, 5, &back));
  REQUIRE(back == set);
  back.clear();
  REQUIRE_FALSE(DecodeShingleSet(bytes, 4, &back));  // bytes left over
  back.clear();
  REQUIRE_FALSE(DecodeShingleSet(bytes, 6, &back));  // runs out
  back.clear();
  REQUIRE_FALSE(DecodeShingleSet(std::string("\x05\x00", 2), 2, &back));  // repeat
  back.clear();
  REQUIRE(DecodeShingleSet("", 0, &back));
  REQUIRE(back.empty());
}

TEST_CASE("file header round-trips every field", "[format]") {
  IndexSettings settings;
  settings.signature.mode = ShingleMode::kChar;
  settings.signature.k = 7;
  settings.signature.seed = 0x0123456789abcdefULL;
  settings.signature.scheme = SignerScheme::kClassic;
  settings.signature.perms = 200;
  settings.unicode_version = "Unicode 15.0, ICU 72.1";
  settings.bands = 20;
  settings.rows = 9;
  settings.threshold = 0.65;
  settings.measure = Measure::kContainment;
  const uint32_t version = GENERATE(1u, 2u);
  CAPTURE(version);
  std::string header = EncodeFileHeader(settings, version);
  REQUIRE(header.size() % 8 == 0);
  // Version 1: 22 bytes of text padded to 24; version 2: one 512-byte sector.
  REQUIRE(header.size() == (version == 1 ? 56 + 24 + 8 : 512));
  if (version == 2) {
    REQUIRE(header.substr(80, 512 - 88) == std::string(512 - 88, '\0'));
  }
  REQUIRE(header.substr(0, 8) == std::string("KINDRED\x1a", 8));
  REQUIRE(LoadU32(header.data() + 8) == version);
  REQUIRE(LoadU32(header.data() + 12) == header.size());
  REQUIRE(header[16] == 1);  // char
  REQUIRE(header[17] == 1);  // classic
  REQUIRE(header[18] == 1);  // containment
  REQUIRE(LoadU32(header.data() + 20) == 7);
  REQUIRE(LoadU64(header.data() + 24) == 0x0123456789abcdefULL);
  REQUIRE(LoadU32(header.data() + 32) == 200);
  REQUIRE(LoadU32(header.data() + 36) == 20);
  REQUIRE(LoadU32(header.data() + 40) == 9);
  REQUIRE(LoadU32(header.data() + 44) == 22);
  REQUIRE(header.substr(56, 22) == settings.unicode_version);
  IndexSettings back;
  size_t size = 0;
  uint32_t version_back = 0;
  REQUIRE(DecodeFileHeader(header, &back, &size, &version_back).ok());
  REQUIRE(size == header.size());
  REQUIRE(version_back == version);
  REQUIRE(back == settings);
}

TEST_CASE("file header errors", "[format]") {
  std::string header = EncodeFileHeader(testing::TestIndexSettings());
  IndexSettings back;
  size_t size;
  REQUIRE(absl::IsDataLoss(DecodeFileHeader("", &back, &size)));
  REQUIRE(absl::IsDataLoss(DecodeFileHeader("KINDRED?xxxxxxxxxxxxxxxxxxxxxx", &back, &size)));
  REQUIRE(absl::IsDataLoss(DecodeFileHeader(header.substr(0, header.size() - 1), &back, &size)));
  std::string flipped = header;
  flipped[20] ^= 1;
  REQUIRE(absl::IsDataLoss(DecodeFileHeader(flipped, &back, &size)));
  // A newer version with a valid checksum: FailedPrecondition, not DataLoss.
  std::string newer = header;
  newer[8] = 4;
  uint64_t checksum = Checksum(std::string_view(newer).substr(0, newer.size() - 8));
  std::memcpy(newer.data() + newer.size() - 8, &checksum, 8);
  absl::Status status = DecodeFileHeader(newer, &back, &size);
  REQUIRE(absl::IsFailedPrecondition(status));
  REQUIRE(std::string(status.message()).find("version 4 is newer") != std::string::npos);
}

TEST_CASE("a version-3 header holds the containment-key settings", "[format]") {
  IndexSettings settings = testing::TestIndexSettings();
  REQUIRE(VersionFor(settings) == 2);
  settings.containment = ContainmentKeysFor(0.7, 20);
  // Partitions 20 * 2^k .. 20 * 2^(k+1) - 1 up to the one holding 2^20.
  REQUIRE(settings.containment.partitions == 16);
  REQUIRE(VersionFor(settings) == 3);
  std::string header = EncodeFileHeader(settings);
  REQUIRE(header.size() == 512);
  REQUIRE(LoadU32(header.data() + 8) == 3);
  REQUIRE(LoadU32(header.data() + 488) == 20);
  REQUIRE(LoadU32(header.data() + 492) == 16);
  REQUIRE(std::bit_cast<double>(LoadU64(header.data() + 496)) == 0.7);
  IndexSettings back;
  size_t size = 0;
  uint32_t version = 0;
  REQUIRE(DecodeFileHeader(header, &back, &size, &version).ok());
  REQUIRE(version == 3);
  REQUIRE(back == settings);
  // Out-of-range fields under a valid checksum are damage.
  std::string bad = header;
  StoreU32(bad.data() + 492, 0);
  uint64_t checksum = Checksum(std::string_view(bad).substr(0, bad.size() - 8));
  StoreU64(bad.data() + bad.size() - 8, checksum);
  REQUIRE(absl::IsDataLoss(DecodeFileHeader(bad, &back, &size)));
}

TEST_CASE("segment encodes and parses every field", "[format]") {
  IndexSettings settings = testing::TestIndexSettings(16, 8, 2);
  auto texts = testing::MakeTexts(7, 6, 40, "doc-");
  SignedCorpus corpus = testing::SignTexts(texts, settings.signature);
  std::vector<SegmentDocument> docs;
  for (size_t i = 0; i < corpus.size(); ++i) {
    docs.push_back({corpus.id(i), corpus.facts(i), corpus.shingles(i), corpus.signature(i)});
  }
  std::vector<uint64_t> retired = {1, 4};
  EncodedSegment segment = EncodeSegment(3, 10, docs, retired, settings);
  std::string file = std::string(64, 'x') + segment.head_and_body + segment.commit;
  REQUIRE(segment.commit.size() == kCommitRecordSize);
  REQUIRE(segment.head_and_body.size() % 8 == 0);

  SegmentView view;
  absl::Status error;
  REQUIRE(view.Parse(file, 64, 3, 10, 16, &error) == SegmentScan::kSegment);
  REQUIRE(error.ok());
  REQUIRE(view.doc_count() == 6);
  REQUIRE(view.header().first_doc == 10);
  REQUIRE(view.header().retired_count == 2);
  REQUIRE(view.retired(0) == 1);
  REQUIRE(view.retired(1) == 4);
  REQUIRE(view.total_bytes() == file.size() - 64);
  for (uint32_t i = 0; i < 6; ++i) {
    DocRecord record = view.doc(i);
    REQUIRE(view.id(i) == corpus.id(i));
    REQUIRE(record.text_length == corpus.facts(i).length);
    REQUIRE(record.priority == corpus.facts(i).priority);
    REQUIRE(((record.flags & kDocFlagHasPriority) != 0) == corpus.facts(i).has_priority);
    REQUIRE(record.shingle_count == corpus.shingles(i).size());
    auto signature = view.signature(i);
    REQUIRE(std::equal(signature.begin(), signature.end(), corpus.signature(i).begin()));
    std::vector<uint64_t> set;
    REQUIRE(DecodeShingleSet(view.shingle_bytes(i), record.shingle_count, &set));
    REQUIRE(
        std::equal(set.begin(), set.end(), corpus.shingles(i).begin(), corpus.shingles(i).end()));
    REQUIRE(Checksum(view.shingle_bytes(i)) == record.shingles_checksum);
  }
  // id order: ids sorted bytewise ("doc-0" < "doc-1" < ...).
  for (uint32_t i = 0; i < 6; ++i) REQUIRE(view.id_order(i) == i);
  // Band keys: the BandKeys of each signature, sorted.
  std::vector<std::pair<uint64_t, uint32_t>> expected;
  std::vector<uint64_t> keys(8);
  for (uint32_t i = 0; i < 6; ++i) {
    BandKeys(corpus.signature(i), Banding{8, 2}, absl::MakeSpan(keys));
    for (uint64_t key : keys) expected.emplace_back(key, i);
  }
  std::sort(expected.begin(), expected.end());
  REQUIRE(view.key_count() == expected.size());
  for (size_t i = 0; i < expected.size(); ++i) {
    REQUIRE(view.keys()[i] == expected[i].first);
    REQUIRE(view.key_docs()[i] == expected[i].second);
  }
  // Out of sequence: wrong segment number or first document.
  REQUIRE(view.Parse(file, 64, 2, 10, 16, &error) == SegmentScan::kCorrupt);
  REQUIRE(view.Parse(file, 64, 3, 11, 16, &error) == SegmentScan::kCorrupt);
}

TEST_CASE("torn and corrupt segments are told apart", "[format]") {
  IndexSettings settings = testing::TestIndexSettings(16, 8, 2);
  SignedCorpus corpus = testing::SignTexts(testing::MakeTexts(3, 3, 30, "d"), settings.signature);
  std::vector<SegmentDocument> docs;
  for (size_t i = 0; i < corpus.size(); ++i) {
    docs.push_back({corpus.id(i), corpus.facts(i), corpus.shingles(i), corpus.signature(i)});
  }
  EncodedSegment segment = EncodeSegment(0, 0, docs, {}, settings);
  std::string whole = segment.head_and_body + segment.commit;
  SegmentView view;
  absl::Status error;
  // Every proper prefix is a torn tail (a crash while appending).
  for (size_t n = 1; n < whole.size(); ++n) {
    REQUIRE(view.Parse(whole.substr(0, n), 0, 0, 0, 16, &error) == SegmentScan::kTornTail);
  }
  // A zeroed commit record at the end of the file: torn (not yet written).
  std::string zero_commit = segment.head_and_body + std::string(kCommitRecordSize, '\0');
  REQUIRE(view.Parse(zero_commit, 0, 0, 0, 16, &error) == SegmentScan::kTornTail);
  // The same followed by more bytes: corrupt.
  REQUIRE(view.Parse(zero_commit + "x", 0, 0, 0, 16, &error) == SegmentScan::kCorrupt);
  // A damaged body with a valid commit: corrupt, naming the place.
  std::string damaged = whole;
  damaged[kSegmentHeaderSize + 3] ^= 0x10;
  REQUIRE(view.Parse(damaged, 0, 0, 0, 16, &error) == SegmentScan::kCorrupt);
  SegmentHeader header;
  REQUIRE(DecodeSegmentHeader(whole, &header));
  SectionLayout layout;
  REQUIRE(ComputeLayout(header, 16, UINT64_MAX, &layout));
  REQUIRE(std::string(error.message()) ==
          "index segment 0 at byte 0: its tables (bytes 0.." +
              std::to_string(kSegmentHeaderSize + layout.tables_end) +
              ": ids, signatures, band keys) fail their checksum");
}

}  // namespace
}  // namespace kindred::index
