// Tests of the fast HTML-to-text path: it must give the reference
// parser's word tokens (Gumbo 0.10.1, Debian libgumbo-dev, through
// io::ReferenceHtmlToText) on every page it accepts. Checked on generated
// pages (seeded random mixes of tags, character references, comments,
// scripts, tables, misnesting, NUL, CR, svg) and on the pages of the
// sample crawl; and on fixed cases of what it declines.
#include "io/html_fast_text.h"

#include <catch2/catch.hpp>
#include <cstdlib>
#include <memory>
#include <random>
#include <string>
#include <string_view>
#include <vector>

#include "absl/strings/str_cat.h"
#include "io/byte_stream.h"
#include "io/charset.h"
#include "io/html_scan.h"
#include "io/html_text.h"
#include "io/http_payload.h"
#include "io/warc_documents.h"
#include "kindred/text.h"

namespace kindred {
namespace {

std::vector<std::string> Words(const std::string& text) {
  auto tokens = TokenizeWithSpans(text);
  REQUIRE(tokens.ok());
  std::vector<std::string> words;
  for (const Token& token : *tokens) words.push_back(token.text);
  return words;
}

// Runs both paths on `html`; true when the fast path accepted it. The word
// tokens must then be the reference's.
bool SameAsReference(const std::string& html) {
  std::string fast, reference;
  if (!io::FastHtmlToText(html, &fast)) return false;
  REQUIRE(io::ReferenceHtmlToText(html, &reference).ok());
  INFO("page: " << html);
  INFO("fast: " << fast);
  INFO("reference: " << reference);
  CHECK(Words(fast) == Words(reference));
  return true;
}

// Pieces of pages: mostly what the fast path handles, some of what it
// declines, and words (ASCII, Latin, CJK, digits).
const std::string_view kPieces[] = {
    "<p>",
    "</p>",
    "<div>",
    "</div>",
    "<span>",
    "</span>",
    "<b>",
    "</b>",
    "<i>",
    "</i>",
    "<em>",
    "</em>",
    "<strong>",
    "</strong>",
    "<a href='/x'>",
    "</a>",
    "<a>",
    "<font color=red>",
    "</font>",
    "<nobr>",
    "</nobr>",
    "<u>",
    "</u>",
    "<ul>",
    "</ul>",
    "<ol>",
    "<li>",
    "</li>",
    "<dl>",
    "<dt>",
    "<dd>",
    "</dl>",
    "<h1>",
    "</h1>",
    "<h2>",
    "</h3>",
    "<br>",
    "</br>",
    "<hr>",
    "<img src=x alt='a>b'>",
    "<wbr>",
    "<input value=1>",
    "<pre>",
    "\n",
    "</pre>",
    "<listing>",
    "<textarea>",
    "</textarea>",
    "<title>",
    "</title>",
    "<script>",
    "</script>",
    "<script>if (a < b) { x = '<!--'; }</script>",
    "<!-- c -->",
    "<!-->",
    "<!--->",
    "<!-- a -- b --!>",
    "<style>p { }</style>",
    "<noscript>",
    "</noscript>",
    "<xmp>",
    "</xmp>",
    "<iframe>",
    "</iframe>",
    "<noembed>",
    "</noembed>",
    "<noframes>",
    "</noframes>",
    "<table>",
    "</table>",
    "<tr>",
    "</tr>",
    "<td>",
    "</td>",
    "<th>",
    "<tbody>",
    "</tbody>",
    "<thead>",
    "<col>",
    "<colgroup>",
    "</colgroup>",
    "<caption>",
    "<form>",
    "</form>",
    "<button>",
    "</button>",
    "<option>",
    "<optgroup>",
    "<select>",
    "<object>",
    "</object>",
    "<marquee>",
    "</marquee>",
    "<applet>",
    "<svg>",
    "</svg>",
    "<svg><path d=x/></svg>",
    "<svg><title>t</title><g>in</g></svg>",
    "<math><mi>x</mi></math>",
    "<math>",
    "</math>",
    "<![CDATA[x]]>",
    "<custom-el>",
    "</custom-el>",
    "<foo>",
    "</foo>",
    "<section>",
    "</section>",
    "<article>",
    "<main>",
    "<nav>",
    "<header>",
    "</header>",
    "<footer>",
    "<center>",
    "<address>",
    "<details>",
    "<summary>",
    "<figure>",
    "<dialog>",
    "<picture>",
    "<head>",
    "</head>",
    "<body>",
    "</body>",
    "<html>",
    "</html>",
    "<!DOCTYPE html>",
    "<meta charset=utf-8>",
    "<link rel=x>",
    "<base href=x>",
    "<template>",
    "<plaintext>",
    "<frameset>",
    "<rt>",
    "&amp;",
    "&lt;",
    "&gt",
    "&nbsp;",
    "&copy",
    "&eacute;",
    "&notit;",
    "&notin;",
    "&NotEqualTilde;",
    "&#65;",
    "&#x41",
    "&#0;",
    "&#x80;",
    "&#xD800;",
    "&#1;",
    "&#;",
    "&",
    "&xyz;",
    "&#10;",
    "<",
    "</",
    "</>",
    "<>",
    "< p>",
    "<p/>",
    "<1>",
    "<?php x ?>",
    "<!x>",
    "</ x>",
    std::string_view("\0", 1),
    "\r\n",
    "\r",
    "\t",
    "\f",
    "\x01",
    "\x7f",
    "\xc2\x85",
    "\xef\xb7\x90",
    "=",
    "\"",
    "'",
};
const char* const kWords[] = {"harbour", "tide", "ferry", "quay", "caf\xc3\xa9", "\xe6\xb8\xaf",
                              "42",      "3.14", "don't", "x",    "e.g.",        "\xc3\x9f"};

std::string RandomPage(std::mt19937& random) {
  std::string page;
  const int parts = std::uniform_int_distribution<int>(5, 80)(random);
  for (int i = 0; i < parts; ++i) {
    if (random() % 2 == 0) {
      page += kPieces[random() % (sizeof(kPieces) / sizeof(kPieces[0]))];
    } else {
      page += kWords[random() % (sizeof(kWords) / sizeof(kWords[0]))];
    }
    const int space = random() % 10;
    if (space < 5) page += ' ';
    if (space == 5) page += '\n';
  }
  return page;
}

// KINDRED_HTML_SEED and KINDRED_HTML_PAGES change the seed and the number
// of pages, for longer runs by hand.
TEST_CASE("the fast path gives the reference's words on generated pages", "[html]") {
  std::mt19937 random(std::getenv("KINDRED_HTML_SEED") ? std::atoi(std::getenv("KINDRED_HTML_SEED"))
                                                       : 14);
  int accepted = 0;
  const int kPages =
      std::getenv("KINDRED_HTML_PAGES") ? std::atoi(std::getenv("KINDRED_HTML_PAGES")) : 3000;
  for (int i = 0; i < kPages; ++i) accepted += SameAsReference(RandomPage(random));
  INFO(accepted << " of " << kPages << " pages took the fast path");
  CHECK(accepted >= kPages / 3);  // the comparison is not vacuous
}

TEST_CASE("the fast path gives the reference's words on the sample crawl", "[html]") {
  InputOptions options;
  auto stream =
      io::OpenDecoded(absl::StrCat(KINDRED_SOURCE_DIR, "/sample_corpus/crawl/harbour.warc.gz"), {});
  REQUIRE(stream.ok());
  io::WarcDocuments records(std::move(*stream), "harbour.warc.gz", options, nullptr);
  io::WarcRecord record;
  int pages = 0, accepted = 0;
  for (;;) {
    auto more = records.Next(&record);
    REQUIRE(more.ok());
    if (!*more) break;
    if (record.role.payload != io::RecordRole::Payload::kHtml) continue;
    auto head = io::ParseHttpHead(record.block);
    REQUIRE(head.ok());
    std::string body, html;
    REQUIRE(io::DecodeHttpBody(*head, absl::string_view(record.block).substr(head->body_offset),
                               1 << 24, &body)
                .ok());
    size_t bom = 0;
    const std::string encoding = io::ChooseEncoding(head->charset, body, true, &bom);
    uint32_t replaced = 0;
    REQUIRE(
        io::ConvertToUtf8(encoding, absl::string_view(body).substr(bom), &html, &replaced).ok());
    ++pages;
    accepted += SameAsReference(html);
  }
  CHECK(pages >= 5);
  CHECK(accepted == pages);  // invented pages of ordinary markup: all fast
}

TEST_CASE("exact texts of the fast path", "[html]") {
  auto text = [](const std::string& html) {
    std::string out;
    REQUIRE(io::FastHtmlToText(html, &out));
    std::string reference;
    REQUIRE(io::ReferenceHtmlToText(html, &reference).ok());
    CHECK(out == reference);
    return out;
  };
  CHECK(text("<p>a<b>b</b>c</p>") == "\n\n\nabc\n\n\n");
  CHECK(text("<form>f</form>b") == "\n\n\n\nfb\n\n");  // the reference puts f after the form
  CHECK(text("a<textarea>\nb</textarea>c") == "\n\nabc\n\n");
  CHECK(text("<p>&notit; &#x80; &#0;") == "\n\n\n\xc2\xacit; \xe2\x82\xac \xef\xbf\xbd\n\n\n");
  CHECK(text("a\x01"
             "b\r\nc") ==
        "\n\na\xef\xbf\xbd"
        "b\nc\n\n");
  CHECK(text("<b>1<p>2</b>3</p>") == "\n\n1\n23\n\n\n");  // a furthest block
  CHECK(text("<b>1<span>2<div>3</b>4</span>5</div>") == "\n\n12\n345\n\n\n");
  CHECK(text("<script>a<!--<script>x</script>y</script>z") == "\n\nz\n\n");
  CHECK(text("<body><noscript><!-- </noscript> -->x</noscript>y") == "\n\ny\n\n");
}

TEST_CASE("what the fast path leaves to the reference", "[html]") {
  const char* const declined[] = {
      "<table>stray text</table>",           // foster parenting
      "<table><p>x</table>",                 // foster parenting
      "<template>t</template>",              // template contents
      "<select><option>a</select>",          // select
      "<plaintext>x",                        // plaintext
      "<b>1<foo>2<div>3</b>4</foo>5</div>",  // the adoption agency moves foo's end
      "<svg><p>x</svg>",                     // a breakout from svg
      "<!DOCTYPE html PUBLIC \"-//W3C//DTD HTML 4.01//EN\"><p><table></table>",  // quirks
      "&amp; before the body",
      "<p>\xff</p>",  // not UTF-8
      // Numeric references past U+10FFFF: U+FFFD by the standard, but the
      // reference wraps the value in 32 bits (4294967361 = 2^32 + 65, "A").
      "<p>a &#1114112; b",
      "<p>&#4294967361;x",
      "<p>&#x1000000000041;",
      "<textarea>&#x110000;</textarea>",
      // An end tag with white space after its name in svg or math: the
      // reference compares "svg " with "svg" there and leaves svg open.
      "<svg></svg >s",
      "<math></math\r>s",
  };
  for (const char* html : declined) {
    std::string text;
    INFO(html);
    CHECK_FALSE(io::FastHtmlToText(html, &text));
    // HtmlToText still gives the reference's text, and counts the fallback.
    const uint64_t before = io::HtmlTextPaths().reference;
    std::string reference;
    REQUIRE(io::HtmlToText(html, &text).ok());
    REQUIRE(io::ReferenceHtmlToText(html, &reference).ok());
    CHECK(text == reference);
    CHECK(io::HtmlTextPaths().reference == before + 1);
  }
}

TEST_CASE("the text scanner finds every byte that needs attention", "[html]") {
  // Every byte value, at every position of a 40-byte run (past one SIMD
  // block), against the plain definition.
  for (int byte = 0; byte < 256; ++byte) {
    const bool special = byte == '<' || byte == '&' ||
                         (byte < 0x20 && byte != '\n' && byte != '\t') || byte == 0x7f ||
                         byte == 0xc2 || byte >= 0xef;
    for (size_t at = 0; at < 40; ++at) {
      std::string run(40, 'a');
      run[at] = static_cast<char>(byte);
      INFO("byte " << byte << " at " << at);
      CHECK(io::html_scan::FindTextSpecial(run, 0) == (special ? at : run.size()));
    }
  }
}

}  // namespace
}  // namespace kindred
