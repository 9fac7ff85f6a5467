// Fault injection: a writer killed (or starved of disk) at every step of an
// append and of a compaction. Afterwards exactly the committed documents
// must be readable, audit must pass, and the next writer must succeed.
#include <catch2/catch.hpp>
#include <cstdio>
#include <filesystem>

#include "testlib/fault_file_system.h"
#include "kindred/index.h"
#include "kindred/index_writer.h"
#include "testlib/index_fixture.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

using testing::FaultFileSystem;
using testing::FaultKind;
using testing::RequireSameDocument;
using testing::Slice;

constexpr size_t kChunk = 64;  // bytes per injected write step

struct Fixture {
  testing::TempDir dir;
  std::string path = dir.File("x.kin");
  IndexSettings settings = testing::TestIndexSettings(32, 16, 2);
  SignedCorpus all = testing::SignTexts(testing::MakeTexts(11, 24, 80, "f"), settings.signature);
  std::string original;  // two segments: docs 0..9 and 10..13

  Fixture() {
    REQUIRE(CreateIndex(path, settings, Slice(all, 0, 10)).ok());
    auto writer = IndexWriter::Open(path);
    REQUIRE((*writer)->Append(Slice(all, 10, 14), DuplicateIdPolicy::kError).ok());
    writer->reset();
    original = testing::ReadFile(path);
  }

  void Restore() {
    std::remove(path.c_str());
    dir.Write("x.kin", original);
  }
};

// The index holds documents 0..count-1 of `all`, readable, and audits clean.
void RequireCommitted(const Fixture& f, uint32_t count) {
  auto reader = IndexReader::Open(f.path);
  INFO(reader.status().ToString());
  REQUIRE(reader.ok());
  REQUIRE((*reader)->document_count() == count);
  for (uint32_t doc = 0; doc < count; ++doc) RequireSameDocument(**reader, doc, f.all, doc);
  auto audit = AuditIndex(f.path);
  REQUIRE(audit.ok());
  INFO((audit->problems.empty() ? "" : audit->problems[0]));
  REQUIRE(audit->ok());
}

// Runs one append of documents 14..19 through `fs` and closes the writer;
// returns whether the append reported success. With `reserve` > 0 the
// writer commits into reserved space (zeros it appends and syncs first,
// then overwrites) and cuts the reserve off when it closes: a fault there
// comes after the acknowledgement (*after_append).
bool AppendThrough(Fixture& f, FaultFileSystem* fs, uint64_t reserve = 0,
                   bool* after_append = nullptr) {
  IndexWriteOptions options{fs};
  options.reserve_bytes = reserve;
  auto writer = IndexWriter::Open(f.path, options);
  REQUIRE(writer.ok());
  const bool acknowledged = (*writer)->Append(Slice(f.all, 14, 20), DuplicateIdPolicy::kError).ok();
  const bool fired = fs->fired();
  writer->reset();
  if (after_append != nullptr) *after_append = fs->fired() && !fired;
  return acknowledged;
}

TEST_CASE("append killed or failing at every step loses nothing committed", "[fault]") {
  // Without and with reserved space (a crash leaves the reserve behind).
  const uint64_t reserve = GENERATE(uint64_t{0}, uint64_t{3000});
  CAPTURE(reserve);
  Fixture f;
  FaultFileSystem clean(DefaultFileSystem(), FaultKind::kCrash, -1, kChunk);
  f.Restore();
  REQUIRE(AppendThrough(f, &clean, reserve));
  REQUIRE(testing::ReadFile(f.path).size() == IndexReader::Open(f.path).value()->committed_size());
  const int64_t steps = clean.steps();
  REQUIRE(steps > 10);
  int trials = 0;
  for (FaultKind kind : {FaultKind::kCrash, FaultKind::kDiskFull, FaultKind::kSyncFails}) {
    for (int64_t fail_at = 0; fail_at <= steps; ++fail_at) {
      CAPTURE(static_cast<int>(kind), fail_at);
      f.Restore();
      FaultFileSystem fs(DefaultFileSystem(), kind, fail_at, kChunk);
      bool at_close = false;
      bool acknowledged = AppendThrough(f, &fs, reserve, &at_close);
      REQUIRE(acknowledged != (fs.fired() && !at_close));
      auto reader = IndexReader::Open(f.path);
      REQUIRE(reader.ok());
      uint32_t count = (*reader)->document_count();
      REQUIRE((count == 14 || count == 20));
      if (acknowledged) REQUIRE(count == 20);
      if (kind != FaultKind::kCrash && !acknowledged) {
        // The writer lived to clean up: the partial segment is gone.
        REQUIRE(count == 14);
        REQUIRE((*reader)->torn_tail_bytes() == 0);
      }
      RequireCommitted(f, count);
      // The next writer cuts any torn tail and appends.
      auto next = IndexWriter::Open(f.path);
      REQUIRE(next.ok());
      REQUIRE((*next)->Append(Slice(f.all, 20, 22), DuplicateIdPolicy::kSkip).ok());
      next->reset();
      auto after = IndexReader::Open(f.path);
      REQUIRE((*after)->document_count() == count + 2);
      REQUIRE((*after)->torn_tail_bytes() == 0);
      ++trials;
    }
  }
  REQUIRE(trials >= 100);
}

TEST_CASE("compaction killed at every step leaves the old file or the new one", "[fault]") {
  Fixture f;
  // Retire a document so compaction changes the content.
  {
    auto writer = IndexWriter::Open(f.path);
    SignedCorpus replace(f.settings.signature.perms);
    replace.Add("f3", f.all.facts(20), {}, f.all.shingles(20), f.all.signature(20));
    REQUIRE((*writer)->Append(replace, DuplicateIdPolicy::kReplace).ok());
    writer->reset();
    f.original = testing::ReadFile(f.path);
  }
  FaultFileSystem clean(DefaultFileSystem(), FaultKind::kCrash, -1, kChunk);
  f.Restore();
  REQUIRE(CompactIndex(f.path, {}, IndexWriteOptions{&clean}).ok());
  const std::string compacted = testing::ReadFile(f.path);
  const int64_t steps = clean.steps();
  int trials = 0;
  for (FaultKind kind : {FaultKind::kCrash, FaultKind::kDiskFull, FaultKind::kSyncFails}) {
    for (int64_t fail_at = 0; fail_at <= steps; ++fail_at) {
      CAPTURE(static_cast<int>(kind), fail_at);
      f.Restore();
      FaultFileSystem fs(DefaultFileSystem(), kind, fail_at, kChunk);
      bool acknowledged = CompactIndex(f.path, {}, IndexWriteOptions{&fs}).ok();
      std::string now = testing::ReadFile(f.path);
      if (acknowledged) {
        REQUIRE(now == compacted);
      } else {
        // Failed before the rename: old file; failed after it (directory
        // sync): the complete new one.
        REQUIRE((now == f.original || now == compacted));
      }
      auto audit = AuditIndex(f.path);
      REQUIRE(audit.ok());
      REQUIRE(audit->ok());
      auto reader = IndexReader::Open(f.path);
      REQUIRE((*reader)->live_count() == 14);
      REQUIRE((*reader)->FindLive("f3").has_value());
      ++trials;
    }
  }
  REQUIRE(trials >= 20);
}

TEST_CASE("a full disk during build leaves no index and no temporary file", "[fault]") {
  testing::TempDir dir;
  IndexSettings settings = testing::TestIndexSettings();
  SignedCorpus corpus = testing::SignTexts(testing::MakeTexts(12, 10, 60, "b"), settings.signature);
  for (int64_t fail_at = 0; fail_at < 6; ++fail_at) {
    FaultFileSystem fs(DefaultFileSystem(), FaultKind::kDiskFull, fail_at, kChunk);
    std::string path = dir.File("b.kin");
    absl::Status status = CreateIndex(path, settings, corpus, IndexWriteOptions{&fs});
    REQUIRE(absl::IsResourceExhausted(status));
    REQUIRE_FALSE(DefaultFileSystem()->Exists(path));
    REQUIRE(std::filesystem::is_empty(dir.path()));
  }
}

}  // namespace
}  // namespace kindred
