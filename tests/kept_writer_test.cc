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

namespace kindred {
namespace {

namespace fs = std::filesystem;

class TempDir {
 public:
  TempDir() {
    std::string pattern = (fs::temp_directory_path() / "kindred-kept-XXXXXX").string();
    path_ = mkdtemp(pattern.data());
  }
  ~TempDir() { fs::remove_all(path_); }
  std::string Path(const std::string& relative) const { return path_ + "/" + relative; }
  const std::string& path() const { return path_; }

 private:
  std::string path_;
};

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

// One gzip member (RFC 1952) made by zlib's deflate.
std::string Gzip(const std::string& data) {
  z_stream z{};
  REQUIRE(deflateInit2(&z, 6, Z_DEFLATED, 15 + 16, 8, Z_DEFAULT_STRATEGY) == Z_OK);
  std::string out(deflateBound(&z, data.size()) + 64, '\0');
  z.next_in = reinterpret_cast<Bytef*>(const_cast<char*>(data.data()));
  z.avail_in = static_cast<uInt>(data.size());
  z.next_out = reinterpret_cast<Bytef*>(out.data());
  z.avail_out = static_cast<uInt>(out.size());
  REQUIRE(deflate(&z, Z_FINISH) == Z_STREAM_END);
  out.resize(z.total_out);
  deflateEnd(&z);
  return out;
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
  WriteFile(dir.Path("in/c.jsonl.gz"), Gzip(Join(kLines)));
  const std::string expected = kLines[0] + kLines[2] + kLines[5] + "\n";
  const std::vector<std::string> inputs = {dir.Path("in/c.jsonl.gz")};
  const std::set<std::string> keep = {"a", "b", "d"};
  for (const char* name : {"out.jsonl", "out.jsonl.gz", "out.jsonl.zst"}) {
    INFO(name);
    KeptOutput output;
    output.lines_path = dir.Path(std::string("deep/er/") + name);
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
  CHECK(std::distance(fs::directory_iterator(dir.Path("deep/er")), fs::directory_iterator()) == 3);
}

TEST_CASE("kept text documents are copied into a tree or listed") {
  TempDir dir;
  WriteFile(dir.Path("in/a/x.txt"), "ex");
  WriteFile(dir.Path("in/a/y.txt"), std::string("why\0", 4));
  WriteFile(dir.Path("in/a-b.txt"), "dropped");
  WriteFile(dir.Path("in/b/c/z.gz"), Gzip("zed"));
  WriteFile(dir.Path("single.md"), "one");
  const std::vector<std::string> inputs = {dir.Path("in"), dir.Path("single.md")};
  const std::set<std::string> keep = {"a/x.txt", "a/y.txt", "b/c/z.gz", dir.Path("single.md")};

  KeptOutput copy;
  copy.copy_dir = dir.Path("out/copy");
  auto counts = ReadThenWrite(inputs, keep, copy);
  REQUIRE(counts.ok());
  CHECK(counts->documents == 5);
  CHECK(counts->kept == 4);
  CHECK(ReadFile(dir.Path("out/copy/a/x.txt")) == "ex");
  CHECK(ReadFile(dir.Path("out/copy/a/y.txt")) == std::string("why\0", 4));
  CHECK(ReadFile(dir.Path("out/copy/b/c/z.gz")) == Gzip("zed"));  // the original bytes
  CHECK(ReadFile(dir.Path("out/copy/single.md")) == "one");
  CHECK_FALSE(fs::exists(dir.Path("out/copy/a-b.txt")));
  CHECK(std::distance(fs::directory_iterator(dir.Path("out")), fs::directory_iterator()) == 1);

  KeptOutput list;
  list.path_list = dir.Path("kept.txt");
  REQUIRE(ReadThenWrite(inputs, keep, list).ok());
  CHECK(ReadFile(dir.Path("kept.txt")) == dir.Path("in/a/x.txt") + "\n" + dir.Path("in/a/y.txt") +
                                              "\n" + dir.Path("in/b/c/z.gz") + "\n" +
                                              dir.Path("single.md") + "\n");
}

TEST_CASE("an existing empty copy directory is filled; a non-empty one is refused") {
  TempDir dir;
  WriteFile(dir.Path("in/x"), "x");
  fs::create_directories(dir.Path("empty"));
  KeptOutput output;
  output.copy_dir = dir.Path("empty");
  REQUIRE(ReadThenWrite({dir.Path("in")}, {"x"}, output).ok());
  CHECK(ReadFile(dir.Path("empty/x")) == "x");
  auto again = ReadThenWrite({dir.Path("in")}, {"x"}, output);
  CHECK(again.status().code() == absl::StatusCode::kInvalidArgument);
  CHECK(again.status().message() ==
        dir.Path("empty") + ": the copy directory exists and is not empty");
}

TEST_CASE("outputs that would touch the inputs are refused, and nothing is written") {
  TempDir dir;
  WriteFile(dir.Path("in.jsonl"), Join(kLines));
  WriteFile(dir.Path("tree/t.txt"), "t");
  fs::create_symlink(dir.Path("in.jsonl"), dir.Path("alias.jsonl"));
  struct Case {
    std::vector<std::string> inputs;
    KeptOutput output;
    std::string message;
  };
  const std::vector<Case> cases = {
      {{dir.Path("in.jsonl")},
       {dir.Path("in.jsonl"), "", ""},
       dir.Path("in.jsonl") + ": is an input; inputs are never overwritten"},
      {{dir.Path("in.jsonl")},
       {dir.Path("alias.jsonl"), "", ""},
       dir.Path("alias.jsonl") + ": is an input; inputs are never overwritten"},
      {{dir.Path("in.jsonl")},
       {dir.Path("tree/../in.jsonl"), "", ""},
       dir.Path("tree/../in.jsonl") + ": is an input; inputs are never overwritten"},
      {{dir.Path("tree"), dir.Path("in.jsonl")},
       {dir.Path("tree/sub/out.jsonl"), dir.Path("c"), ""},
       dir.Path("tree/sub/out.jsonl") + ": lies inside the input directory " + dir.Path("tree")},
      {{dir.Path("tree")},
       {"", dir.Path("tree/copy"), ""},
       dir.Path("tree/copy") + ": the copy directory overlaps the input " + dir.Path("tree")},
      {{dir.Path("tree")},
       {"", dir.path(), ""},
       dir.path() + ": the copy directory overlaps the input " + dir.Path("tree")},
      {{dir.Path("tree")}, {"", "", dir.Path("tree")}, dir.Path("tree") + ": is a directory"},
      {{dir.Path("in.jsonl")},
       {"", dir.Path("c"), ""},
       "an input is JSON Lines, but no output file for its kept lines was given"},
      {{dir.Path("tree")},
       {dir.Path("o.jsonl"), "", ""},
       "an input holds text documents: give either a copy directory or a path list for them"},
      {{dir.Path("tree")},
       {"", dir.Path("c"), dir.Path("l")},
       "an input holds text documents: give either a copy directory or a path list for them"},
      {{dir.Path("tree"), dir.Path("in.jsonl")},
       {dir.Path("c/o.jsonl"), dir.Path("c"), ""},
       dir.Path("c/o.jsonl") + ": lies inside the copy directory"},
      {{dir.Path("tree"), dir.Path("in.jsonl")},
       {dir.Path("same"), "", dir.Path("same")},
       "the kept lines and the path list name the same file"},
      {{dir.Path("in.jsonl")},
       {dir.Path("missing/../o.jsonl"), "", ""},
       dir.Path("missing/../o.jsonl") + ": \"..\" after a directory that does not exist"},
  };
  const std::string before = ReadFile(dir.Path("in.jsonl"));
  for (const Case& c : cases) {
    INFO(c.message);
    auto result = ReadThenWrite(c.inputs, {"a", "t.txt"}, c.output);
    REQUIRE_FALSE(result.ok());
    CHECK(result.status().code() == absl::StatusCode::kInvalidArgument);
    CHECK(result.status().message() == c.message);
  }
  CHECK(ReadFile(dir.Path("in.jsonl")) == before);
  std::set<std::string> names;
  for (const auto& entry : fs::directory_iterator(dir.path()))
    names.insert(entry.path().filename());
  CHECK(names == std::set<std::string>{"in.jsonl", "tree", "alias.jsonl"});
  CHECK(std::distance(fs::directory_iterator(dir.Path("tree")), fs::directory_iterator()) == 1);
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
  WriteFile(dir.Path("src"), "s");
  auto tree = io::CopyTree::Create(dir.Path("out"));
  REQUIRE(tree.ok());
  CHECK((*tree)->Add("../escaped", dir.Path("src")).code() == absl::StatusCode::kInvalidArgument);
  REQUIRE((*tree)->Add("ok/file", dir.Path("src")).ok());
  CHECK((*tree)->Add("ok/file", dir.Path("src")).code() == absl::StatusCode::kInvalidArgument);
  tree->reset();  // not committed: everything is removed
  CHECK_FALSE(fs::exists(dir.Path("escaped")));
  CHECK(std::distance(fs::directory_iterator(dir.path()), fs::directory_iterator()) == 1);
}

TEST_CASE("inputs that changed since they were read: nothing is written") {
  TempDir dir;
  WriteFile(dir.Path("in.jsonl"), Join(kLines));
  auto reader = CorpusReader::Open({dir.Path("in.jsonl")}, {});
  REQUIRE(reader.ok());
  std::vector<Document> batch;
  while ((*reader)->ReadBatch(&batch, 100, 1 << 20).value() > 0) {
  }
  WriteFile(dir.Path("in.jsonl"), Join(kLines) + "\n{\"id\": \"e\", \"text\": \"new\"}\n");
  KeptRequest request;
  request.inputs = (*reader)->ResolvedInputs();
  request.keep = [](uint64_t) { return true; };
  request.expected_documents = (*reader)->documents_read();
  request.output.lines_path = dir.Path("out.jsonl");
  auto result = WriteKept(request);
  CHECK(result.status().code() == absl::StatusCode::kFailedPrecondition);
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
  WriteFile(dir.Path("stdin.zst"), Gzip(Join(kLines)));
  WithStdin(dir.Path("stdin.zst"), [&] {
    InputOptions options;
    options.stdin_copy_path = dir.Path("spool");
    KeptOutput output;
    output.lines_path = dir.Path("out.jsonl");
    auto counts = ReadThenWrite({"-"}, {"c"}, output, options);
    REQUIRE(counts.ok());
    CHECK(ReadFile(dir.Path("out.jsonl")) == kLines[4]);
  });
  WriteFile(dir.Path("stdin.txt"), "plain text");
  WithStdin(dir.Path("stdin.txt"), [&] {
    InputOptions options;
    options.stdin_copy_path = dir.Path("spool2");  // the copy is always created new
    KeptOutput output;
    output.copy_dir = dir.Path("copies");
    REQUIRE(ReadThenWrite({"-"}, {"-"}, output, options).ok());
    CHECK(ReadFile(dir.Path("copies/stdin.txt")) == "plain text");
  });
  WithStdin(dir.Path("stdin.txt"), [&] {
    KeptOutput output;
    output.copy_dir = dir.Path("copies2");
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
  WriteFile(dir.Path("a.jsonl"), lines);
  WriteFile(dir.Path("b.ndjson.zst"), Gzip(lines));
  KeptOutput output;
  output.lines_path = dir.Path("kept.jsonl.zst");
  auto counts = ReadThenWrite({dir.Path("a.jsonl"), dir.Path("b.ndjson.zst")}, keep, output);
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
