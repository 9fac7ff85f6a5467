// Tests of CorpusReader on real files in a temporary directory.
#include "kindred/corpus.h"

#include <fcntl.h>
#include <stdlib.h>
#include <unistd.h>
#include <zlib.h>
#include <zstd.h>

#include <algorithm>
#include <catch2/catch.hpp>
#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

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

// One zstd frame (RFC 8878) made by libzstd.
std::string Zstd(const std::string& data) {
  std::string out(ZSTD_compressBound(data.size()), '\0');
  size_t n = ZSTD_compress(out.data(), out.size(), data.data(), data.size(), 3);
  REQUIRE_FALSE(ZSTD_isError(n));
  out.resize(n);
  return out;
}

absl::StatusOr<std::vector<Document>> ReadAll(std::vector<std::string> inputs,
                                              InputOptions options = {}, size_t max_docs = 1000,
                                              size_t max_bytes = 1 << 30) {
  auto reader = CorpusReader::Open(std::move(inputs), std::move(options));
  if (!reader.ok()) return reader.status();
  std::vector<Document> all, batch;
  for (;;) {
    absl::StatusOr<size_t> n = (*reader)->ReadBatch(&batch, max_docs, max_bytes);
    if (!n.ok()) return n.status();
    if (*n == 0) break;
    REQUIRE(*n == batch.size());
    for (Document& doc : batch) all.push_back(doc);
  }
  return all;
}

// ReadAll with JSON parsing deferred to a LineParser, as SignCorpus does:
// each batch's documents are finished in order, and the first error ends it.
absl::StatusOr<std::vector<Document>> ReadAllDeferred(std::vector<std::string> inputs,
                                                      InputOptions options = {},
                                                      size_t max_docs = 3) {
  auto reader = CorpusReader::Open(std::move(inputs), options);
  if (!reader.ok()) return reader.status();
  (*reader)->DeferParsing();
  LineParser parser(options);
  std::vector<Document> all, batch;
  for (;;) {
    absl::StatusOr<size_t> n = (*reader)->ReadBatch(&batch, max_docs, 1 << 30);
    for (Document& doc : batch) {
      if (absl::Status finished = parser.Finish(&doc); !finished.ok()) return finished;
      CHECK_FALSE(doc.unparsed);
      all.push_back(doc);
    }
    if (!n.ok()) return n.status();
    if (*n == 0) break;
  }
  return all;
}

std::vector<std::string> Ids(const std::vector<Document>& docs) {
  std::vector<std::string> ids;
  for (const Document& doc : docs) ids.push_back(doc.id);
  return ids;
}

std::string ErrorOf(const absl::StatusOr<std::vector<Document>>& result) {
  REQUIRE_FALSE(result.ok());
  return std::string(result.status().message());
}

TEST_CASE("a tree lists regular files in byte-wise order of relative path") {
  TempDir dir;
  const std::vector<std::string> files = {"b.txt", "a/c.txt", "a-b.txt", "a/b/d.txt",
                                          "A.txt", "a/b-c",   "z",       "\xc3\xa9.txt"};
  for (const std::string& name : files) WriteFile(dir.File("root/" + name), "text of " + name);
  WriteFile(dir.File("outside/secret.txt"), "not in the tree");
  fs::create_symlink(dir.File("outside"), dir.File("root/linked-dir"));
  fs::create_symlink(dir.File("outside/secret.txt"), dir.File("root/linked-file.txt"));
  fs::create_directories(dir.File("root/empty-dir"));

  auto docs = ReadAll({dir.File("root") + "/"});
  REQUIRE(docs.ok());
  // Reference order: std::sort of the relative paths (byte-wise comparison).
  std::vector<std::string> expected = files;
  std::sort(expected.begin(), expected.end());
  CHECK(Ids(*docs) == expected);
  for (size_t i = 0; i < docs->size(); ++i) {
    const Document& doc = (*docs)[i];
    CHECK(doc.text == "text of " + doc.id);
    CHECK(doc.source.path == dir.File("root/" + doc.id));
    CHECK(doc.source.line == 0);
    CHECK(doc.ordinal == i);
    CHECK_FALSE(doc.has_priority);
  }
}

// Regression: each text file of a tree was read into a string grown to
// 256 KiB (zeroed) at once, so a batch of 4096 small files held a gigabyte.
TEST_CASE("small text files cost small buffers; large ones are read whole") {
  TempDir dir;
  for (int f = 0; f < 20; ++f) {
    WriteFile(dir.File("tree/small" + std::to_string(10 + f) + ".txt"), std::string(300 + f, 'x'));
  }
  const std::string large(3'000'001, 'y');
  WriteFile(dir.File("tree/zz-large.txt"), large);
  auto reader = CorpusReader::Open({dir.File("tree")}, InputOptions{});
  REQUIRE(reader.ok());
  std::vector<Document> batch;
  auto n = (*reader)->ReadBatch(&batch, 100, 1 << 30);
  REQUIRE(n.ok());
  REQUIRE(*n == 21);
  for (int f = 0; f < 20; ++f) {
    CHECK(batch[f].text.size() == 300 + static_cast<size_t>(f));
    CHECK(batch[f].text.capacity() <= 16384);
  }
  CHECK(batch[20].text == large);
}

// Regression: batch slots kept the text buffer of the largest document they
// had held, so after many batches each of thousands of slots could hold a
// multi-megabyte buffer (a sweep of /usr/share/doc peaked at twice the corpus).
TEST_CASE("a batch slot does not keep a large document's buffer for a small one") {
  TempDir dir;
  const std::string large(1 << 20, 'z');
  WriteFile(dir.File("tree/a-large.txt"), large);
  WriteFile(dir.File("tree/b-small.txt"), "small b");
  WriteFile(dir.File("tree/c-small.txt"), "small c");
  WriteFile(dir.File("tree/d-large.jsonl"), "{\"id\":\"x\",\"text\":\"" + large + "\"}\n");
  auto reader = CorpusReader::Open({dir.File("tree")}, InputOptions{});
  REQUIRE(reader.ok());
  std::vector<Document> batch;
  REQUIRE((*reader)->ReadBatch(&batch, 2, 1 << 30).ok());
  REQUIRE(batch.size() == 2);
  CHECK(batch[0].text == large);
  REQUIRE((*reader)->ReadBatch(&batch, 2, 1 << 30).ok());
  REQUIRE(batch.size() == 2);
  CHECK(batch[0].text == "small c");
  CHECK(batch[0].text.capacity() <= 16384);
  CHECK(batch[1].text.size() > 1000);
}

TEST_CASE("text files keep NUL bytes, invalid UTF-8 and empty documents as they are") {
  TempDir dir;
  const std::string raw("a\0b\xff\xfe c\r\n", 9);
  WriteFile(dir.File("t/raw.txt"), raw);
  WriteFile(dir.File("t/empty.txt"), "");
  WriteFile(dir.File("single.md"), "one document");
  InputOptions options;
  options.include_binary = true;  // a NUL byte makes a file binary
  auto docs = ReadAll({dir.File("t"), dir.File("single.md")}, options);
  REQUIRE(docs.ok());
  REQUIRE(docs->size() == 3);
  CHECK((*docs)[0].id == "empty.txt");
  CHECK((*docs)[0].text.empty());
  CHECK((*docs)[1].id == "raw.txt");
  CHECK((*docs)[1].text == raw);
  CHECK((*docs)[2].id == dir.File("single.md"));
  CHECK((*docs)[2].text == "one document");
  CHECK((*docs)[2].source.input == 1);
}

TEST_CASE("JSON Lines with the default fields") {
  TempDir dir;
  WriteFile(dir.File("c.jsonl"),
            "{\"id\": \"a\", \"text\": \"first\"}\n"
            "\n"
            "   \t \n"
            "{\"text\": \"second\", \"extra\": [1, {\"x\": null}], \"id\": 7}\r\n"
            "{\"id\": -12, \"text\": \"\"}\n"
            "{\"id\": 18446744073709551615, \"text\": \"big\"}");  // no final newline
  auto docs = ReadAll({dir.File("c.jsonl")});
  REQUIRE(docs.ok());
  REQUIRE(docs->size() == 4);
  CHECK(Ids(*docs) == std::vector<std::string>{"a", "7", "-12", "18446744073709551615"});
  CHECK((*docs)[0].text == "first");
  CHECK((*docs)[1].text == "second");
  CHECK((*docs)[2].text.empty());
  CHECK((*docs)[3].text == "big");
  // Blank lines are skipped but still counted.
  CHECK((*docs)[0].source.line == 1);
  CHECK((*docs)[1].source.line == 4);
  CHECK((*docs)[3].source.line == 6);
  CHECK((*docs)[3].source.path == dir.File("c.jsonl"));
}

TEST_CASE("JSON string escapes are decoded") {
  TempDir dir;
  // RFC 8259 section 7: \" \\ \/ \b \f \n \r \t and \uXXXX, with a UTF-16
  // surrogate pair for characters outside the BMP. UTF-8 of U+00E9 is C3 A9
  // and of U+1F600 is F0 9F 98 80 (Unicode Standard, table 3-7).
  WriteFile(dir.File("e.ndjson"), R"({"id":"q\"\\\/","text":"a\nb\tc\u00e9\ud83d\ude00\u0000!"})"
                                  "\n");
  auto docs = ReadAll({dir.File("e.ndjson")});
  REQUIRE(docs.ok());
  REQUIRE(docs->size() == 1);
  CHECK((*docs)[0].id == "q\"\\/");
  CHECK((*docs)[0].text == std::string("a\nb\tc\xc3\xa9\xf0\x9f\x98\x80\0!", 13));
}

TEST_CASE("custom id, text and priority fields, and @line ids") {
  TempDir dir;
  WriteFile(dir.File("p.json"),
            "{\"key\": \"x\", \"body\": \"one\", \"rank\": 2.5}\n"
            "{\"key\": \"y\", \"body\": \"two\"}\n"
            "\n"
            "{\"key\": \"z\", \"body\": \"three\", \"rank\": -3}\n");
  InputOptions options;
  options.id_field = "key";
  options.text_field = "body";
  options.priority_field = "rank";
  auto docs = ReadAll({dir.File("p.json")}, options);
  REQUIRE(docs.ok());
  REQUIRE(docs->size() == 3);
  CHECK(Ids(*docs) == std::vector<std::string>{"x", "y", "z"});
  CHECK((*docs)[0].has_priority);
  CHECK((*docs)[0].priority == 2.5);
  CHECK_FALSE((*docs)[1].has_priority);
  CHECK((*docs)[2].has_priority);
  CHECK((*docs)[2].priority == -3);

  options.id_field = "@line";
  docs = ReadAll({dir.File("p.json")}, options);
  REQUIRE(docs.ok());
  CHECK(Ids(*docs) == std::vector<std::string>{dir.File("p.json") + ":1", dir.File("p.json") + ":2",
                                               dir.File("p.json") + ":4"});
}

TEST_CASE("malformed JSON Lines name the file and line") {
  TempDir dir;
  const std::string path = dir.File("bad.jsonl");
  const std::string good = "{\"id\": \"ok\", \"text\": \"fine\"}\n\n";
  struct Case {
    std::string line;
    std::string message;
  };
  const std::vector<Case> cases = {
      {"{\"id\": \"a\"}", path + ":3: missing field \"text\""},
      {"{\"text\": \"a\"}", path + ":3: missing field \"id\""},
      {"{\"id\": \"a\", \"text\": 5}", path + ":3: field \"text\" is not a string"},
      {"{\"id\": 1.5, \"text\": \"a\"}", path + ":3: field \"id\" is not a string or an integer"},
      {"{\"id\": null, \"text\": \"a\"}", path + ":3: field \"id\" is not a string or an integer"},
      {"[1, 2]", path + ":3: not a JSON object"},
  };
  for (const Case& c : cases) {
    WriteFile(path, good + c.line + "\n" + good);
    auto result = ReadAll({path});
    CHECK(result.status().code() == absl::StatusCode::kInvalidArgument);
    CHECK(ErrorOf(result) == c.message);
  }
  for (const std::string line :
       {"{\"id\": \"a\", \"text\": \"b\"", "{\"id\": \"a\", \"text\": \"b\"} x", "not json",
        "{\"id\": \"a\", \"text\": \"b\"}\xff"}) {
    WriteFile(path, good + line + "\n");
    auto result = ReadAll({path});
    CHECK(result.status().code() == absl::StatusCode::kInvalidArgument);
    CHECK_THAT(ErrorOf(result), Catch::StartsWith(path + ":3: invalid JSON: "));
  }
  InputOptions options;
  options.priority_field = "p";
  WriteFile(path, "{\"id\": \"a\", \"text\": \"b\", \"p\": \"high\"}\n");
  CHECK(ErrorOf(ReadAll({path}, options)) == path + ":1: field \"p\" is not a number");
}

TEST_CASE("deferred parsing gives the same documents and the same errors") {
  TempDir dir;
  const std::string path = dir.File("mixed.jsonl");
  WriteFile(path,
            "{\"id\": \"a\", \"text\": \"one \\u00e9 two\\n\", \"p\": 2.5}\n"
            "\n"
            "{\"id\": 7, \"text\": \"caf\xff ok\"}\r\n"
            "{\"text\": \"" +
                std::string(5000, 'x') +
                "\", \"id\": \"long\"}\n"
                "{\"id\": \"short\", \"text\": \"\"}\n"
                "{\"id\": \"last\", \"text\": \"no newline\"}");
  for (const std::string id_field : {"id", "@line"}) {
    InputOptions options;
    options.priority_field = "p";
    options.id_field = id_field;
    auto direct = ReadAll({path}, options);
    auto deferred = ReadAllDeferred({path}, options);
    REQUIRE(direct.ok());
    REQUIRE(deferred.ok());
    REQUIRE(direct->size() == 5);
    REQUIRE(deferred->size() == direct->size());
    for (size_t i = 0; i < direct->size(); ++i) {
      const Document& a = (*direct)[i];
      const Document& b = (*deferred)[i];
      CHECK(a.id == b.id);
      CHECK(a.text == b.text);
      CHECK(a.priority == b.priority);
      CHECK(a.has_priority == b.has_priority);
      CHECK(a.invalid_utf8 == b.invalid_utf8);
      CHECK(a.source.line == b.source.line);
      CHECK(a.ordinal == b.ordinal);
    }
    CHECK((*deferred)[1].invalid_utf8 == 1);
  }
  // A malformed line: the same message, from Finish instead of ReadBatch.
  for (const std::string line : {"{\"id\": \"a\"}", "not json", "{\"id\": [], \"text\": \"b\"}"}) {
    WriteFile(path, "{\"id\": \"ok\", \"text\": \"fine\"}\n" + line +
                        "\n{\"id\": \"z\", \"text\": \"z\"}\n");
    auto direct = ReadAll({path});
    auto deferred = ReadAllDeferred({path});
    REQUIRE_FALSE(direct.ok());
    CHECK(deferred.status() == direct.status());
  }
}

TEST_CASE("invalid UTF-8 inside a JSON string becomes U+FFFD and is counted") {
  TempDir dir;
  const std::string path = dir.File("broken.jsonl");
  // \xff is never valid; \xe2\x82 is a truncated three-byte sequence: two
  // replacements by the maximal-subpart practice (Unicode ch. 3).
  WriteFile(
      path,
      "{\"id\": \"x\", \"text\": \"caf\xff \xe2\x82 ok\"}\n{\"id\": \"y\", \"text\": \"fine\"}\n");
  auto docs = ReadAll({path});
  REQUIRE(docs.ok());
  REQUIRE(docs->size() == 2);
  CHECK((*docs)[0].text == "caf\xEF\xBF\xBD \xEF\xBF\xBD ok");
  CHECK((*docs)[0].invalid_utf8 == 2);
  CHECK((*docs)[1].invalid_utf8 == 0);
}

TEST_CASE("the document limit bounds a JSON line as read, not its repaired text") {
  // Regression (found by fuzzing): each invalid byte becomes the three bytes
  // of U+FFFD, so a line within the limit can hold a longer text; the bound
  // is the limit plus 2 bytes per replacement (corpus.h).
  TempDir dir;
  const std::string path = dir.File("broken.jsonl");
  const std::string line = "{\"id\": \"x\", \"text\": \"" + std::string(40, '\xF3') + "\"}";
  WriteFile(path, line + "\n");
  InputOptions options;
  options.max_document_bytes = line.size() + 1;
  auto docs = ReadAll({path}, options);
  REQUIRE(docs.ok());
  REQUIRE(docs->size() == 1);
  CHECK((*docs)[0].invalid_utf8 == 40);
  CHECK((*docs)[0].text.size() == 120);
  CHECK((*docs)[0].text.size() <= options.max_document_bytes + 2 * 40);
  options.max_document_bytes = line.size() - 1;
  auto over = ReadAll({path}, options);
  REQUIRE_FALSE(over.ok());
  CHECK(over.status().code() == absl::StatusCode::kResourceExhausted);
}

TEST_CASE("after an error every later batch returns the same error") {
  TempDir dir;
  WriteFile(dir.File("x.jsonl"), "{\"id\": \"a\", \"text\": \"b\"}\n{oops}\n");
  auto reader = CorpusReader::Open({dir.File("x.jsonl")}, {});
  REQUIRE(reader.ok());
  std::vector<Document> batch;
  auto first = (*reader)->ReadBatch(&batch, 1, 100);
  REQUIRE(first.ok());
  CHECK(*first == 1);
  auto second = (*reader)->ReadBatch(&batch, 1, 100);
  REQUIRE_FALSE(second.ok());
  auto third = (*reader)->ReadBatch(&batch, 1, 100);
  CHECK(third.status() == second.status());
}

TEST_CASE("formats: auto detection by name, and explicit formats") {
  TempDir dir;
  const std::string lines = "{\"id\": \"a\", \"text\": \"b\"}\n{\"id\": \"c\", \"text\": \"d\"}\n";
  WriteFile(dir.File("x.jsonl.gz"), testing::GzipMember(lines));
  WriteFile(dir.File("x.ndjson.zst"), Zstd(lines));
  WriteFile(dir.File("x.txt"), lines);
  WriteFile(dir.File("x.jsonl.bak"), lines);
  auto reader = CorpusReader::Open({dir.File("x.jsonl.gz"), dir.File("x.ndjson.zst"),
                                    dir.File("x.txt"), dir.File("x.jsonl.bak"), dir.path()},
                                   {});
  REQUIRE(reader.ok());
  CHECK((*reader)->FormatOf(0) == InputFormat::kJsonLines);
  CHECK((*reader)->FormatOf(1) == InputFormat::kJsonLines);
  CHECK((*reader)->FormatOf(2) == InputFormat::kText);
  CHECK((*reader)->FormatOf(3) == InputFormat::kText);
  CHECK((*reader)->FormatOf(4) == InputFormat::kText);

  InputOptions as_text;
  as_text.format = InputFormat::kText;
  auto docs = ReadAll({dir.File("x.jsonl.gz")}, as_text);
  REQUIRE(docs.ok());
  REQUIRE(docs->size() == 1);
  CHECK((*docs)[0].text == lines);  // decompressed by content

  InputOptions as_lines;
  as_lines.format = InputFormat::kJsonLines;
  docs = ReadAll({dir.File("x.txt")}, as_lines);
  REQUIRE(docs.ok());
  CHECK(Ids(*docs) == std::vector<std::string>{"a", "c"});
}

TEST_CASE("a tree read as JSON Lines reads every file's lines in order") {
  TempDir dir;
  WriteFile(dir.File("t/2.jsonl"), "{\"id\": \"c\", \"text\": \"3\"}\n");
  WriteFile(dir.File("t/1/x"),
            testing::GzipMember("{\"id\": \"a\", \"text\": \"1\"}\n{\"id\": \"b\", \"text\": \"2\"}"));
  InputOptions options;
  options.format = InputFormat::kJsonLines;
  options.id_field = "@line";
  auto docs = ReadAll({dir.File("t")}, options);
  REQUIRE(docs.ok());
  CHECK(Ids(*docs) == std::vector<std::string>{dir.File("t/1/x") + ":1", dir.File("t/1/x") + ":2",
                                               dir.File("t/2.jsonl") + ":1"});
  CHECK((*docs)[1].text == "2");
  CHECK((*docs)[2].source.path == dir.File("t/2.jsonl"));
}

TEST_CASE("gzip with several members and zstd with several frames") {
  TempDir dir;
  std::string first, second;
  for (int i = 0; i < 3000; ++i) {
    first +=
        "{\"id\": \"a" + std::to_string(i) + "\", \"text\": \"alpha " + std::to_string(i) + "\"}\n";
    second +=
        "{\"id\": \"b" + std::to_string(i) + "\", \"text\": \"beta " + std::to_string(i) + "\"}\n";
  }
  WriteFile(dir.File("m.jsonl.gz"), testing::GzipMember(first) + testing::GzipMember(second));
  WriteFile(dir.File("m.jsonl.zst"), Zstd(first) + Zstd(second));
  WriteFile(dir.File("m.jsonl"), first + second);
  auto plain = ReadAll({dir.File("m.jsonl")});
  REQUIRE(plain.ok());
  REQUIRE(plain->size() == 6000);
  for (const char* name : {"m.jsonl.gz", "m.jsonl.zst"}) {
    auto docs = ReadAll({dir.File(name)});
    REQUIRE(docs.ok());
    CHECK(Ids(*docs) == Ids(*plain));
    CHECK((*docs)[5999].text == "beta 2999");
  }
  // A tree of compressed text files: each file decompressed.
  WriteFile(dir.File("t/a.gz"), testing::GzipMember("one ") + testing::GzipMember("two"));
  WriteFile(dir.File("t/b"), Zstd("three ") + Zstd(""));
  auto docs = ReadAll({dir.File("t")});
  REQUIRE(docs.ok());
  REQUIRE(docs->size() == 2);
  CHECK((*docs)[0].text == "one two");
  CHECK((*docs)[1].text == "three ");
}

TEST_CASE("truncated and corrupt compressed input is an error that says so") {
  TempDir dir;
  std::string text;
  for (int i = 0; i < 20000; ++i) text += "word" + std::to_string(i * 7919 % 10007) + " ";
  const std::string gz = testing::GzipMember(text), zst = Zstd(text);
  struct Case {
    std::string name, bytes, message;
  };
  std::string flipped_gz = gz;
  flipped_gz[gz.size() / 2] ^= 0x55;
  std::string flipped_zst = zst;
  flipped_zst[zst.size() / 2] ^= 0x55;
  const std::vector<Case> cases = {
      {"cut.gz", gz.substr(0, gz.size() / 2),
       "truncated gzip stream after " + std::to_string(gz.size() / 2) + " bytes"},
      {"cut2.gz", gz.substr(0, gz.size() - 4), "truncated gzip stream"},
      {"cut.zst", zst.substr(0, zst.size() / 2),
       "truncated zstd stream after " + std::to_string(zst.size() / 2) + " bytes"},
      {"bad.gz", flipped_gz, "corrupt gzip stream"},
      {"bad.zst", flipped_zst, "corrupt zstd stream"},
      {"tail.gz", gz + "garbage after the member", "corrupt gzip stream"},
      {"magic.gz", std::string("\x1f\x8b"), "truncated gzip stream after 2 bytes"},
  };
  for (const Case& c : cases) {
    WriteFile(dir.File(c.name), c.bytes);
    auto result = ReadAll({dir.File(c.name)});
    INFO(c.name);
    CHECK(result.status().code() == absl::StatusCode::kInvalidArgument);
    CHECK_THAT(ErrorOf(result), Catch::StartsWith(dir.File(c.name) + ": " + c.message));
  }
}

TEST_CASE("size limits: long lines, large documents, decompression bombs") {
  TempDir dir;
  InputOptions options;
  options.max_document_bytes = 100;
  const std::string ok_line = "{\"id\": \"a\", \"text\": \"" + std::string(77, 'x') + "\"}";
  REQUIRE(ok_line.size() == 100);
  // A 20 MB line with a 100-byte limit: refused as soon as 100 bytes pass
  // without a newline.
  WriteFile(dir.File("long.jsonl"), ok_line + "\n" + ok_line + "\n" + std::string(20 << 20, 'x'));
  auto result = ReadAll({dir.File("long.jsonl")}, options);
  CHECK(result.status().code() == absl::StatusCode::kResourceExhausted);
  CHECK(ErrorOf(result) == dir.File("long.jsonl") +
                               ":3: line longer than the limit of 100 bytes (--max-document-size)");
  // 100 bytes plus "\r" counts as 101.
  WriteFile(dir.File("crlf.jsonl"), ok_line + "\r\n");
  CHECK(ErrorOf(ReadAll({dir.File("crlf.jsonl")}, options)) ==
        dir.File("crlf.jsonl") +
            ":1: line longer than the limit of 100 bytes (--max-document-size)");

  WriteFile(dir.File("t/small"), std::string(100, 'y'));
  WriteFile(dir.File("t/zbig"), std::string(101, 'y'));
  result = ReadAll({dir.File("t")}, options);
  CHECK(result.status().code() == absl::StatusCode::kResourceExhausted);
  CHECK(ErrorOf(result) ==
        dir.File("t/zbig") + ": document larger than the limit of 100 bytes (--max-document-size)");

  InputOptions bomb;
  bomb.max_decompressed_bytes = 1 << 20;
  WriteFile(dir.File("bomb.gz"), testing::GzipMember(std::string(8 << 20, '\0')));
  WriteFile(dir.File("fine.gz"), testing::GzipMember(std::string(1 << 20, 'a')));
  result = ReadAll({dir.File("bomb.gz")}, bomb);
  CHECK(result.status().code() == absl::StatusCode::kResourceExhausted);
  CHECK(ErrorOf(result) == dir.File("bomb.gz") +
                               ": decompressed size exceeds the limit of 1048576 bytes "
                               "(--max-decompressed-size)");
  CHECK(ReadAll({dir.File("fine.gz")}, bomb).ok());
}

TEST_CASE("batches of any size give the same stream") {
  TempDir dir;
  std::string lines;
  for (int i = 0; i < 50; ++i) {
    lines += "{\"id\": " + std::to_string(i) + ", \"text\": \"" + std::string(i, 'x') + "\"}\n";
    WriteFile(dir.File("t/" + std::to_string(100 + i)), std::string(i, 'y'));
  }
  WriteFile(dir.File("l.jsonl"), lines);
  const std::vector<std::string> inputs = {dir.File("l.jsonl"), dir.File("t"), dir.File("l.jsonl")};
  auto reference = ReadAll(inputs);
  REQUIRE(reference.ok());
  REQUIRE(reference->size() == 150);
  for (size_t max_docs : {1, 2, 7, 49, 150, 1000}) {
    for (size_t max_bytes : {0, 1, 30, 100, 5000}) {
      auto docs = ReadAll(inputs, {}, max_docs, max_bytes);
      REQUIRE(docs.ok());
      REQUIRE(docs->size() == reference->size());
      for (size_t i = 0; i < docs->size(); ++i) {
        CHECK((*docs)[i].id == (*reference)[i].id);
        CHECK((*docs)[i].text == (*reference)[i].text);
        CHECK((*docs)[i].ordinal == i);
        CHECK((*docs)[i].source.input == (*reference)[i].source.input);
      }
    }
  }
  // A batch stops once its texts reach max_bytes.
  auto reader = CorpusReader::Open({dir.File("l.jsonl")}, {});
  REQUIRE(reader.ok());
  std::vector<Document> batch;
  auto n = (*reader)->ReadBatch(&batch, 100, 6);  // texts of 0, 1, 2, 3 bytes
  REQUIRE(n.ok());
  CHECK(*n == 4);
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

TEST_CASE("standard input: JSON Lines or one text document, copied on request") {
  TempDir dir;
  const std::string lines = "  \n{\"id\": \"s\", \"text\": \"from stdin\"}\n";
  WriteFile(dir.File("in.gz"), testing::GzipMember(lines));
  WithStdin(dir.File("in.gz"), [&] {
    InputOptions options;
    options.stdin_copy_path = dir.File("copy");
    options.id_field = "@line";
    auto reader = CorpusReader::Open({"-"}, options);
    REQUIRE(reader.ok());
    CHECK((*reader)->FormatOf(0) == InputFormat::kAuto);
    std::vector<Document> batch;
    REQUIRE((*reader)->ReadBatch(&batch, 10, 1000).value() == 1);
    CHECK(batch[0].id == "-:2");
    CHECK(batch[0].text == "from stdin");
    CHECK(batch[0].source.path == "-");
    REQUIRE((*reader)->ReadBatch(&batch, 10, 1000).value() == 0);
    std::vector<ResolvedInput> resolved = (*reader)->ResolvedInputs();
    CHECK(resolved[0].is_stdin);
    CHECK(resolved[0].format == InputFormat::kJsonLines);
    CHECK(resolved[0].read_path == dir.File("copy"));
    std::ifstream copy(dir.File("copy"), std::ios::binary);
    CHECK(std::string(std::istreambuf_iterator<char>(copy), {}) == lines);
  });
  WriteFile(dir.File("in.txt"), "  plain text {not json}");
  WithStdin(dir.File("in.txt"), [&] {
    auto docs = ReadAll({"-"});
    REQUIRE(docs.ok());
    REQUIRE(docs->size() == 1);
    CHECK((*docs)[0].id == "-");
    CHECK((*docs)[0].text == "  plain text {not json}");
  });
}

TEST_CASE("missing inputs and bad input lists") {
  TempDir dir;
  auto missing = CorpusReader::Open({dir.File("nope.jsonl")}, {});
  CHECK(missing.status().code() == absl::StatusCode::kNotFound);
  CHECK_THAT(std::string(missing.status().message()),
             Catch::StartsWith(dir.File("nope.jsonl") + ": cannot open"));
  CHECK(CorpusReader::Open({"-", "-"}, {}).status().code() == absl::StatusCode::kInvalidArgument);
  CHECK(CorpusReader::Open({}, {}).status().code() == absl::StatusCode::kInvalidArgument);
}

}  // namespace
}  // namespace kindred

namespace kindred {
namespace {

TEST_CASE("binary files are skipped, counted and read again the same way") {
  TempDir dir;
  WriteFile(dir.File("t/a.txt"), "plain text");
  WriteFile(dir.File("t/b.bin"), std::string("ELF\0\1", 5));
  WriteFile(dir.File("t/c.txt"), "caf\xe9 cr\xe8me, a few Latin-1 bytes in a longer text");
  WriteFile(dir.File("t/d.dat"), std::string(100, '\xe9'));
  InputOptions options;
  std::vector<std::string> named;
  options.on_skip = [&named](const std::string& path, const std::string& why) {
    named.push_back(path + " " + why);
  };
  auto reader = CorpusReader::Open({dir.File("t")}, options);
  REQUIRE(reader.ok());
  std::vector<Document> batch;
  auto n = (*reader)->ReadBatch(&batch, 10, 1 << 20);
  REQUIRE(n.ok());
  REQUIRE(*n == 2);
  CHECK(batch[0].id == "a.txt");
  CHECK(batch[1].id == "c.txt");
  CHECK(batch[1].ordinal == 1);
  REQUIRE((*reader)->ReadBatch(&batch, 10, 1 << 20).ok());
  CHECK((*reader)->skips().binary == 2);
  REQUIRE(named.size() == 2);
  CHECK(named[0] == dir.File("t/b.bin") + " binary: a NUL byte at byte 3");
  CHECK(named[1] == dir.File("t/d.dat") + " binary: 99 of the first 100 bytes are not UTF-8");
  // A second reading skips the same files without reading them.
  auto resolved = (*reader)->ResolvedInputs();
  CHECK(resolved[0].skipped_files == std::vector<std::string>{"b.bin", "d.dat"});
  WriteFile(dir.File("t/b.bin"), "now text, yet still skipped by the second reading");
  auto again = CorpusReader::Reopen(resolved, options);
  REQUIRE(again.ok());
  n = (*again)->ReadBatch(&batch, 10, 1 << 20);
  REQUIRE(n.ok());
  REQUIRE(*n == 2);
  CHECK(batch[1].id == "c.txt");
}

TEST_CASE("unreadable files are skipped only when asked, whole") {
  TempDir dir;
  WriteFile(dir.File("t/a.txt"), "plain text");
  WriteFile(dir.File("t/b.gz"), std::string("\x1f\x8b\x08\x00\x00\x00", 6));  // cut short
  WriteFile(dir.File("t/c.txt"), "more text");
  CHECK(!ReadAll({dir.File("t")}).ok());
  InputOptions options;
  options.skip_unreadable = true;
  auto docs = ReadAll({dir.File("t")}, options);
  REQUIRE(docs.ok());
  REQUIRE(docs->size() == 2);
  CHECK((*docs)[1].id == "c.txt");
  CHECK((*docs)[1].ordinal == 1);
}

}  // namespace
}  // namespace kindred
