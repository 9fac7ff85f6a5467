// The commit area of version-2 index files: what it records, which slot a
// reader trusts, and what follows from it. A file cut anywhere inside its
// committed part is DataLoss for readers and writers, none of which makes
// it shorter; audit --repair writes a copy instead. Version-1 files are read
// under their old rules, refused by writers and upgraded by compaction.
#include <catch2/catch.hpp>
#include <chrono>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <thread>

#include "index/codec.h"
#include "index/commit_area.h"
#include "index/format.h"
#include "index/segment.h"
#include "kindred/banding.h"
#include "kindred/index.h"
#include "kindred/index_writer.h"
#include "testlib/index_fixture.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

using index::CommitArea;
using index::CommitState;
using index::SlotStatus;
using testing::RequireSameDocument;
using testing::Slice;

uint64_t FileSize(const std::string& path) { return std::filesystem::file_size(path); }

// A header region with both slots filled: generation `older` and `newer`.
std::string TwoSlots(const CommitState& older, const CommitState& newer) {
  std::string file = index::EncodeHeaderRegion("", older);
  const std::string slot = index::EncodeCommitSlot(newer);
  file.replace(index::kCommitSlotOffset[index::SlotOf(newer.generation)], slot.size(), slot);
  return file;
}

TEST_CASE("commit slots round-trip and fill one whole sector", "[commit]") {
  const CommitState state{7, 123456, 3, 999};
  const std::string slot = index::EncodeCommitSlot(state);
  REQUIRE(slot.size() == 512);
  REQUIRE(slot.substr(0, 4) == "KCAS");
  REQUIRE(index::LoadU32(slot.data() + 4) == 3);
  REQUIRE(index::LoadU64(slot.data() + 8) == 7);
  REQUIRE(index::LoadU64(slot.data() + 16) == 123456);
  REQUIRE(index::LoadU64(slot.data() + 24) == 999);
  REQUIRE(index::LoadU64(slot.data() + 504) ==
          index::Checksum(std::string_view(slot).substr(0, 504)));
  CommitState back;
  REQUIRE(index::DecodeCommitSlot(slot, &back) == SlotStatus::kValid);
  REQUIRE(back == state);
  REQUIRE(index::DecodeCommitSlot(std::string(512, '\0'), &back) == SlotStatus::kEmpty);
  for (size_t i = 0; i < slot.size(); i += 7) {
    std::string flipped = slot;
    flipped[i] ^= 0x04;
    REQUIRE(index::DecodeCommitSlot(flipped, &back) == SlotStatus::kDamaged);
  }
}

TEST_CASE("readers take the valid slot with the highest generation", "[commit]") {
  const CommitState older{4, 2048, 1, 10}, newer{5, 4096, 2, 20};
  std::string file = TwoSlots(older, newer);
  CommitArea area;
  REQUIRE(index::ReadCommitArea(file, &area).ok());
  REQUIRE(area.current == newer);
  // The newer slot torn (half written): the older one holds.
  std::string torn = file;
  const uint64_t at = index::kCommitSlotOffset[index::SlotOf(5)];
  std::memset(torn.data() + at + 256, 0x5a, 256);
  REQUIRE(index::ReadCommitArea(torn, &area).ok());
  REQUIRE(area.current == older);
  REQUIRE(area.slots[index::SlotOf(5)] == SlotStatus::kDamaged);
  // Both damaged: DataLoss naming the commit area.
  std::memset(torn.data() + index::kCommitSlotOffset[index::SlotOf(4)] + 8, 0x5a, 8);
  absl::Status status = index::ReadCommitArea(torn, &area);
  REQUIRE(absl::IsDataLoss(status));
  REQUIRE(std::string(status.message()).find("commit area") != std::string::npos);
  // A slot in the other slot's place (generation parity) is not trusted.
  std::string misplaced = index::EncodeHeaderRegion("", older);
  const std::string slot = index::EncodeCommitSlot(CommitState{6, 8192, 3, 30});
  misplaced.replace(index::kCommitSlotOffset[0], slot.size(), slot);
  REQUIRE(index::ReadCommitArea(misplaced, &area).ok());
  REQUIRE(area.current == older);
  REQUIRE(area.slots[0] == SlotStatus::kDamaged);
  // Shorter than the header region.
  REQUIRE(absl::IsDataLoss(index::ReadCommitArea(file.substr(0, 1000), &area)));
}

struct Fixture {
  testing::TempDir dir;
  std::string path = dir.File("x.kin");
  IndexSettings settings = testing::TestIndexSettings(8, 4, 2);
  SignedCorpus all = testing::SignTexts(testing::MakeTexts(31, 12, 24, "c"), settings.signature);

  // Three segments: documents 0..3, 4..7, 8..9.
  void Write() {
    REQUIRE(CreateIndex(path, settings, Slice(all, 0, 4)).ok());
    auto writer = IndexWriter::Open(path);
    REQUIRE((*writer)->Append(Slice(all, 4, 8), DuplicateIdPolicy::kError).ok());
    REQUIRE((*writer)->Append(Slice(all, 8, 10), DuplicateIdPolicy::kError).ok());
  }

  // The same documents as a version-1 file (the previous release's bytes:
  // header of version 1, segments right after it, no commit area).
  std::string Version1() const {
    std::string file = index::EncodeFileHeader(settings, 1);
    const std::pair<size_t, size_t> parts[] = {{0, 4}, {4, 8}, {8, 10}};
    uint32_t number = 0;
    for (auto [begin, end] : parts) {
      SignedCorpus part = Slice(all, begin, end);
      std::vector<index::SegmentDocument> docs;
      for (size_t i = 0; i < part.size(); ++i) {
        docs.push_back({part.id(i), part.facts(i), part.shingles(i), part.signature(i)});
      }
      index::EncodedSegment segment = index::EncodeSegment(number++, begin, docs, {}, settings);
      file += segment.head_and_body + segment.commit;
    }
    return file;
  }
};

TEST_CASE("a file records its commits; each append advances the generation", "[commit]") {
  Fixture f;
  f.Write();
  auto reader = IndexReader::Open(f.path);
  REQUIRE(reader.ok());
  REQUIRE((*reader)->format_version() == 2);
  REQUIRE((*reader)->commit_generation() == 3);
  REQUIRE((*reader)->segments().size() == 3);
  REQUIRE((*reader)->segments()[0].offset == index::kDataStart);
  REQUIRE((*reader)->committed_size() == FileSize(f.path));
  CommitArea area;
  REQUIRE(index::ReadCommitArea(testing::ReadFile(f.path), &area).ok());
  REQUIRE(area.current == CommitState{3, FileSize(f.path), 3, 10});
  for (uint32_t doc = 0; doc < 10; ++doc) RequireSameDocument(**reader, doc, f.all, doc);
}

TEST_CASE("a file cut inside its committed part is damage that nothing cuts further", "[commit]") {
  Fixture f;
  f.Write();
  const std::string original = testing::ReadFile(f.path);
  std::vector<uint64_t> lengths;
  for (uint64_t length = 0; length < original.size(); length += 41) lengths.push_back(length);
  {
    auto reader = IndexReader::Open(f.path);
    for (const SegmentInfo& s : (*reader)->segments()) {
      lengths.push_back(s.offset);
      lengths.push_back(s.offset + s.bytes - 1);  // the last byte of each commit record
    }
  }
  const std::string copy = f.dir.File("x.repaired.kin");
  int repairs = 0;
  for (uint64_t length : lengths) {
    CAPTURE(length);
    std::remove(f.path.c_str());
    f.dir.Write("x.kin", original.substr(0, length));
    auto reader = IndexReader::Open(f.path);
    INFO(reader.status().ToString());
    REQUIRE(absl::IsDataLoss(reader.status()));
    REQUIRE(absl::IsDataLoss(IndexWriter::Open(f.path).status()));
    REQUIRE(FileSize(f.path) == length);
    REQUIRE(absl::IsDataLoss(CompactIndex(f.path).status()));
    REQUIRE(FileSize(f.path) == length);
    auto audit = AuditIndex(f.path);
    REQUIRE(audit.ok());
    REQUIRE_FALSE(audit->ok());
    if (length % 5 == 0 || length >= index::kDataStart) {  // fewer copies written
      auto repair = RepairIndex(f.path);
      if (length < index::kHeaderSizeV2) {
        REQUIRE(absl::IsDataLoss(repair.status()));  // no settings, nothing to salvage
      } else {
        INFO(repair.status().ToString());
        REQUIRE(repair.ok());
        REQUIRE(repair->torn_tail_cut == 0);
        REQUIRE(repair->repaired_path == copy);
        REQUIRE_FALSE(repair->lost.empty());
        auto repaired = IndexReader::Open(copy);
        REQUIRE(repaired.ok());
        REQUIRE((*repaired)->document_count() == repair->documents_kept);
        REQUIRE(repair->documents_kept < 10);
        for (uint32_t doc = 0; doc < repair->documents_kept; ++doc) {
          RequireSameDocument(**repaired, doc, f.all, doc);
        }
        std::remove(copy.c_str());
        ++repairs;
      }
      REQUIRE(FileSize(f.path) == length);
    }
  }
  REQUIRE(repairs > 20);
}

TEST_CASE("bytes after the recorded commit are a torn tail, even a whole segment", "[commit]") {
  Fixture f;
  f.Write();
  const uint64_t committed = FileSize(f.path);
  // A whole segment appended without a commit-area update (a crash between
  // the sync of the segment and the commit) is not part of the index.
  std::vector<index::SegmentDocument> docs;
  SignedCorpus extra = Slice(f.all, 10, 12);
  for (size_t i = 0; i < extra.size(); ++i) {
    docs.push_back({extra.id(i), extra.facts(i), extra.shingles(i), extra.signature(i)});
  }
  index::EncodedSegment segment = index::EncodeSegment(3, 10, docs, {}, f.settings);
  std::string file = testing::ReadFile(f.path) + segment.head_and_body + segment.commit;
  std::remove(f.path.c_str());
  f.dir.Write("x.kin", file);
  auto reader = IndexReader::Open(f.path);
  REQUIRE(reader.ok());
  REQUIRE((*reader)->document_count() == 10);
  REQUIRE((*reader)->torn_tail_bytes() == file.size() - committed);
  auto writer = IndexWriter::Open(f.path);
  REQUIRE(writer.ok());
  REQUIRE((*writer)->torn_tail_cut() == file.size() - committed);
  writer->reset();
  REQUIRE(FileSize(f.path) == committed);
}

TEST_CASE("a writer with reserved space overwrites zeros it synced first", "[commit]") {
  Fixture f;
  f.Write();
  const uint64_t committed = FileSize(f.path);
  IndexWriteOptions options;
  options.reserve_bytes = 10000;
  auto writer = IndexWriter::Open(f.path, options);
  REQUIRE(writer.ok());
  REQUIRE((*writer)->Append(Slice(f.all, 10, 11), DuplicateIdPolicy::kError).ok());
  const uint64_t first_end = (*writer)->reader().committed_size();
  REQUIRE(first_end > committed);
  // The file holds the reserve: zeros after the commit, which a reader
  // ignores and counts as reserved, not as a torn tail.
  REQUIRE(FileSize(f.path) == first_end + 10000);
  {
    auto reader = IndexReader::Open(f.path);
    REQUIRE(reader.ok());
    REQUIRE((*reader)->document_count() == 11);
    REQUIRE((*reader)->reserved_bytes() == 10000);
    REQUIRE((*reader)->torn_tail_bytes() == 0);
  }
  // The next segment goes over the zeros: the file does not grow.
  REQUIRE((*writer)->Append(Slice(f.all, 11, 12), DuplicateIdPolicy::kError).ok());
  const uint64_t second_end = (*writer)->reader().committed_size();
  REQUIRE(second_end > first_end);
  REQUIRE(FileSize(f.path) == first_end + 10000);
  // Closing cuts the reserve off.
  writer->reset();
  REQUIRE(FileSize(f.path) == second_end);
  auto reader = IndexReader::Open(f.path);
  REQUIRE((*reader)->document_count() == 12);
  for (uint32_t doc = 0; doc < 12; ++doc) RequireSameDocument(**reader, doc, f.all, doc);
  REQUIRE(AuditIndex(f.path)->ok());
}

// Mappings of `path` the process holds (/proc/self/maps).
int MappingsOf(const std::string& path) {
  std::ifstream maps("/proc/self/maps");
  int count = 0;
  for (std::string line; std::getline(maps, line);) count += line.find(path) != std::string::npos;
  return count;
}

TEST_CASE("readers catch up with commits into reserved space without a mapping each", "[commit]") {
  Fixture f;
  f.Write();
  IndexWriteOptions options;
  options.reserve_bytes = 1 << 16;
  auto writer = IndexWriter::Open(f.path, options);
  REQUIRE(writer.ok());
  auto reader = IndexReader::Open(f.path);
  REQUIRE(reader.ok());
  // Each commit retires and re-adds document 11 (replace), 40 times.
  for (uint32_t round = 0; round < 40; ++round) {
    REQUIRE((*writer)->Append(Slice(f.all, 11, 12), DuplicateIdPolicy::kReplace).ok());
    REQUIRE((*reader)->ReadAppended().ok());
    REQUIRE((*reader)->document_count() == 11 + round);
    REQUIRE((*reader)->live_count() == 11);
    REQUIRE((*reader)->torn_tail_bytes() == 0);
  }
  RequireSameDocument(**reader, 10 + 39, f.all, 11);
  // One mapping per file size (the reserve grew at most a few times), not
  // one per commit, for the writer's reader and this one.
  CHECK(MappingsOf(f.path) < 10);
}

TEST_CASE("small segments looked up through the tail tables give every candidate", "[commit]") {
  // A large first segment (looked up on its own) and many small ones, some
  // replacing earlier documents, read at open and caught up after it.
  testing::TempDir dir;
  const std::string path = dir.File("t.kin");
  IndexSettings settings = testing::TestIndexSettings(16, 8, 2);
  SignedCorpus all = testing::SignTexts(testing::MakeTexts(5, 160, 30, "t"), settings.signature);
  REQUIRE(CreateIndex(path, settings, Slice(all, 0, 100)).ok());
  auto writer = IndexWriter::Open(path);
  for (size_t begin = 100; begin < 130; begin += 3) {
    REQUIRE((*writer)->Append(Slice(all, begin, begin + 3), DuplicateIdPolicy::kError).ok());
  }
  auto reader = IndexReader::Open(path);
  REQUIRE(reader.ok());
  for (size_t begin = 130; begin < 160; begin += 2) {
    REQUIRE((*writer)->Append(Slice(all, begin, begin + 2), DuplicateIdPolicy::kError).ok());
    REQUIRE(
        (*writer)->Append(Slice(all, begin - 40, begin - 39), DuplicateIdPolicy::kReplace).ok());
    REQUIRE((*reader)->ReadAppended().ok());
  }
  const IndexReader& r = **reader;
  const Banding banding{settings.bands, settings.rows};
  std::vector<std::vector<uint64_t>> keys(r.document_count(), std::vector<uint64_t>(banding.bands));
  for (uint32_t doc = 0; doc < r.document_count(); ++doc) {
    BandKeys(r.signature(doc), banding, absl::MakeSpan(keys[doc]));
  }
  for (uint32_t doc = 0; doc < r.document_count(); ++doc) {
    CAPTURE(doc);
    std::vector<uint32_t> want;  // live documents sharing a key, by brute force
    for (uint32_t other = 0; other < r.document_count(); ++other) {
      bool shared = false;
      for (uint32_t b = 0; b < banding.bands; ++b) {
        shared |= keys[doc][b] != kNoBandKey && keys[doc][b] == keys[other][b];
      }
      if (shared && r.is_live(other)) want.push_back(other);
    }
    std::vector<uint32_t> got;
    r.Candidates(keys[doc], &got);
    REQUIRE(got == want);
    // The live document of each id is the one found.
    const std::optional<uint32_t> live = r.FindLive(r.id(doc));
    REQUIRE(live.has_value());
    REQUIRE(r.is_live(*live));
    REQUIRE(r.id(*live) == r.id(doc));
    if (r.is_live(doc)) REQUIRE(*live == doc);
  }
  REQUIRE_FALSE(r.FindLive("no such id").has_value());
}

TEST_CASE("a tail that ends in zeros: only the bytes before them are torn", "[commit]") {
  Fixture f;
  f.Write();
  const uint64_t committed = FileSize(f.path);
  std::string file = testing::ReadFile(f.path) + "torn" + std::string(5000, '\0');
  std::remove(f.path.c_str());
  f.dir.Write("x.kin", file);
  auto reader = IndexReader::Open(f.path);
  REQUIRE(reader.ok());
  REQUIRE((*reader)->torn_tail_bytes() == 4);
  REQUIRE((*reader)->reserved_bytes() == 5000);
  auto writer = IndexWriter::Open(f.path);
  REQUIRE(writer.ok());
  REQUIRE((*writer)->torn_tail_cut() == 4);  // the zeros go unreported
  writer->reset();
  REQUIRE(FileSize(f.path) == committed);
}

TEST_CASE("a damaged newer slot: whole segments after the older record are kept", "[commit]") {
  Fixture f;
  f.Write();
  std::string file = testing::ReadFile(f.path);
  // Generation 3 lives in slot 0; damage it, as a torn or flipped write would.
  file[index::kCommitSlotOffset[index::SlotOf(3)] + 20] ^= 0x01;
  std::remove(f.path.c_str());
  f.dir.Write("x.kin", file);
  auto reader = IndexReader::Open(f.path);
  REQUIRE(reader.ok());
  REQUIRE((*reader)->commit_generation() == 2);
  REQUIRE((*reader)->damaged_commit_slots() == 1);
  REQUIRE((*reader)->document_count() == 10);  // the third segment is still read
  REQUIRE((*reader)->torn_tail_bytes() == 0);
  // The next writer records it again (and repairs the slot).
  REQUIRE(IndexWriter::Open(f.path).ok());
  auto after = IndexReader::Open(f.path);
  REQUIRE((*after)->commit_generation() == 3);
  REQUIRE((*after)->damaged_commit_slots() == 0);
  REQUIRE((*after)->document_count() == 10);
  REQUIRE(FileSize(f.path) == file.size());
}

TEST_CASE("writers refuse a file whose shingle sets fail their checksums", "[commit]") {
  Fixture f;
  f.Write();
  std::string file = testing::ReadFile(f.path);
  uint64_t at;
  {
    auto reader = IndexReader::Open(f.path);
    const SegmentInfo& s = (*reader)->segments()[1];
    at = s.offset + s.bytes - index::kCommitRecordSize - 9;
    while (file[at] == 0) --at;  // inside the last shingle set, not padding
  }
  file[at] ^= 0x10;
  std::remove(f.path.c_str());
  f.dir.Write("x.kin", file);
  REQUIRE(IndexReader::Open(f.path).ok());  // readers verify sets when they read them
  auto writer = IndexWriter::Open(f.path);
  REQUIRE(absl::IsDataLoss(writer.status()));
  const std::string message(writer.status().message());
  INFO(message);
  REQUIRE(message.find("document \"c7\" (number 7)") != std::string::npos);
  REQUIRE(message.find("bytes ") != std::string::npos);
  REQUIRE(testing::ReadFile(f.path) == file);
  auto repair = RepairIndex(f.path);
  REQUIRE(repair.ok());
  REQUIRE(repair->documents_kept == 9);
  REQUIRE(repair->lost.size() == 1);
  REQUIRE(repair->lost[0].find("document \"c7\" (number 7)") != std::string::npos);
  REQUIRE(testing::ReadFile(f.path) == file);
}

TEST_CASE("version-1 files are read, refused by writers and upgraded by compaction", "[commit]") {
  Fixture f;
  const std::string v1 = f.Version1();
  f.dir.Write("x.kin", v1);
  auto reader = IndexReader::Open(f.path);
  REQUIRE(reader.ok());
  REQUIRE((*reader)->format_version() == 1);
  REQUIRE((*reader)->commit_generation() == 0);
  REQUIRE((*reader)->document_count() == 10);
  for (uint32_t doc = 0; doc < 10; ++doc) RequireSameDocument(**reader, doc, f.all, doc);
  auto writer = IndexWriter::Open(f.path);
  REQUIRE(absl::IsFailedPrecondition(writer.status()));
  REQUIRE(std::string(writer.status().message()).find("kindred compact") != std::string::npos);
  REQUIRE(testing::ReadFile(f.path) == v1);
  auto audit = AuditIndex(f.path);
  REQUIRE(audit->ok());
  // With bytes after the last whole segment, compaction refuses (version 1
  // cannot say whether they were committed) and repair writes a copy.
  std::remove(f.path.c_str());
  f.dir.Write("x.kin", v1 + "KSEG?");
  REQUIRE(absl::IsFailedPrecondition(CompactIndex(f.path).status()));
  auto repair = RepairIndex(f.path);
  REQUIRE(repair.ok());
  REQUIRE(repair->documents_kept == 10);
  REQUIRE(repair->lost.size() == 1);
  REQUIRE(testing::ReadFile(f.path) == v1 + "KSEG?");
  // A whole version-1 file compacts into version 2, then takes appends.
  std::remove(f.path.c_str());
  f.dir.Write("x.kin", v1);
  REQUIRE(CompactIndex(f.path).ok());
  auto upgraded = IndexReader::Open(f.path);
  REQUIRE((*upgraded)->format_version() == 2);
  REQUIRE((*upgraded)->document_count() == 10);
  for (uint32_t doc = 0; doc < 10; ++doc) RequireSameDocument(**upgraded, doc, f.all, doc);
  auto next = IndexWriter::Open(f.path);
  REQUIRE(next.ok());
  REQUIRE((*next)->Append(Slice(f.all, 10, 12), DuplicateIdPolicy::kError).ok());
}

TEST_CASE("retiring ids writes a segment of only a retired list, all or nothing", "[commit]") {
  Fixture f;
  f.Write();
  const std::string before = testing::ReadFile(f.path);
  {
    auto writer = IndexWriter::Open(f.path);
    auto missing = (*writer)->Retire({"c1", "nope", "c1"});
    REQUIRE(absl::IsNotFound(missing.status()));
    REQUIRE(std::string(missing.status().message()).find("\"nope\"") != std::string::npos);
    REQUIRE(testing::ReadFile(f.path) == before);
    auto retired = (*writer)->Retire({"c1", "c8", "c1"});
    REQUIRE(retired.ok());
    REQUIRE(retired->wrote_segment);
    REQUIRE(retired->segment_number == 3);
    REQUIRE(retired->retired == 2);
    REQUIRE((*writer)->reader().live_count() == 8);
  }
  auto reader = IndexReader::Open(f.path);
  REQUIRE((*reader)->segments().size() == 4);
  REQUIRE((*reader)->segments()[3].documents == 0);
  REQUIRE((*reader)->segments()[3].retired == 2);
  REQUIRE((*reader)->live_count() == 8);
  REQUIRE_FALSE((*reader)->is_live(1));
  REQUIRE_FALSE((*reader)->is_live(8));
  REQUIRE_FALSE((*reader)->FindLive("c1").has_value());
  REQUIRE(AuditIndex(f.path)->ok());
  REQUIRE(CompactIndex(f.path).ok());
  auto compacted = IndexReader::Open(f.path);
  REQUIRE((*compacted)->document_count() == 8);
  REQUIRE_FALSE((*compacted)->FindLive("c8").has_value());
}

TEST_CASE("a writer waits for the lock for a bounded time", "[commit]") {
  Fixture f;
  f.Write();
  auto holder = IndexWriter::Open(f.path);
  REQUIRE(holder.ok());
  IndexWriteOptions options;
  options.lock_wait_seconds = 0.2;
  const auto start = std::chrono::steady_clock::now();
  auto waited = IndexWriter::Open(f.path, options);
  const double seconds =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  REQUIRE(absl::IsUnavailable(waited.status()));
  REQUIRE(std::string(waited.status().message()).find("after waiting 0.2 s") != std::string::npos);
  REQUIRE(seconds >= 0.2);
  // Released while another waits: the waiter gets it.
  options.lock_wait_seconds = 30;
  std::thread release([&holder] {
    std::this_thread::sleep_for(std::chrono::milliseconds(100));
    holder->reset();
  });
  auto next = IndexWriter::Open(f.path, options);
  release.join();
  REQUIRE(next.ok());
}

}  // namespace
}  // namespace kindred
