// Tests of streamed compaction: the band-key sort under a memory budget
// gives the order of one in-memory sort (and reports a full disk under its
// runs as one), and compaction with a budget writes the same bytes as
// without.
#include <algorithm>
#include <catch2/catch.hpp>
#include <random>
#include <vector>

#include "index/key_sorter.h"
#include "kindred/errors.h"
#include "kindred/file_io.h"
#include "kindred/index.h"
#include "kindred/index_writer.h"
#include "testlib/fault_file_system.h"
#include "testlib/index_fixture.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

using testing::MakeTexts;
using testing::SignTexts;
using testing::Slice;
using testing::TempDir;

std::vector<BucketEntry> Sorted(const index::KeySorter& sorter) {
  std::vector<BucketEntry> out;
  REQUIRE(sorter.ForEach([&](const BucketEntry& e) { out.push_back(e); }).ok());
  return out;
}

TEST_CASE("the key sort under a budget merges runs into the order of one sort", "[compact]") {
  TempDir dir;
  std::mt19937_64 random(7);
  std::vector<BucketEntry> entries;
  for (uint32_t doc = 0; doc < 5000; ++doc) {
    // Few distinct keys: many ties, broken by document.
    for (int band = 0; band < 3; ++band) entries.push_back({random() % 700 + 1, doc});
  }
  index::KeySorter bounded(64 * 1000, dir.path(), DefaultFileSystem());  // runs of 1000 entries
  index::KeySorter whole(0, dir.path(), DefaultFileSystem());
  for (const BucketEntry& e : entries) {
    REQUIRE(bounded.Add(e.key, e.doc).ok());
    REQUIRE(whole.Add(e.key, e.doc).ok());
  }
  REQUIRE(bounded.Finish().ok());
  REQUIRE(whole.Finish().ok());
  REQUIRE(bounded.runs() == 15);
  REQUIRE(whole.runs() == 0);
  std::vector<BucketEntry> expected = entries;
  std::sort(expected.begin(), expected.end());
  const auto same = [](const BucketEntry& a, const BucketEntry& b) {
    return a.key == b.key && a.doc == b.doc;
  };
  const std::vector<BucketEntry> merged = Sorted(bounded);
  REQUIRE(std::equal(merged.begin(), merged.end(), expected.begin(), expected.end(), same));
  const std::vector<BucketEntry> again = Sorted(bounded);  // a second pass reads the same
  REQUIRE(std::equal(again.begin(), again.end(), expected.begin(), expected.end(), same));
  const std::vector<BucketEntry> in_memory = Sorted(whole);
  REQUIRE(std::equal(in_memory.begin(), in_memory.end(), expected.begin(), expected.end(), same));
}

TEST_CASE("a scratch directory that cannot be written is an Aborted error", "[compact]") {
  index::KeySorter sorter(64 * 10, "/nonexistent-kindred-dir", DefaultFileSystem());
  absl::Status status;
  for (uint32_t doc = 0; doc < 20 && status.ok(); ++doc) status = sorter.Add(doc + 1, doc);
  REQUIRE(absl::IsAborted(status));
  REQUIRE(KindOf(status) == ErrorKind::kWriteFailed);
  REQUIRE(status.message().find("/nonexistent-kindred-dir") != std::string::npos);
}

TEST_CASE("a full disk under the sorter's runs is a DiskFull error", "[compact]") {
  TempDir dir;
  // Step 0 creates the scratch file, 1 writes the first run, 2 the second.
  testing::FaultFileSystem fs(DefaultFileSystem(), testing::FaultKind::kDiskFull, 2);
  index::KeySorter sorter(64 * 10, dir.path(), &fs);  // runs of 10 entries
  absl::Status status;
  uint32_t doc = 0;
  for (; doc < 100 && status.ok(); ++doc) status = sorter.Add(doc + 1, doc);
  REQUIRE(fs.fired());
  CHECK(doc == 20);
  CHECK(KindOf(status) == ErrorKind::kDiskFull);
  CHECK(status.message().find("scratch directory " + dir.path()) != std::string::npos);
}

TEST_CASE("compaction under a memory budget writes the same bytes", "[compact]") {
  TempDir dir;
  // 4 MB (the least budget compact uses) holds 65,536 entries a run: more
  // band keys than that (2200 documents x 32 bands) make compaction spill.
  IndexSettings settings = testing::TestIndexSettings(32, 32, 1);
  SignedCorpus all = SignTexts(MakeTexts(8, 2200, 40, "m"), settings.signature);
  const std::string a = dir.File("a.kin"), b = dir.File("b.kin"), one = dir.File("one.kin");
  REQUIRE(CreateIndex(one, settings, all).ok());
  for (const std::string& path : {a, b}) {
    REQUIRE(CreateIndex(path, settings, Slice(all, 0, 1000)).ok());
    auto writer = IndexWriter::Open(path);
    REQUIRE((*writer)->Append(Slice(all, 1000, 2200), DuplicateIdPolicy::kError).ok());
  }
  auto plain = CompactIndex(a);
  REQUIRE(plain.ok());
  REQUIRE(plain->scratch_runs == 0);
  CompactOptions bounded;
  bounded.memory = 1;  // raised to the least budget
  bounded.scratch_dir = dir.path();
  auto spilled = CompactIndex(b, bounded);
  REQUIRE(spilled.ok());
  REQUIRE(spilled->scratch_runs == 2);
  REQUIRE(testing::ReadFile(a) == testing::ReadFile(b));
  REQUIRE(testing::ReadFile(a) == testing::ReadFile(one));
}

TEST_CASE("compaction gives an index made for containment its containment keys", "[compact]") {
  TempDir dir;
  // A version-2 file whose default measure is containment (as programs
  // before version 3 wrote one): no containment keys.
  IndexSettings settings = testing::TestIndexSettings();
  settings.measure = Measure::kContainment;
  settings.threshold = 0.7;
  SignedCorpus all = SignTexts(MakeTexts(9, 60, 40, "u"), settings.signature);
  const std::string path = dir.File("old.kin");
  REQUIRE(CreateIndex(path, settings, all).ok());
  REQUIRE(IndexReader::Open(path).value()->format_version() == 2);
  REQUIRE(CompactIndex(path).ok());
  auto reader = IndexReader::Open(path);
  REQUIRE(reader.ok());
  REQUIRE((*reader)->format_version() == 3);
  REQUIRE((*reader)->settings().containment == ContainmentKeysFor(0.7, kDefaultMinContainedSize));
  auto audit = AuditIndex(path);
  REQUIRE(audit.ok());
  REQUIRE(audit->ok());
  // The same bytes as a file made with the keys from the start.
  settings.containment = ContainmentKeysFor(0.7, kDefaultMinContainedSize);
  const std::string fresh = dir.File("fresh.kin");
  REQUIRE(CreateIndex(fresh, settings, all).ok());
  REQUIRE(testing::ReadFile(path) == testing::ReadFile(fresh));
}

}  // namespace
}  // namespace kindred
