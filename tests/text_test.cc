// Tests of the text pipeline (kindred/text.h): decoding with replacement,
// NFKC_Casefold and UAX #29 words, checked against the Unicode Standard's own
// test files and, for the ASCII fast path, against ICU by differential tests.
#include "kindred/text.h"

#include <stdlib.h>

#include <algorithm>
#include <catch2/catch.hpp>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <memory>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include "text/ascii_words.h"
#include "text/icu_words.h"
#include "unicode/brkiter.h"
#include "unicode/locid.h"
#include "unicode/normalizer2.h"
#include "unicode/uchar.h"
#include "unicode/unistr.h"

namespace kindred {
namespace {

// Unicode 15.0 data files from the Debian package unicode-data.
constexpr char kWordBreakTest[] =
    "/usr/share/unicode/auxiliary/WordBreakTest.txt";
constexpr char kNormalizationTest[] =
    "/usr/share/unicode/NormalizationTest.txt.bz2";

std::string ToUtf8(const icu::UnicodeString& text) {
  std::string out;
  text.toUTF8String(out);
  return out;
}

struct Span {
  uint32_t begin;
  uint32_t end;
  bool operator==(const Span&) const = default;
};

std::vector<Span> SpansOf(const std::vector<Token>& tokens) {
  std::vector<Span> spans;
  for (const Token& t : tokens) spans.push_back({t.begin, t.end});
  return spans;
}

// ICU's own segmentation of `text` (root word break iterator): all boundaries
// in UTF-16 units, and the kept segments (rule status >= 100) as UTF-8 byte
// spans.
struct IcuSegmentation {
  std::vector<int32_t> boundaries;
  std::vector<Span> kept;
};

IcuSegmentation SegmentWithIcu(const icu::UnicodeString& text) {
  UErrorCode status = U_ZERO_ERROR;
  std::unique_ptr<icu::BreakIterator> words(
      icu::BreakIterator::createWordInstance(icu::Locale::getRoot(), status));
  REQUIRE(U_SUCCESS(status));
  words->setText(text);
  IcuSegmentation out;
  int32_t begin = words->first();
  out.boundaries.push_back(begin);
  for (int32_t end = words->next(); end != icu::BreakIterator::DONE;
       begin = end, end = words->next()) {
    out.boundaries.push_back(end);
    if (words->getRuleStatus() >= UBRK_WORD_NONE_LIMIT) {
      const auto byte_begin = ToUtf8(text.tempSubString(0, begin)).size();
      const auto byte_end = ToUtf8(text.tempSubString(0, end)).size();
      out.kept.push_back(
          {static_cast<uint32_t>(byte_begin), static_cast<uint32_t>(byte_end)});
    }
  }
  return out;
}

// One line of WordBreakTest.txt: "÷ 0041 × 0308 ÷ 0020 ÷ # comment".
struct BreakCase {
  icu::UnicodeString text;
  std::vector<int32_t> boundaries;  // UTF-16 offsets of the ÷ marks
};

bool ParseBreakLine(const std::string& line, BreakCase* out) {
  const std::string body = line.substr(0, line.find('#'));
  std::istringstream in(body);
  std::string item;
  *out = BreakCase();
  bool any = false;
  while (in >> item) {
    if (item == "\xC3\xB7") {  // ÷
      out->boundaries.push_back(out->text.length());
    } else if (item != "\xC3\x97") {  // not ×: a code point
      out->text.append(static_cast<UChar32>(std::stoul(item, nullptr, 16)));
      any = true;
    }
  }
  return any;
}

bool IsAsciiText(const std::string& s) {
  for (unsigned char c : s) {
    if (c >= 0x80) return false;
  }
  return true;
}

TEST_CASE("word segmentation agrees with WordBreakTest.txt (Unicode 15.0)") {
  // Source: /usr/share/unicode/auxiliary/WordBreakTest.txt (Unicode 15.0,
  // Debian package unicode-data), the UAX #29 conformance test.
  std::ifstream file(kWordBreakTest);
  REQUIRE(file.good());
  UErrorCode status = U_ZERO_ERROR;
  const icu::Normalizer2* nfkc_cf =
      icu::Normalizer2::getNFKCCasefoldInstance(status);
  REQUIRE(U_SUCCESS(status));
  int lines = 0, icu_agrees = 0, checked_icu_path = 0, checked_ascii_path = 0;
  int colon_lines = 0;
  std::string line;
  BreakCase test;
  while (std::getline(file, line)) {
    if (!ParseBreakLine(line, &test)) continue;
    ++lines;
    const IcuSegmentation icu = SegmentWithIcu(test.text);
    if (icu.boundaries != test.boundaries) {
      // ICU's root rules follow the CLDR root tailoring, in which U+003A
      // COLON is not MidLetter; those lines are the only expected
      // disagreements.
      INFO("ICU disagrees with: " << line);
      CHECK(test.text.indexOf(static_cast<UChar32>(0x3A)) >= 0);
      ++colon_lines;
      continue;
    }
    ++icu_agrees;
    const std::string utf8 = ToUtf8(test.text);
    INFO("WordBreakTest line: " << line);
    // Normalization leaves the text (up to case) as it is only when the
    // casefolded text is already NFKC_Casefold; only then can its kept
    // segments be compared with the tokens.
    const bool ascii = IsAsciiText(utf8);
    if (ascii || nfkc_cf->isNormalized(test.text, status)) {
      auto tokens = TokenizeWithSpans(utf8, TextPath::kIcu);
      REQUIRE(tokens.ok());
      CHECK(SpansOf(*tokens) == icu.kept);
      ++checked_icu_path;
    }
    if (ascii) {
      auto tokens = TokenizeWithSpans(utf8, TextPath::kAscii);
      REQUIRE(tokens.ok());
      CHECK(SpansOf(*tokens) == icu.kept);
      ++checked_ascii_path;
    }
    // Every line: the token texts are ICU's kept segments of the whole
    // normalized text (the tokenizer normalizes piece by piece to keep
    // spans), and the spans are in order inside the line.
    icu::UnicodeString normalized;
    nfkc_cf->normalize(test.text, normalized, status);
    REQUIRE(U_SUCCESS(status));
    const IcuSegmentation expected = SegmentWithIcu(normalized);
    const std::string normalized_utf8 = ToUtf8(normalized);
    auto tokens = TokenizeWithSpans(utf8, TextPath::kIcu);
    REQUIRE(tokens.ok());
    REQUIRE(tokens->size() == expected.kept.size());
    uint32_t previous_end = 0;
    for (size_t i = 0; i < tokens->size(); ++i) {
      const Span& want = expected.kept[i];
      const Token& token = (*tokens)[i];
      CHECK(token.text ==
            normalized_utf8.substr(want.begin, want.end - want.begin));
      CHECK(previous_end <= token.begin);
      CHECK(token.begin < token.end);
      CHECK(token.end <= utf8.size());
      previous_end = token.end;
    }
  }
  WARN("WordBreakTest.txt: " << lines << " lines, ICU agrees on " << icu_agrees
                             << ", ICU path checked on " << checked_icu_path
                             << ", ASCII path on " << checked_ascii_path << ", "
                             << colon_lines
                             << " colon lines differ by ICU's tailoring");
  CHECK(lines > 1800);
  CHECK(icu_agrees + colon_lines == lines);
  CHECK(colon_lines < 20);
  CHECK(checked_icu_path > 1000);
  CHECK(checked_ascii_path > 50);
}

// NormalizationTest.txt line: five columns of code point lists.
bool ParseNormalizationLine(const std::string& line,
                            std::vector<icu::UnicodeString>* columns) {
  if (line.empty() || line[0] == '#' || line[0] == '@') return false;
  columns->clear();
  std::istringstream in(line.substr(0, line.find('#')));
  std::string field;
  while (columns->size() < 5 && std::getline(in, field, ';')) {
    icu::UnicodeString text;
    std::istringstream points(field);
    std::string hex;
    while (points >> hex) {
      text.append(static_cast<UChar32>(std::stoul(hex, nullptr, 16)));
    }
    columns->push_back(text);
  }
  return columns->size() == 5;
}

bool HasDefaultIgnorable(const icu::UnicodeString& text) {
  for (int32_t i = 0; i < text.length(); i = text.moveIndex32(i, 1)) {
    if (u_hasBinaryProperty(text.char32At(i),
                            UCHAR_DEFAULT_IGNORABLE_CODE_POINT)) {
      return true;
    }
  }
  return false;
}

TEST_CASE("normalization is NFKC_Casefold (NormalizationTest.txt)") {
  // Source: /usr/share/unicode/NormalizationTest.txt.bz2 (Unicode 15.0,
  // Debian package unicode-data), the UAX #15 conformance test. Columns:
  // c1 source, c2 NFC, c3 NFD, c4 NFKC, c5 NFKD. Invariants checked, by the
  // definition of toNFKC_Casefold (Unicode Standard 15.0, section 3.13,
  // "Default Case Folding"; recalled from memory), which works on the
  // compatibility decomposition of its input:
  //  (a) c1..c5 are compatibility-equivalent, so all five have one
  //      NFKC_Casefold form; except that ICU maps U+0345 COMBINING GREEK
  //      YPOGEGRAMMENI (combining class 240) to U+03B9 (class 0) without
  //      first putting the marks in canonical order, so lines holding U+0345
  //      may differ in where that iota lands and are left out of (a);
  //  (b) that form is in NFKC and is its own NFKC_Casefold (idempotent);
  //  (c) when c4 (the file's NFKC column) is unchanged by full case folding
  //      and has no Default_Ignorable_Code_Point, the form equals c4.
  // Also, on all five columns: normalizing piece by piece between
  // normalization boundaries (how the tokenizer keeps spans) gives the
  // normalization of the whole string.
  std::ifstream probe(kNormalizationTest);
  REQUIRE(probe.good());
  const std::string command = std::string("bzcat ") + kNormalizationTest;
  FILE* pipe = popen(command.c_str(), "r");
  REQUIRE(pipe != nullptr);
  UErrorCode status = U_ZERO_ERROR;
  const icu::Normalizer2* nfkc = icu::Normalizer2::getNFKCInstance(status);
  REQUIRE(U_SUCCESS(status));
  auto pieces = text_internal::IcuWords::Create();
  REQUIRE(pieces.ok());
  std::vector<icu::UnicodeString> columns;
  int lines = 0, against_c4 = 0, with_ypogegrammeni = 0;
  char buffer[4096];
  while (fgets(buffer, sizeof(buffer), pipe) != nullptr) {
    std::string line(buffer);
    if (!ParseNormalizationLine(line, &columns)) continue;
    ++lines;
    INFO("NormalizationTest line: " << line);
    auto form = NormalizeText(ToUtf8(columns[0]));
    REQUIRE(form.ok());
    const bool ypogegrammeni =
        columns[0].indexOf(static_cast<UChar32>(0x345)) >= 0 ||
        columns[2].indexOf(static_cast<UChar32>(0x345)) >= 0;
    with_ypogegrammeni += ypogegrammeni;
    for (int i = 1; i < 5 && !ypogegrammeni; ++i) {
      auto other = NormalizeText(ToUtf8(columns[i]));
      REQUIRE(other.ok());
      CHECK(*other == *form);  // (a)
    }
    for (int i = 0; i < 5; ++i) {  // piece by piece == whole
      const std::string input = ToUtf8(columns[i]);
      REQUIRE((*pieces)->NormalizeWithSpans(input).ok());
      CHECK(ToUtf8((*pieces)->normalized()) == *NormalizeText(input));
    }
    const icu::UnicodeString form16 = icu::UnicodeString::fromUTF8(*form);
    CHECK(nfkc->isNormalized(form16, status));  // (b)
    CHECK(*NormalizeText(*form) == *form);      // (b)
    icu::UnicodeString folded = columns[3];
    folded.foldCase();
    if (folded == columns[3] && !HasDefaultIgnorable(columns[3])) {
      CHECK(*form == ToUtf8(columns[3]));  // (c)
      ++against_c4;
    }
  }
  const int exit_status = pclose(pipe);
  CHECK(exit_status == 0);
  WARN("NormalizationTest.txt: " << lines << " lines, " << against_c4
                                 << " compared with the NFKC column, "
                                 << with_ypogegrammeni
                                 << " with U+0345 left out of (a)");
  CHECK(lines > 19000);
  CHECK(against_c4 > 10000);
  CHECK(with_ypogegrammeni < 100);
}

TEST_CASE("ill-formed UTF-8 becomes U+FFFD per maximal subpart") {
  // Source: the Unicode Standard, chapter 3 (section 3.9, "U+FFFD
  // Substitution of Maximal Subparts"), Table 3-8 example, recalled from
  // memory: 61 F1 80 80 E1 80 C2 62 80 63 80 BF 64 decodes to
  // a FFFD FFFD FFFD b FFFD c FFFD FFFD d. Python 3's
  // bytes.decode("utf-8", "replace") gives the same (checked by hand).
  const std::string bytes =
      "\x61\xF1\x80\x80\xE1\x80\xC2\x62\x80\x63\x80\xBF\x64";
  uint32_t replaced = 0;
  const std::string repaired = RepairUtf8(bytes, &replaced);
  CHECK(repaired ==
        "a\xEF\xBF\xBD\xEF\xBF\xBD\xEF\xBF\xBD"
        "b\xEF\xBF\xBD"
        "c\xEF\xBF\xBD\xEF\xBF\xBD"
        "d");
  CHECK(replaced == 6);
  TextStats stats;
  auto normalized = NormalizeText(bytes, &stats);
  REQUIRE(normalized.ok());
  CHECK(stats.invalid_utf8 == 6);
  CHECK(*normalized == repaired);
}

std::string Hex(const std::string& bytes) {
  static const char kDigits[] = "0123456789abcdef";
  std::string out;
  for (unsigned char c : bytes) {
    out += kDigits[c >> 4];
    out += kDigits[c & 15];
  }
  return out;
}

TEST_CASE("replacement decoding equals Python's on random bytes") {
  // Reference: Python 3's bytes.decode("utf-8", "replace"), run by
  // tests/reference/shingle_reference.py --repair on the same files.
  namespace fs = std::filesystem;
  std::string pattern =
      (fs::temp_directory_path() / "kindred_text_XXXXXX").string();
  REQUIRE(mkdtemp(pattern.data()) != nullptr);
  const fs::path dir = pattern;
  // Bytes drawn mostly from the lead and continuation ranges of Table 3-7.
  const unsigned char interesting[] = {0x00, 0x41, 0x7F, 0x80, 0x8F, 0x90, 0x9F,
                                       0xA0, 0xBF, 0xC0, 0xC1, 0xC2, 0xDF, 0xE0,
                                       0xE1, 0xEC, 0xED, 0xEE, 0xEF, 0xF0, 0xF1,
                                       0xF3, 0xF4, 0xF5, 0xF8, 0xFE, 0xFF};
  std::mt19937_64 random(2718);  // sequence fixed by the C++ standard
  std::vector<std::string> docs;
  for (int d = 0; d < 400; ++d) {
    std::string doc;
    const size_t length = random() % 24;
    for (size_t i = 0; i < length; ++i) {
      const uint64_t r = random();
      doc += static_cast<char>((r & 1)
                                   ? interesting[(r >> 1) % sizeof(interesting)]
                                   : static_cast<unsigned char>(r >> 8));
    }
    docs.push_back(doc);
    char name[16];
    std::snprintf(name, sizeof(name), "d%03d", d);
    std::ofstream(dir / name, std::ios::binary) << doc;
  }
  const std::string command =
      std::string("/usr/bin/python3 ") + KINDRED_SOURCE_DIR +
      "/tests/reference/shingle_reference.py --repair '" + dir.string() + "'";
  FILE* pipe = popen(command.c_str(), "r");
  REQUIRE(pipe != nullptr);
  std::string output;
  char buffer[4096];
  while (fgets(buffer, sizeof(buffer), pipe) != nullptr) output += buffer;
  CHECK(pclose(pipe) == 0);
  fs::remove_all(dir);
  std::istringstream lines(output);
  std::string line;
  int compared = 0;
  while (std::getline(lines, line)) {
    std::istringstream fields(line);
    std::string tag, name, count, hex;
    std::getline(fields, tag, '\t');
    std::getline(fields, name, '\t');
    std::getline(fields, count, '\t');
    std::getline(fields, hex, '\t');
    const std::string& doc = docs.at(std::stoi(name.substr(1)));
    uint32_t replaced = 0;
    const std::string repaired = RepairUtf8(doc, &replaced);
    INFO("input " << Hex(doc));
    CHECK(Hex(repaired) == hex);
    CHECK(replaced == std::stoul(count));
    TextStats stats;
    REQUIRE(NormalizeText(doc, &stats).ok());
    CHECK(stats.invalid_utf8 == replaced);
    ++compared;
  }
  CHECK(compared == 400);
}

TEST_CASE("surrogates, overlongs and out-of-range bytes are ill-formed") {
  // Table 3-7 of the Unicode Standard (well-formed byte sequences): ED A0 80
  // is a surrogate (3 replacements: ED is followed by a byte outside
  // 80..9F), C0 80 an overlong NUL (2: C0 is never a lead byte), F4 90 80 80
  // above U+10FFFF (4), F5 and FF never appear (1 each), and a truncated
  // sequence at the end is one replacement.
  struct Case {
    std::string bytes;
    uint32_t replaced;
  };
  const Case cases[] = {
      {"\xED\xA0\x80", 3},
      {"\xC0\x80", 2},
      {"\xF4\x90\x80\x80", 4},
      {"\xF5", 1},
      {"\xFF", 1},
      {"ab\xE2\x82", 1},
      {"\xF0\x9F\x98", 1},
      {"\xF0\x9F\x98\x80", 0},
      {std::string("a\0b", 3), 0},
  };
  for (const Case& c : cases) {
    uint32_t replaced = 99;
    RepairUtf8(c.bytes, &replaced);
    CHECK(replaced == c.replaced);
  }
  // A NUL byte is an ordinary code point and survives normalization.
  CHECK(*NormalizeText(std::string("A\0B", 3)) == std::string("a\0b", 3));
}

TEST_CASE("IsAscii looks at every byte") {
  std::string text(100, 'a');
  CHECK(IsAscii(text));
  CHECK(IsAscii(""));
  for (size_t at = 0; at < text.size(); ++at) {
    std::string changed = text;
    changed[at] = '\x80';
    CHECK_FALSE(IsAscii(changed));
  }
}

// Compares the ASCII fast path with ICU on `text`, naming the first
// difference.
void ExpectSameTokens(const std::string& text) {
  auto fast = TokenizeWithSpans(text, TextPath::kAscii);
  auto icu = TokenizeWithSpans(text, TextPath::kIcu);
  REQUIRE(fast.ok());
  REQUIRE(icu.ok());
  const size_t n = std::min(fast->size(), icu->size());
  for (size_t i = 0; i < n; ++i) {
    const Token& a = (*fast)[i];
    const Token& b = (*icu)[i];
    if (a.text != b.text || a.begin != b.begin || a.end != b.end) {
      const size_t from = std::min(a.begin, b.begin);
      const size_t at = from > 8 ? from - 8 : 0;
      FAIL("token " << i << " differs near byte " << from << ": fast \""
                    << a.text << "\" [" << a.begin << "," << a.end
                    << "), ICU \"" << b.text << "\" [" << b.begin << ","
                    << b.end << "), context \"" << text.substr(at, 24) << "\"");
    }
  }
  CHECK(fast->size() == icu->size());
}

// The block-wise ASCII scanner against the byte-at-a-time one (both in
// src/text/ascii_words.h), words and spans.
void ExpectScannersAgree(const std::string& text) {
  const auto* p = reinterpret_cast<const unsigned char*>(text.data());
  const size_t n = text.size();
  std::string out_a(n + 17, '\0'), out_b(n + 17, '\0');
  std::vector<uint32_t> words_a(n / 2 + 2), words_b(n / 2 + 2);
  std::vector<uint32_t> begin_a(n / 2 + 1), begin_b(n / 2 + 1);
  std::vector<uint32_t> end_a(n / 2 + 1), end_b(n / 2 + 1);
  const size_t count_a = text_internal::FoldAsciiWordsWithSpans(
      p, n, out_a.data(), words_a.data(), begin_a.data(), end_a.data());
  const size_t count_b = text_internal::FoldAsciiWordsScalar<true>(
      p, n, out_b.data(), words_b.data(), begin_b.data(), end_b.data());
  REQUIRE(count_a == count_b);
  const uint32_t length = words_a[count_a];
  REQUIRE(length == words_b[count_b]);
  CHECK(out_a.substr(0, length) == out_b.substr(0, length));
  words_a.resize(count_a + 1), words_b.resize(count_b + 1);
  begin_a.resize(count_a), begin_b.resize(count_b);
  end_a.resize(count_a), end_b.resize(count_b);
  CHECK(words_a == words_b);
  CHECK(begin_a == begin_b);
  CHECK(end_a == end_b);
}

TEST_CASE("ASCII fast path equals ICU on every 5-character string") {
  // Every string of length 5 over a reduced alphabet holding one member of
  // each ASCII word break class (UAX #29, WordBreakProperty.txt), both
  // letter cases and the two characters ICU's root rules treat differently
  // (':' and '@'), one string per line (LF always breaks on both sides, WB3a
  // and WB3b, so the strings are segmented independently), plus each string
  // of length up to 3 as a document of its own (start and end of text).
  const std::string alphabet = "aB1.,;:'_\"@ \r\n\f-";
  const size_t size = alphabet.size();
  std::string joined;
  size_t codes = 1;
  for (int i = 0; i < 5; ++i) codes *= size;
  joined.reserve(codes * 6);
  for (size_t code = 0; code < codes; ++code) {
    size_t rest = code;
    for (int i = 0; i < 5; ++i, rest /= size) joined += alphabet[rest % size];
    joined += '\n';
  }
  ExpectSameTokens(joined);
  ExpectScannersAgree(joined);
  for (size_t length = 1; length <= 3; ++length) {
    size_t count = 1;
    for (size_t i = 0; i < length; ++i) count *= size;
    for (size_t code = 0; code < count; ++code) {
      std::string text;
      size_t rest = code;
      for (size_t i = 0; i < length; ++i, rest /= size) {
        text += alphabet[rest % size];
      }
      ExpectSameTokens(text);
      ExpectScannersAgree(text);
    }
  }
}

TEST_CASE("ASCII fast path equals ICU on random ASCII text") {
  // Deterministic: std::mt19937_64's sequence is fixed by the C++ standard.
  std::mt19937_64 random(20240601);
  const std::string tricky = "aZ09.,;:'_\" \t\r\n\v\f-_..''::,,";
  std::string all_ascii;
  for (int c = 0; c < 128; ++c) all_ascii += static_cast<char>(c);
  for (int doc = 0; doc < 300; ++doc) {
    const size_t length = random() % 400;
    std::string text;
    for (size_t i = 0; i < length; ++i) {
      const uint64_t r = random();
      text += (r & 3) == 0 ? all_ascii[(r >> 2) % 128]
                           : tricky[(r >> 2) % tricky.size()];
    }
    ExpectSameTokens(text);
    ExpectScannersAgree(text);
    // Every length around the 64-byte blocks and the 16-byte copies.
    for (size_t cut = 0; cut < text.size() && cut < 140; ++cut) {
      ExpectScannersAgree(text.substr(0, cut));
      ExpectScannersAgree(text.substr(cut));
    }
  }
}

TEST_CASE("tokens carry normalized text and original spans") {
  // "ＡＢＣ" is fullwidth (NFKC maps it to "abc"), "ﬁne" starts with the fi
  // ligature U+FB01, "Straße" casefolds to "strasse".
  const std::string text =
      "\xEF\xBC\xA1\xEF\xBC\xA2\xEF\xBC\xA3 \xEF\xAC\x81ne, Stra\xC3\x9F"
      "e!";
  auto tokens = TokenizeWithSpans(text);
  REQUIRE(tokens.ok());
  REQUIRE(tokens->size() == 3);
  CHECK((*tokens)[0].text == "abc");
  CHECK((*tokens)[0].begin == 0);
  CHECK((*tokens)[0].end == 9);
  CHECK((*tokens)[1].text == "fine");
  CHECK((*tokens)[1].begin == 10);
  CHECK((*tokens)[1].end == 15);
  CHECK((*tokens)[2].text == "strasse");
  CHECK((*tokens)[2].begin == 17);
  CHECK((*tokens)[2].end == 24);
  CHECK(text.substr(17, 7) ==
        "Stra\xC3\x9F"
        "e");
}

TEST_CASE("the ASCII path refuses non-ASCII input") {
  auto tokens = TokenizeWithSpans("caf\xC3\xA9", TextPath::kAscii);
  CHECK(tokens.status().code() == absl::StatusCode::kInvalidArgument);
}

TEST_CASE("Unicode version string names Unicode 15.0 and ICU") {
  // The data files above are Unicode 15.0; so must the library be.
  const std::string version = UnicodeVersionString();
  CHECK(version.rfind("Unicode 15.0, ICU ", 0) == 0);
}

}  // namespace
}  // namespace kindred
