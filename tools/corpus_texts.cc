// kindred_texts: prints documents as kindred reads them, for tests and
// benchmarks of crawl archive reading.
//
//   kindred_texts INPUT...          JSON Lines {"id": ..., "text": ...} of
//   every
//                                   document of the inputs (any format kindred
//                                   reads; WARC records become their texts)
//   kindred_texts --html FILE...    the text of each HTML file (charset from a
//                                   BOM or <meta>, else UTF-8), one JSON line
//                                   {"id": FILE, "text": ...} each
//   kindred_texts --html-check FILE...
//                                   the fast HTML path against the reference
//                                   parser on each file: prints "declined",
//                                   "same text", "same words" or "DIFFER"
//                                   (with both texts) per file, then counts;
//                                   exits 1 if any differ in words
//   kindred_texts --html-speed FILE [ROUNDS]
//                                   HTML to text of the pages of FILE (a
//                                   JSON Lines file of {"html": ...}) in
//                                   memory: prints MB/s of HTML
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <fstream>
#include <iostream>
#include <sstream>
#include <string>
#include <vector>

#include "io/html_fast_text.h"
#include "io/html_text.h"
#include "io/warc_documents.h"
#include "kindred/corpus.h"
#include "kindred/text.h"
#include "simdjson.h"

namespace {

void PrintJsonString(const std::string& s) {
  std::string out = "\"";
  for (unsigned char c : s) {
    if (c == '"' || c == '\\') {
      out += '\\';
      out += static_cast<char>(c);
    } else if (c < 0x20) {
      char buffer[8];
      std::snprintf(buffer, sizeof(buffer), "\\u%04x", c);
      out += buffer;
    } else {
      out += static_cast<char>(c);
    }
  }
  out += '"';
  std::fwrite(out.data(), 1, out.size(), stdout);
}

void PrintDocument(const std::string& id, const std::string& text) {
  std::fputs("{\"id\":", stdout);
  PrintJsonString(id);
  std::fputs(",\"text\":", stdout);
  PrintJsonString(text);
  std::fputs("}\n", stdout);
}

std::string ReadFile(const char* path) {
  std::ifstream in(path, std::ios::binary);
  std::stringstream buffer;
  buffer << in.rdbuf();
  return buffer.str();
}

int HtmlFiles(int argc, char** argv) {
  std::string scratch, text;
  for (int i = 2; i < argc; ++i) {
    uint32_t replaced = 0;
    absl::Status s =
        kindred::io::PayloadText(ReadFile(argv[i]), "", true, &scratch, &text, &replaced);
    if (!s.ok()) {
      std::fprintf(stderr, "%s: %s\n", argv[i], std::string(s.message()).c_str());
      return 3;
    }
    PrintDocument(argv[i], text);
  }
  return 0;
}

std::vector<std::string> Words(const std::string& text) {
  std::vector<std::string> words;
  auto tokens = kindred::TokenizeWithSpans(text);
  if (tokens.ok()) {
    for (const kindred::Token& token : *tokens) words.push_back(token.text);
  }
  return words;
}

int HtmlCheck(int argc, char** argv) {
  int declined = 0, same_text = 0, same_words = 0, differ = 0;
  std::string scratch, unused, fast, reference;
  for (int i = 2; i < argc; ++i) {
    uint32_t replaced = 0;
    // The page as HtmlToText sees it: charset chosen and converted.
    (void)kindred::io::PayloadText(ReadFile(argv[i]), "", false, &scratch, &unused, &replaced);
    const std::string html = unused;
    const char* reason = nullptr;
    if (!kindred::io::FastHtmlToText(html, &fast, &reason)) {
      ++declined;
      std::printf("declined %s: %s\n", argv[i], reason);
      continue;
    }
    (void)kindred::io::ReferenceHtmlToText(html, &reference);
    if (fast == reference) {
      ++same_text;
      std::printf("same text %s\n", argv[i]);
    } else if (Words(fast) == Words(reference)) {
      ++same_words;
      std::printf("same words %s\n", argv[i]);
    } else {
      ++differ;
      std::printf("DIFFER %s\n  fast: ", argv[i]);
      PrintJsonString(fast);
      std::printf("\n  reference: ");
      PrintJsonString(reference);
      std::printf("\n");
    }
  }
  std::printf("%d files: %d declined, %d same text, %d same words only, %d differ\n", argc - 2,
              declined, same_text, same_words, differ);
  return differ == 0 ? 0 : 1;
}

// Median seconds of `rounds` runs of `work`.
template <typename Work>
double MedianSeconds(int rounds, Work work) {
  std::vector<double> times;
  for (int round = 0; round < rounds; ++round) {
    const auto start = std::chrono::steady_clock::now();
    work();
    times.push_back(
        std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count());
  }
  std::sort(times.begin(), times.end());
  return times[times.size() / 2];
}

int HtmlSpeed(const char* path, int rounds) {
  std::vector<std::string> pages;
  simdjson::ondemand::parser parser;
  std::ifstream in(path, std::ios::binary);
  std::string line;
  size_t bytes = 0;
  while (std::getline(in, line)) {
    simdjson::padded_string padded(line);
    std::string_view html;
    simdjson::ondemand::document doc;
    if (parser.iterate(padded).get(doc) || doc["html"].get_string().get(html)) continue;
    pages.emplace_back(html);
    bytes += html.size();
  }
  std::string scratch, text;
  size_t declined = 0;
  for (const std::string& page : pages) declined += !kindred::io::FastHtmlToText(page, &text);
  const double mb = bytes / 1e6;
  std::printf("%zu pages, %.1f MB of HTML (UTF-8), median of %d runs:\n", pages.size(), mb, rounds);
  const double both = MedianSeconds(rounds, [&] {
    for (const std::string& page : pages) (void)kindred::io::HtmlToText(page, &text);
  });
  std::printf(
      "  HTML to text, fast path (Gumbo for declined pages): %.3f s, %.1f MB/s; "
      "%zu of %zu pages declined (%.2f%%)\n",
      both, mb / both, declined, pages.size(), 100.0 * declined / pages.size());
  const double reference = MedianSeconds(rounds, [&] {
    for (const std::string& page : pages) (void)kindred::io::ReferenceHtmlToText(page, &text);
  });
  std::printf("  HTML to text, reference parser (Gumbo) alone: %.3f s, %.1f MB/s\n", reference,
              mb / reference);
  const double payload = MedianSeconds(rounds, [&] {
    for (const std::string& page : pages) {
      uint32_t replaced = 0;
      (void)kindred::io::PayloadText(page, "utf-8", true, &scratch, &text, &replaced);
    }
  });
  std::printf("  charset conversion + HTML to text, as a crawl is read: %.3f s, %.1f MB/s\n",
              payload, mb / payload);
  return 0;
}

}  // namespace

int main(int argc, char** argv) {
  if (argc < 2) {
    std::fprintf(stderr, "usage: kindred_texts INPUT... | --html FILE... | --html-speed FILE\n");
    return 2;
  }
  if (std::string(argv[1]) == "--html") return HtmlFiles(argc, argv);
  if (std::string(argv[1]) == "--html-check") return HtmlCheck(argc, argv);
  if (std::string(argv[1]) == "--html-speed" && argc >= 3) {
    return HtmlSpeed(argv[2], argc >= 4 ? std::atoi(argv[3]) : 3);
  }
  std::vector<std::string> inputs(argv + 1, argv + argc);
  auto reader = kindred::CorpusReader::Open(inputs, kindred::InputOptions());
  if (!reader.ok()) {
    std::fprintf(stderr, "kindred_texts: %s\n", std::string(reader.status().message()).c_str());
    return 3;
  }
  std::vector<kindred::Document> batch;
  for (;;) {
    auto n = (*reader)->ReadBatch(&batch, 256, 16 << 20);
    if (!n.ok()) {
      std::fprintf(stderr, "kindred_texts: %s\n", std::string(n.status().message()).c_str());
      return 3;
    }
    if (*n == 0) break;
    for (const kindred::Document& doc : batch) PrintDocument(doc.id, doc.text);
  }
  for (const auto& [reason, count] : (*reader)->RecordCounts()) {
    std::fprintf(stderr, "%s: %llu\n", reason.c_str(), static_cast<unsigned long long>(count));
  }
  const kindred::io::HtmlPathCounts paths = kindred::io::HtmlTextPaths();
  std::fprintf(stderr, "HTML pages: %llu by the fast path, %llu left to the reference parser\n",
               static_cast<unsigned long long>(paths.fast),
               static_cast<unsigned long long>(paths.reference));
  return 0;
}
