// Faults injected into reading inputs: an I/O error wherever an input is
// read (the first reading of files and trees, the second reading of a sweep
// at offsets and of crawl archives, the kept-corpus pass, the copies of
// --copy-kept, a labels file) fails with the input's kind (BadInput: exit 3)
// and a message naming the file, and leaves no output behind.
#include <algorithm>
#include <catch2/catch.hpp>
#include <filesystem>
#include <string>
#include <vector>

#include "absl/strings/str_cat.h"
#include "core/reload.h"
#include "kindred/corpus.h"
#include "kindred/errors.h"
#include "kindred/kept_writer.h"
#include "kindred/labels.h"
#include "kindred/sweep.h"
#include "testlib/fault_file_system.h"
#include "testlib/gzip.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

using testing::FaultFileSystem;
using testing::FaultKind;
using testing::TempDir;

constexpr char kEio[] = ": Input/output error";

// Forty JSON lines of about 100 bytes, every fourth one a copy of the one
// before (so that a sweep has candidates to read again).
std::string Lines() {
  std::string lines;
  for (int i = 0; i < 40; ++i) {
    const int text = i % 4 == 3 ? i - 1 : i;
    absl::StrAppend(&lines, "{\"id\":\"d", i, "\",\"text\":\"alpha beta gamma delta ", text,
                    " epsilon zeta eta theta iota kappa ", text * 7, "\"}\n");
  }
  return lines;
}

// Reads every document; returns the first error (OK at the end), and the
// count read before it in *documents.
absl::Status ReadAll(CorpusReader& reader, uint64_t* documents) {
  std::vector<Document> batch;
  for (;;) {
    absl::StatusOr<size_t> n = reader.ReadBatch(&batch, 8, 1 << 20);
    if (!n.ok()) {
      *documents = reader.documents_read();
      return n.status();
    }
    if (*n == 0) break;
  }
  *documents = reader.documents_read();
  return absl::OkStatus();
}

// A fault file system that injects no write faults.
struct Faults {
  FaultFileSystem fs{DefaultFileSystem(), FaultKind::kCrash, -1};
  InputOptions Options() {
    InputOptions options;
    options.file_system = &fs;
    return options;
  }
};

TEST_CASE("a read error in an input file fails the first reading, naming the file",
          "[input_fault]") {
  TempDir dir;
  const std::string plain = dir.Write("in.jsonl", Lines());
  const std::string packed = dir.Write("in.jsonl.gz", testing::GzipMember(Lines()));
  for (const std::string& path : {plain, packed}) {
    Faults faults;
    faults.fs.FailReadsOf(path, std::filesystem::file_size(path) / 2);
    auto reader = CorpusReader::Open({path}, faults.Options());
    REQUIRE(reader.ok());
    uint64_t documents = 0;
    const absl::Status status = ReadAll(**reader, &documents);
    CHECK(KindOf(status) == ErrorKind::kBadInput);
    CHECK(std::string(status.message()) == absl::StrCat(path, ": read failed", kEio));
    CHECK(documents < 40);
    CHECK(faults.fs.read_faults() >= 1);
  }
  SECTION("an input that cannot be opened fails Open") {
    Faults faults;
    faults.fs.FailOpensOf("in.jsonl");
    auto reader = CorpusReader::Open({plain}, faults.Options());
    CHECK(KindOf(reader.status()) == ErrorKind::kBadInput);
    CHECK(std::string(reader.status().message()) == absl::StrCat(plain, ": cannot open", kEio));
  }
}

TEST_CASE("a tree whose directory or file cannot be read fails, or skips the file",
          "[input_fault]") {
  TempDir dir;
  dir.Write("tree/a/x.txt", "one two three");
  dir.Write("tree/b/y.txt", "four five six");
  dir.Write("tree/c.txt", "seven eight");
  const std::string tree = dir.File("tree");
  SECTION("a directory that cannot be listed") {
    Faults faults;
    faults.fs.FailOpensOf("tree/b/");  // subdirectories are named with a "/"
    auto reader = CorpusReader::Open({tree}, faults.Options());
    REQUIRE(reader.ok());
    uint64_t documents = 0;
    const absl::Status status = ReadAll(**reader, &documents);
    CHECK(KindOf(status) == ErrorKind::kBadInput);
    CHECK(std::string(status.message()) == absl::StrCat(tree, "/b/: cannot read directory", kEio));
    CHECK(documents <= 1);  // at most a/x.txt, before b/
  }
  SECTION("a file that cannot be read: an error, or skipped and counted") {
    for (bool skip : {false, true}) {
      Faults faults;
      faults.fs.FailReadsOf("tree/b/y.txt", 0);
      InputOptions options = faults.Options();
      options.skip_unreadable = skip;
      auto reader = CorpusReader::Open({tree}, options);
      REQUIRE(reader.ok());
      uint64_t documents = 0;
      const absl::Status status = ReadAll(**reader, &documents);
      if (skip) {
        CHECK(status.ok());
        CHECK(documents == 2);
        CHECK((*reader)->skips().unreadable == 1);
      } else {
        CHECK(KindOf(status) == ErrorKind::kBadInput);
        CHECK(std::string(status.message()) == absl::StrCat(tree, "/b/y.txt: read failed", kEio));
      }
    }
  }
}

// Signs `path` into a lean corpus through `faults`, then reads every
// document again (the second reading of a sweep).
absl::Status SignAndReload(const std::string& path, Faults& faults, SignedCorpus* corpus) {
  SignatureSettings settings;
  auto reader = CorpusReader::Open({path}, faults.Options());
  if (!reader.ok()) return reader.status();
  SignStats stats;
  if (absl::Status s = SignCorpus(**reader, settings, SignOptions{}, corpus, &stats); !s.ok()) {
    return s;
  }
  std::vector<uint32_t> docs(corpus->size());
  for (uint32_t doc = 0; doc < docs.size(); ++doc) docs[doc] = doc;
  return ReloadShingles((*reader)->ResolvedInputs(), (*reader)->options(), settings, docs, 2,
                        corpus);
}

TEST_CASE("a read error on the second reading fails it, attaching nothing after it",
          "[input_fault]") {
  TempDir dir;
  SECTION("JSON lines read again at their offsets") {
    const std::string path = dir.Write("corpus.jsonl", Lines());
    Faults faults;
    faults.fs.FailReadsOf(path, 0, /*from_open=*/1);  // the first reading passes
    SignedCorpus corpus = SignedCorpus::Lean(SignatureSettings{}.perms, Banding{16, 8});
    const absl::Status status = SignAndReload(path, faults, &corpus);
    CHECK(KindOf(status) == ErrorKind::kBadInput);
    CHECK(std::string(status.message()) == absl::StrCat(path, ": cannot read", kEio));
    REQUIRE(corpus.size() == 40);
    CHECK(!corpus.has_shingles(0));
  }
  SECTION("records of a crawl archive read again") {
    std::string warc;
    for (int i = 0; i < 6; ++i) {
      const std::string block = absl::StrCat("page text number ", i / 2, " with a few words");
      absl::StrAppend(&warc, "WARC/1.1\r\nWARC-Type: resource\r\nWARC-Target-URI: http://a.test/",
                      i, "\r\nWARC-Record-ID: <urn:uuid:", i,
                      ">\r\nContent-Type: text/plain\r\nContent-Length: ", block.size(), "\r\n\r\n",
                      block, "\r\n\r\n");
    }
    const std::string path = dir.Write("crawl.warc", warc);
    Faults faults;
    faults.fs.FailReadsOf(path, 0, /*from_open=*/1);
    SignedCorpus corpus = SignedCorpus::Lean(SignatureSettings{}.perms, Banding{16, 8});
    const absl::Status status = SignAndReload(path, faults, &corpus);
    CHECK(KindOf(status) == ErrorKind::kBadInput);
    CHECK(std::string(status.message()) == absl::StrCat(path, ": read failed", kEio));
    REQUIRE(corpus.size() == 6);
    CHECK(!corpus.has_shingles(0));
  }
}

// The resolved inputs and document count of a clean first reading.
KeptRequest KeptRequestFor(const std::vector<std::string>& inputs, Faults& faults) {
  auto reader = CorpusReader::Open(inputs, InputOptions{});
  REQUIRE(reader.ok());
  uint64_t documents = 0;
  REQUIRE(ReadAll(**reader, &documents).ok());
  KeptRequest request;
  request.inputs = (*reader)->ResolvedInputs();
  request.options = faults.Options();
  request.keep = [](uint64_t ordinal) { return ordinal % 2 == 0; };
  request.expected_documents = documents;
  request.file_system = &faults.fs;
  return request;
}

TEST_CASE("a read error while the kept corpus is written leaves no output", "[input_fault]") {
  TempDir dir;
  SECTION("kept JSON lines") {
    const std::string path = dir.Write("in.jsonl", Lines());
    Faults faults;
    faults.fs.FailReadsOf(path, 2000);
    KeptRequest request = KeptRequestFor({path}, faults);
    request.output.lines_path = dir.File("kept.jsonl");
    const absl::StatusOr<KeptCounts> written = WriteKept(request);
    CHECK(KindOf(written.status()) == ErrorKind::kBadInput);
    CHECK(std::string(written.status().message()) == absl::StrCat(path, ": read failed", kEio));
    CHECK(testing::ListNames(dir.path()) == std::vector<std::string>{"in.jsonl"});
  }
  SECTION("copies of kept text files") {
    dir.Write("in/tree/a.txt", "one two three");
    dir.Write("in/tree/b.txt", "four five six");
    dir.Write("in/tree/sub/c.txt", "seven eight");
    Faults faults;
    faults.fs.FailReadsOf("tree/sub/c.txt", 0);
    KeptRequest request = KeptRequestFor({dir.File("in/tree")}, faults);
    request.output.copy_dir = dir.File("out/copies");
    const absl::StatusOr<KeptCounts> written = WriteKept(request);
    CHECK(KindOf(written.status()) == ErrorKind::kBadInput);
    CHECK(std::string(written.status().message()) ==
          absl::StrCat(dir.File("in/tree/sub/c.txt"), ": read failed", kEio));
    CHECK(testing::ListNames(dir.File("out")).empty());  // the copies' temporary tree is gone
  }
}

TEST_CASE("a labels file that cannot be read is an input error", "[input_fault]") {
  TempDir dir;
  const std::string path = dir.Write("labels.tsv", "a\tb\tduplicate\nc\td\tno\n");
  Faults faults;
  REQUIRE(ReadLabels(path, &faults.fs).ok());
  faults.fs.FailReadsOf("labels.tsv", 10);
  auto unreadable = ReadLabels(path, &faults.fs);
  CHECK(KindOf(unreadable.status()) == ErrorKind::kBadInput);
  CHECK(std::string(unreadable.status().message()) == path + ": read error");
  faults.fs.FailOpensOf("labels.tsv");
  auto unopened = ReadLabels(path, &faults.fs);
  CHECK(absl::IsNotFound(unopened.status()));
  CHECK(std::string(unopened.status().message()) == path + ": cannot open the labels file");
}

}  // namespace
}  // namespace kindred
