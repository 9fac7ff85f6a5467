// Tests of WriteKept: a second pass over real inputs in a temporary directory.
#include "kindred/kept_writer.h"

#include <fcntl.h>
#include <stdlib.h>
#include <unistd.h>
#include <zlib.h>
#include <zstd.h>

#include <catch2/catch.hpp>
#include <filesystem>
#include <fstream>
#include <set>
#include <string>
#include <vector>

#include "io/output_file.h"
#include "io/output_guard.h"

#include "kindred/errors.h"
#include "testlib/gzip.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

namespace fs = std::filesystem;

using testing::TempDir;

void WriteFile(const std::string& path, const std::string& bytes) {
  fs::create_directories(fs::path(path).parent_path());
  std::ofstream out(path, std::ios::binary);
  out << bytes;
}

std::string ReadFile(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  REQUIRE(in.good());
  return std::string(std::istreambuf_iterator<char>(in), {});
}

// Inflates one gzip member with zlib (windowBits 15 + 16: gzip only) and
// requires it to end exactly at the end of the data.
std::string Gunzip(const std::string& data) {
  z_stream z{};
  REQUIRE(inflateInit2(&z, 15 + 16) == Z_OK);
  z.next_in = reinterpret_cast<Bytef*>(const_cast<char*>(data.data()));
  z.avail_in = static_cast<uInt>(data.size());
  std::string out;
  int result = Z_OK;
  char buffer[4096];
  while (result == Z_OK) {
    z.next_out = reinterpret_cast<Bytef*>(buffer);
    z.avail_out = sizeof(buffer);
    result = inflate(&z, Z_NO_FLUSH);
    out.append(buffer, sizeof(buffer) - z.avail_out);
  }
  CHECK(result == Z_STREAM_END);
  CHECK(z.avail_in == 0);
  inflateEnd(&z);
  return out;
}

// Decompresses zstd frames with libzstd's streaming decoder.
std::string Unzstd(const std::string& data) {
  ZSTD_DStream* stream = ZSTD_createDStream();
  ZSTD_inBuffer in = {data.data(), data.size(), 0};
  std::string out;
  char buffer[4096];
  size_t result = 1;
  while (in.pos < in.size || result != 0) {
    ZSTD_outBuffer chunk = {buffer, sizeof(buffer), 0};
    result = ZSTD_decompressStream(stream, &chunk, &in);
    REQUIRE_FALSE(ZSTD_isError(result));
    out.append(buffer, chunk.pos);
    if (chunk.pos == 0 && in.pos == in.size) break;
  }
  CHECK(result == 0);
  ZSTD_freeDStream(stream);
  return out;
}

// Reads `inputs` once, then writes the documents whose id is in `keep_ids`.
absl::StatusOr<KeptCounts> ReadThenWrite(const std::vector<std::string>& inputs,
                                         const std::set<std::string>& keep_ids,
                                         const KeptOutput& output, InputOptions options = {}) {
  auto reader = CorpusReader::Open(inputs, options);
  REQUIRE(reader.ok());
  std::set<uint64_t> keep_ordinals;
  std::vector<Document> batch;
  while ((*reader)->ReadBatch(&batch, 3, 1 << 20).value() > 0) {
    for (const Document& doc : batch) {
      if (keep_ids.count(doc.id)) keep_ordinals.insert(doc.ordinal);
    }
  }
  KeptRequest request;
  request.inputs = (*reader)->ResolvedInputs();
  request.options = options;
  request.keep = [&](uint64_t ordinal) { return keep_ordinals.count(ordinal) > 0; };
  request.expected_documents = (*reader)->documents_read();
  request.output = output;
  return WriteKept(request);
}

const std::vector<std::string> kLines = {
    "{\"id\": \"a\", \"text\": \"first\"}\r\n",
    "\n",
    "{\"text\": \"caf\\u00e9 \\\"quoted\\\"\",   \"id\": \"b\"}\n",
    "  \t\n",
    "{\"id\": \"c\", \"text\": \"third\", \"other\": [1, 2]}\n",
    "{\"id\": \"d\", \"text\": \"last, no newline\"}",
};

std::string Join(const std::vector<std::string>& parts) {
  std::string all;
  for (const std::string& part : parts) all += part;
  return all;
}

TEST_CASE("kept JSON lines are copied verbatim, plain or compressed") {
  TempDir dir;
  WriteFile(dir.File("in/c.jsonl.gz"), testing::GzipMember(Join(kLines)));
  const std::string expected = kLines[0] + kLines[2] + kLines[5] + "\n";
  const std::vector<std::string> inputs = {dir.File("in/c.jsonl.gz")};
  const std::set<std::string> keep = {"a", "b", "d"};
  for (const char* name : {"out.jsonl", "out.jsonl.gz", "out.jsonl.zst"}) {
    INFO(name);
    KeptOutput output;
    output.lines_path = dir.File(std::string("deep/er/") + name);
    auto counts = ReadThenWrite(inputs, keep, output);
    REQUIRE(counts.ok());
    CHECK(counts->documents == 4);
    CHECK(counts->kept == 3);
    std::string written = ReadFile(output.lines_path);
    if (fs::path(name).extension() == ".gz") written = Gunzip(written);
    if (fs::path(name).extension() == ".zst") written = Unzstd(written);
    CHECK(written == expected);
  }
  // No temporary files are left beside the outputs.
  CHECK(std::distance(fs::directory_iterator(dir.File("deep/er")), fs::directory_iterator()) == 3);
}

TEST_CASE("kept text documents are copied into a tree or listed") {
  TempDir dir;
  WriteFile(dir.File("in/a/x.txt"), "ex");
  WriteFile(dir.File("in/a/y.txt"), std::string("why\0", 4));
  WriteFile(dir.File("in/a-b.txt"), "dropped");
  WriteFile(dir.File("in/b/c/z.gz"), testing::GzipMember("zed"));
  WriteFile(dir.File("single.md"), "one");
  const std::vector<std::string> inputs = {dir.File("in"), dir.File("single.md")};
  const std::set<std::string> keep = {"a/x.txt", "a/y.txt", "b/c/z.gz", dir.File("single.md")};
  InputOptions raw;
  raw.include_binary = true;  // y.txt holds a NUL byte: binary, read on request

  KeptOutput copy;
  copy.copy_dir = dir.File("out/copy");
  auto counts = ReadThenWrite(inputs, keep, copy, raw);
  REQUIRE(counts.ok());
  CHECK(counts->documents == 5);
  CHECK(counts->kept == 4);
  CHECK(ReadFile(dir.File("out/copy/a/x.txt")) == "ex");
  CHECK(ReadFile(dir.File("out/copy/a/y.txt")) == std::string("why\0", 4));
  CHECK(ReadFile(dir.File("out/copy/b/c/z.gz")) == testing::GzipMember("zed"));  // the original bytes
  CHECK(ReadFile(dir.File("out/copy/single.md")) == "one");
  CHECK_FALSE(fs::exists(dir.File("out/copy/a-b.txt")));
  CHECK(std::distance(fs::directory_iterator(dir.File("out")), fs::directory_iterator()) == 1);

  KeptOutput list;
  list.path_list = dir.File("kept.txt");
  REQUIRE(ReadThenWrite(inputs, keep, list, raw).ok());
  CHECK(ReadFile(dir.File("kept.txt")) == dir.File("in/a/x.txt") + "\n" + dir.File("in/a/y.txt") +
                                              "\n" + dir.File("in/b/c/z.gz") + "\n" +
                                              dir.File("single.md") + "\n");
}

TEST_CASE("an existing empty copy directory is filled; a non-empty one is refused") {
  TempDir dir;
  WriteFile(dir.File("in/x"), "x");
  fs::create_directories(dir.File("empty"));
  KeptOutput output;
  output.copy_dir = dir.File("empty");
  REQUIRE(ReadThenWrite({dir.File("in")}, {"x"}, output).ok());
  CHECK(ReadFile(dir.File("empty/x")) == "x");
  auto again = ReadThenWrite({dir.File("in")}, {"x"}, output);
  CHECK(again.status().code() == absl::StatusCode::kInvalidArgument);
  CHECK(again.status().message() ==
        dir.File("empty") + ": the copy directory exists and is not empty");
}

TEST_CASE("outputs that would touch the inputs are refused, and nothing is written") {
  TempDir dir;
  WriteFile(dir.File("in.jsonl"), Join(kLines));
  WriteFile(dir.File("tree/t.txt"), "t");
  fs::create_symlink(dir.File("in.jsonl"), dir.File("alias.jsonl"));
  struct Case {
    std::vector<std::string> inputs;
    KeptOutput output;
    std::string message;
  };
  const std::vector<Case> cases = {
      {{dir.File("in.jsonl")},
       {dir.File("in.jsonl"), "", ""},
       dir.File("in.jsonl") + ": is an input; inputs are never overwritten"},
      {{dir.File("in.jsonl")},
       {dir.File("alias.jsonl"), "", ""},
       dir.File("alias.jsonl") + ": is an input; inputs are never overwritten"},
      {{dir.File("in.jsonl")},
       {dir.File("tree/../in.jsonl"), "", ""},
       dir.File("tree/../in.jsonl") + ": is an input; inputs are never overwritten"},
      {{dir.File("tree"), dir.File("in.jsonl")},
       {dir.File("tree/sub/out.jsonl"), dir.File("c"), ""},
       dir.File("tree/sub/out.jsonl") + ": lies inside the input directory " + dir.File("tree")},
      {{dir.File("tree")},
       {"", dir.File("tree/copy"), ""},
       dir.File("tree/copy") + ": the copy directory overlaps the input " + dir.File("tree")},
      {{dir.File("tree")},
       {"", dir.path(), ""},
       dir.path() + ": the copy directory overlaps the input " + dir.File("tree")},
      {{dir.File("tree")}, {"", "", dir.File("tree")}, dir.File("tree") + ": is a directory"},
      {{dir.File("in.jsonl")},
       {"", dir.File("c"), ""},
       "an input is JSON Lines, but no output file for its kept lines was given"},
      {{dir.File("tree")},
       {dir.File("o.jsonl"), "", ""},
       "an input holds text documents: give either a copy directory or a path list for them"},
      {{dir.File("tree")},
       {"", dir.File("c"), dir.File("l")},
       "an input holds text documents: give either a copy directory or a path list for them"},
      {{dir.File("tree"), dir.File("in.jsonl")},
       {dir.File("c/o.jsonl"), dir.File("c"), ""},
       dir.File("c/o.jsonl") + ": lies inside the copy directory"},
      {{dir.File("tree"), dir.File("in.jsonl")},
       {dir.File("same"), "", dir.File("same")},
       "the kept lines and the path list name the same file"},
      {{dir.File("in.jsonl")},
       {dir.File("missing/../o.jsonl"), "", ""},
       dir.File("missing/../o.jsonl") + ": \"..\" after a directory that does not exist"},
  };
  const std::string before = ReadFile(dir.File("in.jsonl"));
  for (const Case& c : cases) {
    INFO(c.message);
    auto result = ReadThenWrite(c.inputs, {"a", "t.txt"}, c.output);
    REQUIRE_FALSE(result.ok());
    CHECK(result.status().code() == absl::StatusCode::kInvalidArgument);
    CHECK(result.status().message() == c.message);
  }
  CHECK(ReadFile(dir.File("in.jsonl")) == before);
  std::set<std::string> names;
  for (const auto& entry : fs::directory_iterator(dir.path()))
    names.insert(entry.path().filename());
  CHECK(names == std::set<std::string>{"in.jsonl", "tree", "alias.jsonl"});
  CHECK(std::distance(fs::directory_iterator(dir.File("tree")), fs::directory_iterator()) == 1);
}

TEST_CASE("relative paths that leave the output directory are refused") {
  // The copy tree checks every relative path, whatever produced it.
  for (const char* bad :
       {"", "/etc/passwd", "../x", "a/../../x", "a/./b", "a//b", "a/", ".", ".."}) {
    INFO(bad);
    CHECK(io::CheckRelativePath(bad).code() == absl::StatusCode::kInvalidArgument);
  }
  for (const char* good : {"a", "a/b/c.txt", "..a", "a..", ".hidden/x"}) {
    INFO(good);
    CHECK(io::CheckRelativePath(good).ok());
  }
  TempDir dir;
  WriteFile(dir.File("src"), "s");
  auto tree = io::CopyTree::Create(dir.File("out"));
  REQUIRE(tree.ok());
  CHECK((*tree)->Add("../escaped", dir.File("src")).code() == absl::StatusCode::kInvalidArgument);
  REQUIRE((*tree)->Add("ok/file", dir.File("src")).ok());
  CHECK((*tree)->Add("ok/file", dir.File("src")).code() == absl::StatusCode::kInvalidArgument);
  tree->reset();  // not committed: everything is removed
  CHECK_FALSE(fs::exists(dir.File("escaped")));
  CHECK(std::distance(fs::directory_iterator(dir.path()), fs::directory_iterator()) == 1);
}

TEST_CASE("inputs that changed since they were read: nothing is written") {
  TempDir dir;
  WriteFile(dir.File("in.jsonl"), Join(kLines));
  auto reader = CorpusReader::Open({dir.File("in.jsonl")}, {});
  REQUIRE(reader.ok());
  std::vector<Document> batch;
  while ((*reader)->ReadBatch(&batch, 100, 1 << 20).value() > 0) {
  }
  WriteFile(dir.File("in.jsonl"), Join(kLines) + "\n{\"id\": \"e\", \"text\": \"new\"}\n");
  KeptRequest request;
  request.inputs = (*reader)->ResolvedInputs();
  request.keep = [](uint64_t) { return true; };
  request.expected_documents = (*reader)->documents_read();
  request.output.lines_path = dir.File("out.jsonl");
  auto result = WriteKept(request);
  CHECK(KindOf(result.status()) == ErrorKind::kInputChanged);
  CHECK(result.status().message() ==
        "the inputs changed since they were read: 5 documents now, 4 before; nothing written");
  CHECK(std::distance(fs::directory_iterator(dir.path()), fs::directory_iterator()) == 1);
}

// Runs `body` with standard input read from `path`.
template <typename Body>
void WithStdin(const std::string& path, Body body) {
  int saved = dup(STDIN_FILENO);
  int fd = open(path.c_str(), O_RDONLY);
  REQUIRE(fd >= 0);
  dup2(fd, STDIN_FILENO);
  close(fd);
  body();
  dup2(saved, STDIN_FILENO);
  close(saved);
}

TEST_CASE("standard input is written again from its copy") {
  TempDir dir;
  WriteFile(dir.File("stdin.zst"), testing::GzipMember(Join(kLines)));
  WithStdin(dir.File("stdin.zst"), [&] {
    InputOptions options;
    options.stdin_copy_path = dir.File("spool");
    KeptOutput output;
    output.lines_path = dir.File("out.jsonl");
    auto counts = ReadThenWrite({"-"}, {"c"}, output, options);
    REQUIRE(counts.ok());
    CHECK(ReadFile(dir.File("out.jsonl")) == kLines[4]);
  });
  WriteFile(dir.File("stdin.txt"), "plain text");
  WithStdin(dir.File("stdin.txt"), [&] {
    InputOptions options;
    options.stdin_copy_path = dir.File("spool2");  // the copy is always created new
    KeptOutput output;
    output.copy_dir = dir.File("copies");
    REQUIRE(ReadThenWrite({"-"}, {"-"}, output, options).ok());
    CHECK(ReadFile(dir.File("copies/stdin.txt")) == "plain text");
  });
  WithStdin(dir.File("stdin.txt"), [&] {
    KeptOutput output;
    output.copy_dir = dir.File("copies2");
    auto result = ReadThenWrite({"-"}, {"-"}, output);
    CHECK(result.status().code() == absl::StatusCode::kFailedPrecondition);
  });
}

TEST_CASE("the written corpus reads back as exactly the kept documents") {
  TempDir dir;
  std::string lines;
  std::set<std::string> keep;
  for (int i = 0; i < 500; ++i) {
    lines += "{\"id\": " + std::to_string(i) + ", \"text\": \"doc " + std::to_string(i) + "\"}\n";
    if (i % 3 == 0 || i % 7 == 0) keep.insert(std::to_string(i));
  }
  WriteFile(dir.File("a.jsonl"), lines);
  WriteFile(dir.File("b.ndjson.zst"), testing::GzipMember(lines));
  KeptOutput output;
  output.lines_path = dir.File("kept.jsonl.zst");
  auto counts = ReadThenWrite({dir.File("a.jsonl"), dir.File("b.ndjson.zst")}, keep, output);
  REQUIRE(counts.ok());
  CHECK(counts->documents == 1000);
  CHECK(counts->kept == 2 * keep.size());
  auto reader = CorpusReader::Open({output.lines_path}, {});
  REQUIRE(reader.ok());
  std::vector<std::string> ids;
  std::vector<Document> batch;
  while ((*reader)->ReadBatch(&batch, 64, 1 << 20).value() > 0) {
    for (const Document& doc : batch) ids.push_back(doc.id);
  }
  std::vector<std::string> expected;
  for (int round = 0; round < 2; ++round) {
    for (int i = 0; i < 500; ++i) {
      if (keep.count(std::to_string(i))) expected.push_back(std::to_string(i));
    }
  }
  CHECK(ids == expected);
}

}  // namespace
}  // namespace kindred
