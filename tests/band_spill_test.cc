// Spilled band keys: the merge of sorted runs and resident entries gives
// every entry once, in (key, doc) order, as one in-memory sort does; scratch
// files that cannot be made are errors, not crashes; a full disk during a
// spill is reported as a full disk, through the FileSystem.
#include "core/band_spill.h"

#include <signal.h>
#include <sys/resource.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <catch2/catch.hpp>
#include <filesystem>
#include <thread>

#include "absl/strings/str_cat.h"
#include "kindred/banding.h"
#include "kindred/errors.h"
#include "kindred/file_io.h"
#include "kindred/sweep.h"
#include "testlib/fault_file_system.h"
#include "testlib/similar_sets.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

using testing::FaultFileSystem;
using testing::FaultKind;
using testing::SplitMix64;

// One run of `docs` documents from first_doc with key doc % 97 + 1 in every
// band.
absl::Status AddSimpleRun(BandSpill& spill, uint32_t first_doc, size_t docs) {
  std::vector<std::vector<uint64_t>> columns(spill.bands());
  std::vector<const uint64_t*> run;
  for (auto& column : columns) {
    for (size_t i = 0; i < docs; ++i) column.push_back((first_doc + i) % 97 + 1);
    run.push_back(column.data());
  }
  return spill.AddRun(first_doc, docs, run);
}

TEST_CASE("Merged runs give the entries of one sort of everything", "[band_spill]") {
  testing::TempDir dir;
  constexpr uint32_t kBands = 3;
  SplitMix64 random(11);
  // Keys from a small range, so buckets of many documents cross runs; some
  // documents have no key in a band.
  std::vector<std::vector<uint64_t>> keys(5000, std::vector<uint64_t>(kBands));
  for (auto& doc : keys) {
    for (uint64_t& key : doc) key = random.Between(0, 9) == 0 ? kNoBandKey : random.Between(1, 700);
  }
  auto spill = BandSpill::Create(DefaultFileSystem(), dir.path(), kBands);
  REQUIRE(spill.ok());
  // Runs of uneven sizes, then the rest stays resident.
  size_t begin = 0;
  for (size_t size : {1, 999, 1500, 37, 2000}) {
    // Band by band, as a corpus holds them.
    std::vector<std::vector<uint64_t>> columns(kBands);
    for (size_t doc = begin; doc < begin + size; ++doc) {
      for (uint32_t band = 0; band < kBands; ++band) columns[band].push_back(keys[doc][band]);
    }
    std::vector<const uint64_t*> run;
    for (const auto& column : columns) run.push_back(column.data());
    REQUIRE((*spill)->AddRun(static_cast<uint32_t>(begin), size, run).ok());
    begin += size;
  }
  REQUIRE((*spill)->runs() == 5);
  CHECK((*spill)->bytes_written() > 0);
  for (uint32_t band = 0; band < kBands; ++band) {
    std::vector<BucketEntry> all;
    EntryVector resident, scratch;
    HugePageVector<uint32_t> offsets;
    for (size_t doc = 0; doc < keys.size(); ++doc) {
      if (keys[doc][band] == kNoBandKey) continue;
      all.push_back({keys[doc][band], static_cast<uint32_t>(doc)});
      if (doc >= begin) resident.push_back(all.back());
    }
    std::sort(all.begin(), all.end());
    SortEntries(resident, scratch, offsets);
    BandMerger merger(**spill, band, resident);
    std::vector<BucketEntry> merged;
    BucketEntry entry;
    for (;;) {
      auto more = merger.Next(&entry);
      REQUIRE(more.ok());
      if (!*more) break;
      merged.push_back(entry);
    }
    REQUIRE(merged.size() == all.size());
    for (size_t i = 0; i < all.size(); ++i) {
      CHECK(merged[i].key == all[i].key);
      CHECK(merged[i].doc == all[i].doc);
    }
  }
}

TEST_CASE("The partitioned sort orders like std::sort, equal keys included", "[band_spill]") {
  SplitMix64 random(12);
  for (size_t n : {0, 5, 1023, 1024, 50000}) {
    EntryVector entries, scratch;
    HugePageVector<uint32_t> offsets;
    for (size_t i = 0; i < n; ++i) {
      // Half random hashes, half a few repeated keys.
      const uint64_t key = i % 2 ? random.Next() : random.Between(1, 5) << 60;
      entries.push_back({key, static_cast<uint32_t>(random.Between(0, 1000000))});
    }
    std::vector<BucketEntry> expected(entries.begin(), entries.end());
    std::sort(expected.begin(), expected.end());
    SortEntries(entries, scratch, offsets);
    REQUIRE(entries.size() == expected.size());
    for (size_t i = 0; i < n; ++i) {
      CHECK(entries[i].key == expected[i].key);
      CHECK(entries[i].doc == expected[i].doc);
    }
  }
}

TEST_CASE("A scratch directory that cannot take files is an error", "[band_spill]") {
  auto missing = BandSpill::Create(DefaultFileSystem(), "/nonexistent-kindred-dir", 4);
  REQUIRE(!missing.ok());
  CHECK(missing.status().code() == absl::StatusCode::kAborted);
  CHECK(KindOf(missing.status()) == ErrorKind::kWriteFailed);
  CHECK_THAT(std::string(missing.status().message()), Catch::Contains("/nonexistent-kindred-dir"));
}

TEST_CASE("A scratch file reads back its bytes from several threads at once", "[band_spill]") {
  testing::TempDir dir;
  auto file = DefaultFileSystem()->CreateScratch(dir.path());
  REQUIRE(file.ok());
  std::string expected;
  for (int piece = 0; piece < 3; ++piece) {
    std::string bytes(100000 + piece, '\0');
    for (size_t i = 0; i < bytes.size(); ++i) bytes[i] = static_cast<char>(i * 7 + piece);
    REQUIRE((*file)->Append(bytes).ok());
    expected += bytes;
  }
  CHECK((*file)->size() == expected.size());
  CHECK(testing::ListNames(dir.path()).empty());  // no name in its directory
  std::vector<int> mismatches(4, 0);
  std::vector<std::thread> readers;
  for (int t = 0; t < 4; ++t) {
    readers.emplace_back([&, t] {
      SplitMix64 random(40 + t);
      std::string out;
      for (int read = 0; read < 200; ++read) {
        const uint64_t offset = random.Between(0, expected.size() - 1);
        out.resize(random.Between(0, expected.size() - offset));
        if (!(*file)->ReadAt(offset, absl::MakeSpan(out)).ok() ||
            out != expected.substr(offset, out.size())) {
          ++mismatches[t];
        }
      }
    });
  }
  for (std::thread& reader : readers) reader.join();
  CHECK(mismatches == std::vector<int>(4, 0));
  std::string past(2, '\0');
  CHECK(absl::IsInternal((*file)->ReadAt(expected.size() - 1, absl::MakeSpan(past))));
}

TEST_CASE("A full disk during a spill is a full disk, and earlier runs stay", "[band_spill]") {
  testing::TempDir dir;
  // Steps: 0 creates the scratch file, 1..3 write the bands of the first
  // run, 4.. those of the second: its second band finds the disk full.
  FaultFileSystem fs(DefaultFileSystem(), FaultKind::kDiskFull, /*fail_at=*/5);
  auto spill = BandSpill::Create(&fs, dir.path(), 3);
  REQUIRE(spill.ok());
  REQUIRE(AddSimpleRun(**spill, 0, 500).ok());
  const absl::Status full = AddSimpleRun(**spill, 500, 500);
  REQUIRE(fs.fired());
  CHECK(KindOf(full) == ErrorKind::kDiskFull);
  CHECK_THAT(std::string(full.message()), Catch::Contains("scratch directory " + dir.path()));
  CHECK((*spill)->runs() == 1);
  // The first run reads back whole.
  BandMerger merger(**spill, 2, {});
  BucketEntry entry;
  std::vector<uint32_t> docs;
  for (;;) {
    auto more = merger.Next(&entry);
    REQUIRE(more.ok());
    if (!*more) break;
    CHECK(entry.key == entry.doc % 97 + 1);
    docs.push_back(entry.doc);
  }
  std::sort(docs.begin(), docs.end());
  REQUIRE(docs.size() == 500);
  CHECK(docs.back() == 499);
}

// A file size limit (RLIMIT_FSIZE, SIGXFSZ ignored) makes writes fail with
// EFBIG, as a full disk fails with ENOSPC. Run in a child process, which
// alone gets the limit. Its exit code: 0 DiskFull, 1 WriteFailed (what the
// spill used to report), 2 no error, 3 anything else.
int SpillUnderFileSizeLimit(const std::string& dir) {
  const pid_t child = fork();
  if (child == 0) {
    signal(SIGXFSZ, SIG_IGN);
    const struct rlimit limit = {4096, 4096};
    setrlimit(RLIMIT_FSIZE, &limit);
    auto spill = BandSpill::Create(DefaultFileSystem(), dir, 2);
    if (!spill.ok()) _exit(3);
    const absl::Status status = AddSimpleRun(**spill, 0, 2000);  // 24 KB a band
    int code = 3;
    if (status.ok()) code = 2;
    if (KindOf(status) == ErrorKind::kDiskFull) code = 0;
    if (KindOf(status) == ErrorKind::kWriteFailed) code = 1;
    _exit(code);
  }
  int wstatus = 0;
  if (child < 0 || waitpid(child, &wstatus, 0) != child || !WIFEXITED(wstatus)) return -1;
  return WEXITSTATUS(wstatus);
}

TEST_CASE("A real full disk during a spill is DiskFull, not a write failure", "[band_spill]") {
  testing::TempDir dir;
  CHECK(SpillUnderFileSizeLimit(dir.path()) == 0);
  CHECK(testing::ListNames(dir.path()).empty());
}

// Documents of random words, every third a copy of the one before.
std::string WordCorpus(int documents) {
  SplitMix64 random(5);
  std::string jsonl, text;
  for (int d = 0; d < documents; ++d) {
    if (d % 3 != 2) {
      text.clear();
      for (int w = 0; w < 40; ++w) absl::StrAppend(&text, "w", random.Between(0, 5000), " ");
    }
    absl::StrAppend(&jsonl, "{\"id\":\"d", d, "\",\"text\":\"", text, "\"}\n");
  }
  return jsonl;
}

absl::Status SweepThrough(FileSystem* fs, const std::string& path, const std::string& scratch,
                          int threads, SweepStats* stats) {
  SweepOptions options;
  options.sign.threads = threads;
  options.sign.batch_documents = 64;
  options.memory = 16 << 10;  // 8 KiB of band keys: a run every few batches
  options.scratch_dir = scratch;
  options.file_system = fs;
  auto reader = CorpusReader::Open({path}, InputOptions{});
  if (!reader.ok()) return reader.status();
  absl::StatusOr<SweepResult> result = RunSweep(**reader, options);
  if (result.ok()) *stats = result->stats;
  return result.status();
}

TEST_CASE("A sweep whose spill meets a full disk fails as a full disk", "[band_spill]") {
  testing::TempDir dir;
  const std::string corpus = WordCorpus(1500);
  const std::string path = dir.Write("corpus.jsonl", corpus);
  const std::string scratch = dir.File("scratch");
  std::filesystem::create_directory(scratch);
  for (int threads : {1, 2}) {
    // Without a fault, every spill goes through the file system.
    FaultFileSystem clean(DefaultFileSystem(), FaultKind::kDiskFull, -1);
    SweepStats stats;
    REQUIRE(SweepThrough(&clean, path, scratch, threads, &stats).ok());
    REQUIRE(stats.spill_runs >= 3);
    CHECK(clean.steps() > static_cast<int64_t>(stats.spill_runs));
    // The disk fills halfway through the spills.
    FaultFileSystem full(DefaultFileSystem(), FaultKind::kDiskFull, clean.steps() / 2);
    const absl::Status status = SweepThrough(&full, path, scratch, threads, &stats);
    REQUIRE(full.fired());
    CHECK(KindOf(status) == ErrorKind::kDiskFull);
    CHECK(status.code() == absl::StatusCode::kResourceExhausted);
    CHECK_THAT(std::string(status.message()), Catch::Contains("scratch directory " + scratch));
    CHECK(testing::ListNames(scratch).empty());
    CHECK(testing::ListNames(dir.path()) == std::vector<std::string>{"corpus.jsonl", "scratch"});
    CHECK(testing::ReadFile(path) == corpus);
  }
}

}  // namespace
}  // namespace kindred
