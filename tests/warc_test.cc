// Tests of WARC reading: records, HTTP payloads, charsets, HTML text, and
// CorpusReader on WARC files.
#include <zlib.h>

#include <catch2/catch.hpp>
#include <string>
#include <vector>

#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "io/byte_stream.h"
#include "io/charset.h"
#include "io/gzip_stream.h"
#include "io/html_text.h"
#include "io/http_payload.h"
#include "io/sha1.h"
#include "io/warc_documents.h"
#include "kindred/corpus.h"
#include "testlib/gzip.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

using testing::TempDir;

std::string Record(const std::string& type, const std::string& uri, const std::string& block,
                   const std::string& extra = "", const std::string& version = "WARC/1.1") {
  return absl::StrCat(version, "\r\nWARC-Type: ", type, "\r\n",
                      uri.empty() ? "" : absl::StrCat("WARC-Target-URI: ", uri, "\r\n"),
                      "WARC-Record-ID: <urn:uuid:", uri.size(), "-", block.size(), ">\r\n", extra,
                      "Content-Length: ", block.size(), "\r\n\r\n", block, "\r\n\r\n");
}

std::string Http(const std::string& status, const std::string& headers, const std::string& body) {
  return absl::StrCat("HTTP/1.1 ", status, "\r\n", headers, "\r\n", body);
}

std::string Response(const std::string& uri, const std::string& http,
                     const std::string& extra = "") {
  return Record("response", uri, http,
                absl::StrCat("Content-Type: application/http; msgtype=response\r\n", extra));
}

struct ReadResult {
  absl::Status status;
  std::vector<Document> docs;
  std::map<std::string, uint64_t> counts;
};

ReadResult ReadAll(const std::string& path, InputOptions options = {}) {
  ReadResult result;
  auto reader = CorpusReader::Open({path}, options);
  if (!reader.ok()) {
    result.status = reader.status();
    return result;
  }
  std::vector<Document> batch;
  for (;;) {
    auto n = (*reader)->ReadBatch(&batch, 100, 1 << 30);
    if (!n.ok()) {
      result.status = n.status();
      break;
    }
    if (*n == 0) break;
    for (Document& doc : batch) result.docs.push_back(doc);
  }
  result.counts = (*reader)->RecordCounts();
  return result;
}

// The text of `html` with each run of line breaks shown as one "|", and
// none at the ends.
std::string Html(const std::string& html) {
  std::string text, shown;
  REQUIRE(io::HtmlToText(html, &text).ok());
  for (char c : text) {
    if (c != '\n') {
      shown += c;
    } else if (!shown.empty() && shown.back() != '|') {
      shown += '|';
    }
  }
  if (!shown.empty() && shown.back() == '|') shown.pop_back();
  return shown;
}

// FIPS 180-2 appendix A.1 ("abc") and RFC 4648 section 10 ("foobar").
TEST_CASE("SHA-1 and base32 match their standards' examples", "[warc]") {
  io::Sha1 sha;
  sha.Update("abc");
  auto digest = sha.Finish();
  const uint8_t expected[20] = {0xa9, 0x99, 0x3e, 0x36, 0x47, 0x06, 0x81, 0x6a, 0xba, 0x3e,
                                0x25, 0x71, 0x78, 0x50, 0xc2, 0x6c, 0x9c, 0xd0, 0xd8, 0x9d};
  CHECK(std::equal(digest.begin(), digest.end(), expected));
  CHECK(io::Base32(reinterpret_cast<const uint8_t*>("foobar"), 6) == "MZXW6YTBOI======");
  CHECK(io::Base32(reinterpret_cast<const uint8_t*>("f"), 1) == "MY======");
  // A 1,000-byte message crosses block boundaries in pieces.
  std::string long_message(1000, 'a');
  io::Sha1 pieces;
  for (size_t i = 0; i < long_message.size(); i += 77) pieces.Update(long_message.substr(i, 77));
  CHECK(pieces.Finish() == [&] {
    io::Sha1 whole;
    whole.Update(long_message);
    return whole.Finish();
  }());
}

TEST_CASE("charset labels, byte-order marks and meta prescan", "[warc]") {
  // Labels from the WHATWG Encoding Standard's table.
  CHECK(io::EncodingForLabel(" Latin1 ") == "windows-1252");
  CHECK(io::EncodingForLabel("sjis") == "Shift_JIS");
  CHECK(io::EncodingForLabel("gb2312") == "GBK");
  CHECK(io::EncodingForLabel("no-such-charset").empty());
  size_t bom = 0;
  CHECK(io::ChooseEncoding("iso-8859-1", "\xEF\xBB\xBFx", true, &bom) == "windows-1252");
  CHECK(bom == 0);
  CHECK(io::ChooseEncoding("", "\xEF\xBB\xBFx", true, &bom) == "UTF-8");
  CHECK(bom == 3);
  CHECK(io::ChooseEncoding("bogus", "\xFF\xFEx\0", true, &bom) == "UTF-16LE");
  CHECK(io::PrescanMeta("<html><head><meta charset='shift_jis'>") == "Shift_JIS");
  CHECK(io::PrescanMeta("<!-- <meta charset=koi8-r> --><META HTTP-EQUIV=\"Content-Type\" "
                        "CONTENT=\"text/html; charset=windows-1251\">") == "windows-1251");
  CHECK(io::PrescanMeta("<meta content=\"text/html; charset=koi8-r\">").empty());  // no pragma
  CHECK(io::PrescanMeta("<meta charset=utf-16le>") == "UTF-8");
  CHECK(io::PrescanMeta(std::string(1100, ' ') + "<meta charset=koi8-r>").empty());
  CHECK(io::ChooseEncoding("", "<p>plain", true, &bom) == "UTF-8");
}

TEST_CASE("conversion to UTF-8 counts what does not convert", "[warc]") {
  std::string out;
  uint32_t replaced = 0;
  REQUIRE(io::ConvertToUtf8("windows-1252", "caf\xE9 \x93q\x94", &out, &replaced).ok());
  CHECK(out == "caf\xC3\xA9 \xE2\x80\x9Cq\xE2\x80\x9D");
  CHECK(replaced == 0);
  // 0x82 0xA0 is HIRAGANA LETTER A in Shift_JIS; 0x85 0x40 is unassigned.
  REQUIRE(io::ConvertToUtf8("Shift_JIS", "\x82\xA0|\x85\x40", &out, &replaced).ok());
  CHECK(out.substr(0, 4) == "\xE3\x81\x82|");
  CHECK(out.find("\xEF\xBF\xBD") != std::string::npos);
  CHECK(replaced >= 1);
  REQUIRE(io::ConvertToUtf8("UTF-8", "ok\xFF", &out, &replaced).ok());
  CHECK(out == "ok\xEF\xBF\xBD");
  CHECK(replaced == 1);
}

TEST_CASE("Content-Type values, present or missing", "[warc]") {
  std::string media_type, charset;
  io::ParseContentType(absl::string_view(), &media_type, &charset);  // a missing field
  CHECK(media_type.empty());
  CHECK(charset.empty());
  io::ParseContentType(" Text/HTML ; q=1; Charset = 'koi8-r' ", &media_type, &charset);
  CHECK(media_type == "text/html");
  CHECK(charset == "koi8-r");
}

TEST_CASE("HTTP bodies: chunked, gzip, deflate, br", "[warc]") {
  auto head = io::ParseHttpHead(
      "HTTP/1.1 200 OK\r\nContent-Type: text/html; charset=\"ISO-8859-1\"\r\n"
      "Transfer-Encoding: chunked\r\n\r\n5\r\nhello\r\n3;ext=1\r\n!!!\r\n0\r\n\r\n");
  REQUIRE(head.ok());
  CHECK(head->status == 200);
  CHECK(head->media_type == "text/html");
  CHECK(head->charset == "ISO-8859-1");
  std::string block =
      "HTTP/1.1 200 OK\r\nContent-Type: text/html; charset=\"ISO-8859-1\"\r\n"
      "Transfer-Encoding: chunked\r\n\r\n5\r\nhello\r\n3;ext=1\r\n!!!\r\n0\r\n\r\n";
  std::string body;
  REQUIRE(io::DecodeHttpBody(*head, absl::string_view(block).substr(head->body_offset), 1000, &body)
              .ok());
  CHECK(body == "hello!!!");
  io::HttpHead gz;
  gz.content_encoding = "gzip";
  REQUIRE(io::DecodeHttpBody(gz, testing::GzipMember("squeezed"), 1000, &body).ok());
  CHECK(body == "squeezed");
  CHECK(io::DecodeHttpBody(gz, testing::GzipMember(std::string(5000, 'x')), 1000, &body).code() ==
        absl::StatusCode::kResourceExhausted);
  CHECK(io::DecodeHttpBody(gz, "not gzip at all", 1000, &body).code() ==
        absl::StatusCode::kInvalidArgument);
  // Raw deflate (no zlib wrapper), as some servers send for "deflate".
  std::string gzip = testing::GzipMember("raw deflate");
  io::HttpHead deflate;
  deflate.content_encoding = "deflate";
  REQUIRE(io::DecodeHttpBody(deflate, gzip.substr(10, gzip.size() - 18), 1000, &body).ok());
  CHECK(body == "raw deflate");
  // Made with libbrotlienc's BrotliEncoderCompress (quality 5, text mode).
  const std::string br(
      "\x8b\x0c\x80\x3c\x70\x3e\x42\x72\x6f\x74\x6c\x69\x20\x68\x61\x72\x62\x6f\x75\x72\x20\x70"
      "\x61\x67\x65\x3c\x2f\x70\x3e\x03",
      30);
  io::HttpHead brotli;
  brotli.content_encoding = "br";
  REQUIRE(io::DecodeHttpBody(brotli, br, 1000, &body).ok());
  CHECK(body == "<p>Brotli harbour page</p>");
}

TEST_CASE("HTML text by the definition", "[warc]") {
  CHECK(Html("<p>a<b>b</b>c</p>") == "abc");
  CHECK(Html("x<div>y</div>z") == "x|y|z");
  CHECK(Html("<title>T</title><script>s</script><style>c</style>body<br>line") == "body|line");
  CHECK(Html("a&amp;b &eacute; &#x41;") == "a&b \xC3\xA9 A");
  CHECK(Html("<svg><text>no</text></svg><math><mi>no</mi></math><template>no</template>"
             "<noscript>no</noscript>yes") == "yes");
  CHECK(Html("<my-widget>in</my-widget>line<unknownthing>b</unknownthing>") == "inline|b");
  CHECK(Html("<table><tr><td>1<td>2</table>") == "1|2");
  CHECK(Html("<p>one<p>two") == "one|two");                         // implied end tags
  CHECK(Html("<b>bold<i>both</b>italic</i>") == "boldbothitalic");  // adoption agency
  CHECK(Html("<script><!-- </script>after") == "after");
  CHECK(Html("a<![CDATA[b]]>c") == "ac");  // a bogus comment in HTML content
  CHECK(Html(std::string("n\0ul", 4)) == "nul");
}

TEST_CASE("HTML pages left to the workers get the same texts", "[warc]") {
  // A reader that defers parsing leaves each page's text to LineParser::
  // Finish (on the signing threads); the documents must be the same.
  const std::string path = std::string(KINDRED_SOURCE_DIR) + "/sample_corpus/crawl/harbour.warc.gz";
  const ReadResult plain = ReadAll(path);
  REQUIRE(plain.status.ok());
  auto reader = CorpusReader::Open({path}, InputOptions());
  REQUIRE(reader.ok());
  (*reader)->DeferParsing();
  LineParser parser((*reader)->options());
  std::vector<Document> batch, docs;
  int deferred = 0;
  for (;;) {
    auto n = (*reader)->ReadBatch(&batch, 3, 1 << 30);
    REQUIRE(n.ok());
    if (*n == 0) break;
    for (Document& doc : batch) {
      deferred += doc.unparsed_html;
      REQUIRE(parser.Finish(&doc).ok());
      CHECK_FALSE(doc.unparsed);
      docs.push_back(doc);
    }
  }
  CHECK(deferred >= 5);
  REQUIRE(docs.size() == plain.docs.size());
  for (size_t i = 0; i < docs.size(); ++i) {
    CHECK(docs[i].id == plain.docs[i].id);
    CHECK(docs[i].text == plain.docs[i].text);
    CHECK(docs[i].invalid_utf8 == plain.docs[i].invalid_utf8);
  }
  CHECK((*reader)->RecordCounts() == plain.counts);
}

TEST_CASE("pages that could nest too deeply are not parsed", "[warc]") {
  std::string deep;
  for (int i = 0; i < io::kMaxOpenElements + 1; ++i) deep += "<div>";
  std::string text = "left over";
  CHECK(io::HtmlToText(deep + "x", &text).code() == absl::StatusCode::kFailedPrecondition);
  CHECK(text.empty());
  CHECK(io::OpenElementBound(deep) == io::kMaxOpenElements + 1);
  // Elements whose end tags may be left out, and void elements, do not count.
  std::string flat;
  for (int i = 0; i < 20000; ++i) flat += "<li><p>item<br><img src=x><td>";
  CHECK(io::OpenElementBound(flat) == 0);
  CHECK(io::OpenElementBound("<div><span></span><b>x</b></div><div>") == 2);
  std::string nested;
  for (int i = 0; i < 5000; ++i) nested += "<div>";
  CHECK(Html(nested + "ok") == "ok");  // deep, but under the guard: parsed
}

TEST_CASE("WARC records become documents with their URIs as ids", "[warc]") {
  TempDir dir;
  std::string warc =
      Record("warcinfo", "", "software: test\r\n", "Content-Type: application/warc-fields\r\n") +
      Record("request", "http://a.test/", "GET / HTTP/1.1\r\n\r\n") +
      Response("<http://a.test/>", Http("200 OK", "Content-Type: text/html\r\n", "<p>caf\xE9</p>"),
               "WARC-Payload-Digest: sha1:AAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAA\r\n") +
      Response("http://a.test/404", Http("404 Not Found", "Content-Type: text/html\r\n", "gone")) +
      Response("http://a.test/img", Http("200 OK", "Content-Type: image/png\r\n", "\x89PNG")) +
      Record("resource", "http://a.test/r.txt", "resource text", "Content-Type: text/plain\r\n",
             "WARC/1.0") +
      Record("conversion", "http://a.test/", "converted text", "Content-Type: text/plain\r\n") +
      "\r\n";
  std::string gz;  // one gzip member per record
  size_t at = 0;
  while (at < warc.size()) {
    size_t next = warc.find("WARC/1.", at + 1);
    if (next == std::string::npos) next = warc.size();
    gz += testing::GzipMember(warc.substr(at, next - at));
    at = next;
  }
  for (const std::string& path : {dir.Write("a.warc", warc), dir.Write("b.bin", gz)}) {
    ReadResult read = ReadAll(path);
    REQUIRE(read.status.ok());
    REQUIRE(read.docs.size() == 3);
    CHECK(read.docs[0].id == "http://a.test/");
    CHECK(read.docs[0].text == "\n\n\ncaf\xEF\xBF\xBD\n\n\n");  // no charset: UTF-8
    CHECK(read.docs[0].invalid_utf8 == 1);
    CHECK(read.docs[1].id == "http://a.test/r.txt");
    CHECK(read.docs[1].text == "resource text");
    CHECK(read.docs[2].text == "converted text");
    CHECK(read.counts["warcinfo record"] == 1);
    CHECK(read.counts["request record"] == 1);
    CHECK(read.counts["HTTP status 404"] == 1);
    CHECK(read.counts["response of type image/png"] == 1);
    CHECK(read.counts["payload digest mismatch (counted, still read)"] == 1);
  }
  InputOptions by_record;
  by_record.warc.id_source = WarcIdSource::kRecordId;
  ReadResult read = ReadAll(dir.Write("c.warc", warc), by_record);
  REQUIRE(read.docs.size() == 3);
  CHECK(read.docs[0].id.rfind("<urn:uuid:", 0) == 0);
  InputOptions strict;
  strict.warc.strict = true;
  read = ReadAll(dir.Write("d.warc", warc), strict);
  CHECK(read.status.code() == absl::StatusCode::kInvalidArgument);
  CHECK(absl::StrContains(read.status.message(), "Payload-Digest"));
  InputOptions any;
  any.warc.any_status = true;
  CHECK(ReadAll(dir.Write("e.warc", warc), any).docs.size() == 4);
}

TEST_CASE("malformed WARC input names the file and the record's offset", "[warc]") {
  TempDir dir;
  const std::string good =
      Record("resource", "http://a.test/", "hello", "Content-Type: text/plain\r\n");
  const std::string offset = absl::StrCat("record at byte ", good.size());
  std::string wrong_length =
      good + Record("resource", "http://b.test/", "hello world", "Content-Type: text/plain\r\n");
  wrong_length.replace(wrong_length.rfind("Content-Length: 11"), 18, "Content-Length: 10");
  std::string truncated = good + Record("resource", "http://b.test/", "hello world");
  truncated.resize(truncated.size() - 8);
  std::string not_warc = good + "HTTP/1.1 200 OK\r\n\r\n";
  std::string long_line = good + "WARC/1.1\r\nWARC-Type: " + std::string(10 << 20, 'x') + "\r\n";
  for (const std::string& bad : {wrong_length, truncated, not_warc, long_line}) {
    ReadResult read = ReadAll(dir.Write("bad.warc", bad));
    INFO(read.status.message());
    CHECK_FALSE(read.status.ok());
    CHECK(absl::StrContains(read.status.message(), "bad.warc: " + offset));
  }
  InputOptions forced;
  forced.format = InputFormat::kWarc;
  ReadResult read = ReadAll(dir.Write("plain.txt", "just text"), forced);
  INFO(read.status.message());
  CHECK(absl::StrContains(read.status.message(), "plain.txt: record at byte 0: expected a WARC"));
  // Not forced: a text file stays one text document.
  CHECK(ReadAll(dir.Write("plain2.txt", "just text")).docs.size() == 1);
}

// A gzip member whose header carries a header CRC (FHCRC, RFC 1952 2.3.1),
// which the whole-member path leaves to zlib.
std::string WithHeaderCrc(const std::string& member) {
  std::string header = member.substr(0, 10);
  header[3] = static_cast<char>(header[3] | 0x02);
  const uLong crc = crc32(0, reinterpret_cast<const Bytef*>(header.data()), 10);
  header += static_cast<char>(crc & 0xff);
  header += static_cast<char>((crc >> 8) & 0xff);
  return header + member.substr(10);
}

// Members decoded whole (libdeflate) and streamed (zlib: a header CRC, a
// member larger than the whole-member limit, one longer than a read
// buffer) give the same bytes, and each member's start is found again.
TEST_CASE("gzip members: same bytes whole or streamed, and their offsets", "[warc]") {
  std::string expected, file;
  std::vector<std::pair<uint64_t, uint64_t>> starts;  // (decoded, raw)
  std::string noise;
  uint32_t x = 1;
  for (int i = 0; i < 300000; ++i) noise += static_cast<char>((x = x * 1103515245 + 12345) >> 24);
  for (int i = 0; i < 120; ++i) {
    std::string data = absl::StrCat("record ", i, " ", std::string(i * 37 % 5000, 'a' + i % 26));
    std::string member = testing::GzipMember(data);
    if (i == 7) member = WithHeaderCrc(member);
    if (i == 50 || i == 90) {
      data = i == 50 ? noise : std::string(io::kWholeMemberOutput + 1, 'z');
      member = testing::GzipMember(data);
    }
    starts.emplace_back(expected.size(), file.size());
    expected += data;
    file += member;
  }
  TempDir dir;
  const std::string path = dir.Write("members.gz", file);
  auto stream = io::OpenDecoded(path, io::DecodeOptions());
  REQUIRE(stream.ok());
  std::string got;
  std::vector<char> buffer(7777);
  for (;;) {
    auto n = (*stream)->Read(buffer.data(), buffer.size());
    REQUIRE(n.ok());
    if (*n == 0) break;
    got.append(buffer.data(), *n);
  }
  CHECK(got.size() == expected.size());
  CHECK(got == expected);
  // Asked in increasing order, as a reader asks; the last 4,096 members
  // are remembered.
  for (const auto& [decoded, raw] : starts) {
    CHECK((*stream)->RawOffsetOf(decoded) == raw);
    CHECK((*stream)->RawOffsetOf(decoded + 1) == io::kNoRawOffset);
  }
}

// The second reading finds a record by the offset of its gzip member, or
// of the record in a plain file, and makes the same document there.
TEST_CASE("WARC documents are found again at their member or record offsets", "[warc]") {
  TempDir dir;
  const std::vector<std::string> records = {
      Record("warcinfo", "", "software: test\r\n", "Content-Type: application/warc-fields\r\n"),
      Response("http://a.test/1", Http("200 OK", "Content-Type: text/html\r\n", "<p>one</p>")),
      Record("request", "http://a.test/2", "GET /2 HTTP/1.1\r\n\r\n"),
      Response("http://a.test/2", Http("200 OK", "Content-Type: text/html\r\n", "<b>two</b>")),
      Record("resource", "http://a.test/3", "three", "Content-Type: text/plain\r\n")};
  std::string plain, gz, shared;  // shared: the last two records in one member
  std::vector<uint64_t> plain_at, gz_at;
  for (size_t i = 0; i < records.size(); ++i) {
    plain_at.push_back(plain.size());
    gz_at.push_back(gz.size());
    plain += records[i];
    gz += testing::GzipMember(records[i]);
    if (i < 3) shared += testing::GzipMember(records[i]);
  }
  shared += testing::GzipMember(records[3] + records[4]);
  struct Case {
    std::string path;
    std::vector<uint64_t> offsets;  // of documents 1, 3 and 4
  };
  const uint64_t unknown = kUnknownOffset;
  for (const Case& c : {Case{dir.Write("p.warc", plain), {plain_at[1], plain_at[3], plain_at[4]}},
                        Case{dir.Write("g.warc.gz", gz), {gz_at[1], gz_at[3], gz_at[4]}},
                        Case{dir.Write("s.warc.gz", shared), {gz_at[1], gz_at[3], unknown}}}) {
    INFO(c.path);
    ReadResult read = ReadAll(c.path);
    REQUIRE(read.status.ok());
    REQUIRE(read.docs.size() == 3);
    LineParser parser{InputOptions()};
    for (size_t i = 0; i < 3; ++i) {
      CHECK(read.docs[i].source.offset == c.offsets[i]);
      if (c.offsets[i] == unknown) continue;
      Document again;
      REQUIRE(io::ReadWarcDocumentAt(c.path, c.offsets[i], InputOptions(), &again).ok());
      REQUIRE(parser.Finish(&again).ok());
      CHECK(again.id == read.docs[i].id);
      CHECK(again.text == read.docs[i].text);
    }
    // Where no document record starts, the file changed.
    Document none;
    absl::Status changed = io::ReadWarcDocumentAt(c.path, c.offsets[0] + 1, InputOptions(), &none);
    CHECK(changed.code() == absl::StatusCode::kInvalidArgument);
    CHECK(absl::StrContains(changed.message(), "no document record at byte"));
  }
  // A WARC file inside a tree is no input of its own: no offsets.
  dir.Write("t/g.warc.gz", gz);
  ReadResult tree = ReadAll(dir.File("t"));
  REQUIRE(tree.docs.size() == 3);
  CHECK(tree.docs[0].source.offset == unknown);
}

}  // namespace
}  // namespace kindred
