// Faults injected into output writing (the kept corpus file, a record file
// written whole): at every step of the write, a full disk, a failed sync or
// a crash leaves the output as it was (or absent) and reports the fault with
// its kind; a clean run writes it whole.
#include <algorithm>
#include <catch2/catch.hpp>
#include <filesystem>
#include <string>
#include <vector>

#include "io/atomic_file.h"
#include "io/output_file.h"
#include "kindred/corpus.h"
#include "kindred/errors.h"
#include "kindred/kept_writer.h"
#include "testlib/fault_file_system.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

using testing::FaultFileSystem;
using testing::FaultKind;
using testing::ReadFile;
using testing::TempDir;

// Ten JSON Lines documents, every other one kept.
struct KeptFixture {
  TempDir dir;
  std::string input;
  std::string lines;
  std::vector<ResolvedInput> inputs;
  uint64_t documents = 0;

  KeptFixture() {
    for (int i = 0; i < 10; ++i) {
      const std::string line = "{\"id\":\"d" + std::to_string(i) + "\",\"text\":\"words " +
                               std::string(200, static_cast<char>('a' + i)) + "\"}\n";
      input += line;
      if (i % 2 == 0) lines += line;
    }
    dir.Write("in.jsonl", input);
    auto reader = CorpusReader::Open({dir.File("in.jsonl")}, InputOptions{});
    REQUIRE(reader.ok());
    std::vector<Document> batch;
    while ((*reader)->ReadBatch(&batch, 100, 1 << 20).value() > 0) {
    }
    inputs = (*reader)->ResolvedInputs();
    documents = (*reader)->documents_read();
  }

  absl::StatusOr<KeptCounts> Write(const std::string& out, FileSystem* fs) const {
    KeptRequest request;
    request.inputs = inputs;
    request.keep = [](uint64_t ordinal) { return ordinal % 2 == 0; };
    request.expected_documents = documents;
    request.output.lines_path = out;
    request.file_system = fs;
    return WriteKept(request);
  }
};

TEST_CASE("a fault at any step of writing the kept file loses nothing", "[output_fault]") {
  for (const std::string name : {"kept.jsonl", "kept.jsonl.gz"}) {
    KeptFixture f;
    const std::string out = f.dir.File(name);
    FaultFileSystem counter(DefaultFileSystem(), FaultKind::kDiskFull, -1, /*chunk_bytes=*/256);
    REQUIRE(f.Write(out, &counter).ok());
    const std::string written = ReadFile(out);
    if (name == "kept.jsonl") CHECK(written == f.lines);
    const int64_t steps = counter.steps();
    REQUIRE(steps >= 4);  // create, appends, sync, rename, directory sync
    const std::string old_contents = "an earlier file at the output's name\n";
    for (FaultKind kind : {FaultKind::kDiskFull, FaultKind::kSyncFails, FaultKind::kCrash}) {
      int fired = 0;
      for (int64_t step = 0; step < steps; ++step) {
        // A crash leaves its temporary file (as a killed process would);
        // a later process has another id, so it is not in the way.
        for (const std::string& left : testing::ListNames(f.dir.path())) {
          if (left != "in.jsonl") std::filesystem::remove(f.dir.File(left));
        }
        f.dir.Write(name, old_contents);
        FaultFileSystem faulty(DefaultFileSystem(), kind, step, 256);
        auto result = f.Write(out, &faulty);
        INFO(name << ", fault kind " << static_cast<int>(kind) << " at step " << step);
        if (!faulty.fired()) {
          INFO(result.status().message());
          REQUIRE(result.ok());
          continue;
        }
        ++fired;
        REQUIRE_FALSE(result.ok());  // a fired fault is always reported
        const std::string now = ReadFile(out);
        // Either untouched, or (a fault after the rename: the directory sync)
        // the whole new file; never a part of it.
        CHECK((now == old_contents || now == written));
        if (kind == FaultKind::kDiskFull) {
          CHECK(KindOf(result.status()) == ErrorKind::kDiskFull);
          CHECK(result.status().message().find("No space left on device") != std::string::npos);
        } else {
          CHECK(KindOf(result.status()) == ErrorKind::kWriteFailed);
        }
        // A crash stops every later call, so its temporary file may stay;
        // otherwise nothing but the input and the output remains.
        if (kind != FaultKind::kCrash) {
          CHECK(testing::ListNames(f.dir.path()) == std::vector<std::string>{"in.jsonl", name});
        }
      }
      // Every step is a crash point; a full disk or failed sync set on an
      // earlier step falls on the next append or sync.
      CHECK(fired > 0);
      if (kind == FaultKind::kCrash) CHECK(fired == steps);
    }
  }
}

TEST_CASE("a full disk while a record file is written keeps the old file", "[output_fault]") {
  TempDir dir;
  const std::string path = dir.Write("pairs.jsonl", "{\"a\":\"old\"}\n");
  const std::string pairs(100000, 'p');
  FaultFileSystem counter(DefaultFileSystem(), FaultKind::kDiskFull, -1, 4096);
  REQUIRE(io::WriteFileAtomically(path, pairs, &counter).ok());
  REQUIRE(ReadFile(path) == pairs);
  const int64_t steps = counter.steps();
  int fired = 0;
  for (int64_t step = 0; step < steps; ++step) {
    dir.Write("pairs.jsonl", "{\"a\":\"old\"}\n");
    FaultFileSystem faulty(DefaultFileSystem(), FaultKind::kDiskFull, step, 4096);
    const absl::Status status = io::WriteFileAtomically(path, pairs, &faulty);
    if (!faulty.fired()) continue;
    ++fired;
    INFO("disk full at step " << step);
    CHECK(KindOf(status) == ErrorKind::kDiskFull);
    CHECK(ReadFile(path) == "{\"a\":\"old\"}\n");
    CHECK(testing::ListNames(dir.path()) == std::vector<std::string>{"pairs.jsonl"});
  }
  // 25 appends of 4096 bytes or less; a full disk set on the creation step
  // falls on the first append.
  CHECK(fired == 26);
  // A new file that cannot be written is not created at all.
  FaultFileSystem full(DefaultFileSystem(), FaultKind::kDiskFull, 1, 4096);
  const std::string fresh = dir.File("groups.jsonl");
  CHECK(KindOf(io::WriteFileAtomically(fresh, pairs, &full)) == ErrorKind::kDiskFull);
  CHECK(!std::filesystem::exists(fresh));
}

// A file synced apart before its commit (the record files are written and
// synced on several threads, then committed in order): a fault at any step
// still leaves the old file or, past the rename, the whole new one; never a
// part, and no temporary file unless the process crashed.
TEST_CASE("a fault in a sync done before the commit keeps the old file", "[output_fault]") {
  TempDir dir;
  const std::string old_contents = "{\"group\":0}\n";
  const std::string path = dir.Write("groups.jsonl", old_contents);
  const std::string groups(20000, 'g');
  const auto write = [&](FileSystem* fs) {
    auto file = io::AtomicFile::Create(path, fs);
    if (!file.ok()) return file.status();
    absl::Status status = (*file)->Append(groups);
    if (status.ok()) status = (*file)->Sync();
    if (status.ok()) status = (*file)->Commit();
    return status;
  };
  FaultFileSystem counter(DefaultFileSystem(), FaultKind::kSyncFails, -1, 4096);
  REQUIRE(write(&counter).ok());
  REQUIRE(ReadFile(path) == groups);
  for (FaultKind kind : {FaultKind::kSyncFails, FaultKind::kCrash}) {
    int fired = 0;
    for (int64_t step = 0; step < counter.steps(); ++step) {
      for (const std::string& left : testing::ListNames(dir.path())) std::filesystem::remove(dir.File(left));
      dir.Write("groups.jsonl", old_contents);
      FaultFileSystem faulty(DefaultFileSystem(), kind, step, 4096);
      const absl::Status status = write(&faulty);
      if (!faulty.fired()) continue;
      ++fired;
      INFO("fault kind " << static_cast<int>(kind) << " at step " << step);
      CHECK(KindOf(status) == ErrorKind::kWriteFailed);
      const std::string now = ReadFile(path);
      CHECK((now == old_contents || now == groups));
      if (kind != FaultKind::kCrash) {
        CHECK(testing::ListNames(dir.path()) == std::vector<std::string>{"groups.jsonl"});
      }
    }
    CHECK(fired > 0);
    if (kind == FaultKind::kCrash) CHECK(fired == counter.steps());
  }
}

}  // namespace
}  // namespace kindred
