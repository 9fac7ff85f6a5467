// Tests of word and character shingles (kindred/shingles.h): hand-built
// examples, pinned hashes, the ASCII fast path against ICU, and an
// independent computation (tests/reference/shingle_reference.py, Python with
// PyICU and python3-xxhash) on generated and sample documents.
#include "kindred/shingles.h"

#include <unistd.h>

#include <algorithm>
#include <catch2/catch.hpp>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <map>
#include <memory>
#include <random>
#include <sstream>
#include <string>
#include <tuple>
#include <vector>

#include "kindred/settings.h"
#include "kindred/text.h"

namespace kindred {
namespace {

namespace fs = std::filesystem;

SignatureSettings Settings(ShingleMode mode, uint32_t k,
                           uint64_t seed = kDefaultSeed) {
  SignatureSettings settings;
  settings.mode = mode;
  settings.k = k;
  settings.seed = seed;
  return settings;
}

ShingleSet SetOf(std::string_view text, const SignatureSettings& settings,
                 bool ascii_fast_path = true, TextStats* stats = nullptr) {
  auto shingler = Shingler::Create(settings, ascii_fast_path);
  REQUIRE(shingler.ok());
  ShingleSet set;
  REQUIRE((*shingler)->Shingle(text, &set, stats).ok());
  return set;
}

std::vector<std::string> TextsOf(std::string_view text,
                                 const SignatureSettings& settings) {
  auto shingles = ShingleTexts(text, settings);
  REQUIRE(shingles.ok());
  std::vector<std::string> out;
  for (const ShingleText& s : *shingles) out.push_back(s.text);
  return out;
}

// The set the definition gives for these shingle strings.
ShingleSet HashAll(const std::vector<std::string>& shingles, uint64_t seed) {
  ShingleSet set;
  for (const std::string& s : shingles) set.push_back(HashShingle(s, seed));
  std::sort(set.begin(), set.end());
  set.erase(std::unique(set.begin(), set.end()), set.end());
  return set;
}

using Strings = std::vector<std::string>;

TEST_CASE("word shingles: windows of k kept tokens joined by one space") {
  const auto k3 = Settings(ShingleMode::kWord, 3);
  const std::string text = "The quick, brown fox -- jumps!";
  CHECK(TextsOf(text, k3) ==
        Strings{"the quick brown", "quick brown fox", "brown fox jumps"});
  CHECK(SetOf(text, k3) == HashAll(TextsOf(text, k3), kDefaultSeed));
  auto spans = ShingleTexts(text, k3);
  REQUIRE(spans.ok());
  CHECK((*spans)[0].begin == 0);
  CHECK((*spans)[0].end == 16);
  CHECK((*spans)[2].begin == 11);
  CHECK((*spans)[2].end == 29);
}

TEST_CASE("word shingles: k edge cases") {
  const auto k5 = Settings(ShingleMode::kWord, 5);
  // Fewer than k tokens: exactly one shingle, all tokens joined.
  CHECK(TextsOf("one, two; three.", k5) == Strings{"one two three"});
  CHECK(SetOf("one, two; three.", k5).size() == 1);
  // Exactly k tokens: one shingle.
  CHECK(TextsOf("a b c d e", k5) == Strings{"a b c d e"});
  // One token.
  CHECK(TextsOf("Word", k5) == Strings{"word"});
  // No tokens: no shingles, in both modes of emptiness.
  CHECK(SetOf("", k5).empty());
  CHECK(SetOf(" ... -- !! ", k5).empty());
  CHECK(SetOf(" ... -- !! ", k5, false).empty());
  // k = 1: each token; repeated tokens give one hash.
  const auto k1 = Settings(ShingleMode::kWord, 1);
  CHECK(TextsOf("to be or not to be", k1) ==
        Strings{"to", "be", "or", "not", "to", "be"});
  CHECK(SetOf("to be or not to be", k1).size() == 4);
}

TEST_CASE("char shingles: whitespace runs fold to one space, trimmed") {
  const auto k3 = Settings(ShingleMode::kChar, 3);
  CHECK(TextsOf("  Ab\t\n cD  ", k3) == Strings{"ab ", "b c", " cd"});
  auto spans = ShingleTexts("  Ab\t\n cD  ", k3);
  REQUIRE(spans.ok());
  CHECK((*spans)[0].begin == 2);
  CHECK((*spans)[0].end == 7);  // "Ab" and the whole run "\t\n "
  // Shorter than k: the whole text; empty or all-space: nothing.
  CHECK(TextsOf(" x y ", Settings(ShingleMode::kChar, 5)) == Strings{"x y"});
  CHECK(SetOf(" \t\r\n ", k3).empty());
  CHECK(SetOf("", k3).empty());
  // U+001C..U+001F are not White_Space (PropList.txt): they stay.
  CHECK(TextsOf("a\x1C\x1D\x1E\x1F"
                "b",
                k3) == Strings{"a\x1C\x1D", "\x1C\x1D\x1E", "\x1D\x1E\x1F",
                               "\x1E\x1F"
                               "b"});
  // U+0085 NEL, U+2028 LINE SEPARATOR and U+1680 OGHAM SPACE MARK are
  // White_Space; NFKC turns U+00A0 and U+3000 into U+0020 before folding.
  CHECK(TextsOf("a\xC2\x85\xE2\x80\xA8"
                "b\xE1\x9A\x80\xC2\xA0\xE3\x80\x80"
                "c",
                k3) == Strings{"a b", " b ", "b c"});
  // Code points, not bytes: "é" is one.
  CHECK(TextsOf("caf\xC3\xA9", k3) == Strings{"caf", "af\xC3\xA9"});
}

TEST_CASE("invalid bytes become U+FFFD and are counted") {
  TextStats stats;
  const auto k1 = Settings(ShingleMode::kWord, 1);
  const ShingleSet set = SetOf(
      "ab\xFF"
      "cd \xE2\x82 ef",
      k1, true, &stats);
  CHECK(stats.invalid_utf8 == 2);
  CHECK_FALSE(stats.ascii_path);
  CHECK(stats.tokens == 3);  // U+FFFD is not a word character
  CHECK(set == HashAll({"ab", "cd", "ef"}, kDefaultSeed));
  const auto k2 = Settings(ShingleMode::kChar, 2);
  CHECK(TextsOf("a\xC0", k2) == Strings{"a\xEF\xBF\xBD"});
  // NUL bytes are ordinary code points: not a word, not White_Space.
  CHECK(TextsOf(std::string("A\0B", 3), k1) == Strings{"a", "b"});
  CHECK(TextsOf(std::string("A\0B", 3), k2) ==
        (Strings{std::string("a\0", 2), std::string("\0b", 2)}));
}

TEST_CASE("Greek, Japanese and Spanish") {
  const auto k1 = Settings(ShingleMode::kWord, 1);
  // Casefolding maps final sigma to sigma and capitals to small letters.
  CHECK(TextsOf("\xCE\xA3\xCE\xBF\xCF\x86\xCF\x8C\xCF\x82 "  // Σοφός
                "\xCE\x9A\xCE\xB1\xCE\xBB\xCE\xB7\xCE\xBC\xCE\xAD\xCF\x81"
                "\xCE\xB1",  // Καλημέρα
                k1) ==
        Strings{"\xCF\x83\xCE\xBF\xCF\x86\xCF\x8C\xCF\x83",  // σοφόσ
                "\xCE\xBA\xCE\xB1\xCE\xBB\xCE\xB7\xCE\xBC\xCE\xAD\xCF\x81"
                "\xCE\xB1"});  // καλημέρα
  // Halfwidth katakana ｶﾀｶﾅ is compatibility-equivalent to カタカナ.
  const auto k3 = Settings(ShingleMode::kChar, 3);
  const std::string halfwidth =
      "\xEF\xBD\xB6\xEF\xBE\x80\xEF\xBD\xB6\xEF\xBE\x85";
  const std::string fullwidth =
      "\xE3\x82\xAB\xE3\x82\xBF\xE3\x82\xAB\xE3\x83\x8A";
  CHECK(SetOf(halfwidth, k3) == SetOf(fullwidth, k3));
  CHECK(SetOf(halfwidth, k1) == SetOf(fullwidth, k1));
  CHECK(TextsOf(fullwidth, k1) == Strings{fullwidth});
  // Spanish: inverted marks are punctuation; n + U+0303 composes to ñ.
  CHECK(TextsOf("\xC2\xBFQu\xC3\xA9 tal? \xC2\xA1Ma\xC3\xB1"
                "ana!",
                k1) == Strings{"qu\xC3\xA9", "tal",
                               "ma\xC3\xB1"
                               "ana"});
  CHECK(SetOf("Man\xCC\x83"
              "ana",
              k3) == SetOf("ma\xC3\xB1"
                           "ana",
                           k3));
}

TEST_CASE("stats count tokens and report the path taken") {
  TextStats stats;
  SetOf("one two three", Settings(ShingleMode::kWord, 2), true, &stats);
  CHECK(stats.tokens == 3);
  CHECK(stats.ascii_path);
  CHECK(stats.invalid_utf8 == 0);
  SetOf("one two three", Settings(ShingleMode::kWord, 2), false, &stats);
  CHECK_FALSE(stats.ascii_path);
  CHECK(stats.tokens == 3);
  SetOf(" a  b ", Settings(ShingleMode::kChar, 2), true, &stats);
  CHECK(stats.tokens == 3);  // "a b"
}

TEST_CASE("a bag holds every window in document order") {
  const std::string texts[] = {
      "one two three two three four one two three",
      "caf\xC3\xA9 au lait, caf\xC3\xA9 au lait \xE2\x80\x94 noir", "", "solo"};
  for (const std::string& text : texts) {
    for (auto mode : {ShingleMode::kWord, ShingleMode::kChar}) {
      const auto settings = Settings(mode, 2);
      INFO("text \"" << text << "\" mode " << ShingleModeName(mode));
      auto shingler = Shingler::Create(settings);
      REQUIRE(shingler.ok());
      std::vector<uint64_t> bag;
      REQUIRE((*shingler)->ShingleBag(text, &bag).ok());
      auto shingles = ShingleTexts(text, settings);
      REQUIRE(shingles.ok());
      std::vector<uint64_t> expected;
      for (const ShingleText& s : *shingles) {
        expected.push_back(HashShingle(s.text, kDefaultSeed));
      }
      CHECK(bag == expected);
      SortShingles(&bag);
      CHECK(bag == SetOf(text, settings));
    }
  }
}

TEST_CASE("SortShingles sorts and removes repeats, also for crowded buckets") {
  std::mt19937_64 random(5);  // sequence fixed by the C++ standard
  for (size_t n : {0, 1, 2, 31, 32, 33, 100, 1000, 5000, 70000, 300000}) {
    std::vector<uint64_t> bag;
    for (size_t i = 0; i < n; ++i) {
      const uint64_t r = random();
      // A third share their top 20 bits (one crowded bucket), a third are
      // repeats of earlier values.
      if (i % 3 == 0)
        bag.push_back(r >> 20);
      else if (i % 3 == 1 && !bag.empty())
        bag.push_back(bag[r % bag.size()]);
      else
        bag.push_back(r);
    }
    std::vector<uint64_t> expected = bag;
    std::sort(expected.begin(), expected.end());
    expected.erase(std::unique(expected.begin(), expected.end()),
                   expected.end());
    SortShingles(&bag);
    CHECK(bag == expected);
  }
}

TEST_CASE("invalid settings are refused") {
  SignatureSettings settings;
  settings.k = 0;
  CHECK(Shingler::Create(settings).status().code() ==
        absl::StatusCode::kInvalidArgument);
  CHECK(ShingleTexts("x", settings).status().code() ==
        absl::StatusCode::kInvalidArgument);
}

TEST_CASE("pinned hashes: stored shingle sets must not drift") {
  // Values from Python's xxhash package (Debian python3-xxhash 3.0.0),
  // xxhash.xxh3_64_intdigest(s.encode("utf-8"), 0x6b696e6472656431).
  CHECK(HashShingle("", kDefaultSeed) == 0x579a4f6cf7507a40ULL);
  CHECK(HashShingle("a", kDefaultSeed) == 0x9f563802007ce06fULL);
  CHECK(HashShingle("the quick brown fox jumps", kDefaultSeed) ==
        0x05a17d0be0543e28ULL);
  CHECK(HashShingle("\xCE\xBA\xCE\xB1\xCE\xBB\xCE\xB7\xCE\xBC\xCE\xAD\xCF\x81"
                    "\xCE\xB1 \xCE\xBA\xCF\x8C\xCF\x83\xCE\xBC\xCE\xB5",
                    kDefaultSeed) == 0xc9a04b0ec43da2bfULL);  // καλημέρα κόσμε
  CHECK(HashShingle("\xE6\x97\xA5\xE6\x9C\xAC\xE8\xAA\x9E", kDefaultSeed) ==
        0xde8097f0b01ae051ULL);  // 日本語
  CHECK(HashShingle("the quick brown fox jumps", 0) == 0x90602c70ee7f6208ULL);

  // Sets from tests/reference/shingle_reference.py (Python + PyICU +
  // xxhash) with the default seed.
  const std::string english =
      "The quick brown fox jumps over the lazy dog. The quick brown fox "
      "jumps again!";
  CHECK(SetOf(english, Settings(ShingleMode::kWord, 5)) ==
        ShingleSet{0x05a17d0be0543e28, 0x0fecadc33516f125, 0x251ef298040b4574,
                   0x5c35e365393d2e3e, 0x773f2add97f12958, 0x901fcfa4a3e041f3,
                   0x97363350840e0484, 0xc3a3be9ca8258407, 0xcfa6b639778052ab,
                   0xf7e7ff0d0890a88e});
  const std::string mixed =
      "\xCE\x9A\xCE\xB1\xCE\xBB\xCE\xB7\xCE\xBC\xCE\xAD\xCF\x81\xCE\xB1 "
      "\xCE\xBA\xCF\x8C\xCF\x83\xCE\xBC\xCE\xB5, \xC2\xA1Ma\xC3\xB1"
      "ana! \xE6\x97\xA5\xE6\x9C\xAC\xE8\xAA\x9E\xE3\x81\xA7\xE3\x81\x99";
  // "Καλημέρα κόσμε, ¡Mañana! 日本語です"
  CHECK(SetOf(mixed, Settings(ShingleMode::kWord, 3)) ==
        ShingleSet{0x31fda0a1cc510d12, 0x74cb0468692f267e, 0xf9d9be116ff65171});
}

TEST_CASE("the ASCII fast path gives ICU's shingle sets") {
  std::mt19937_64 random(7);  // sequence fixed by the C++ standard
  const std::string alphabet =
      "aaaabbbccdeeeeHIJ0123456789 .,;:'_\"@\t\r\n\v\f-!?()";
  const std::tuple<ShingleMode, uint32_t> cases[] = {{ShingleMode::kWord, 1},
                                                     {ShingleMode::kWord, 3},
                                                     {ShingleMode::kWord, 5},
                                                     {ShingleMode::kChar, 3},
                                                     {ShingleMode::kChar, 5}};
  for (int doc = 0; doc < 200; ++doc) {
    std::string text;
    const size_t length = random() % 300;
    for (size_t i = 0; i < length; ++i) {
      text += alphabet[random() % alphabet.size()];
    }
    for (const auto& [mode, k] : cases) {
      const auto settings = Settings(mode, k);
      INFO("text: \"" << text << "\" mode " << ShingleModeName(mode)
                      << " k=" << k);
      CHECK(SetOf(text, settings, true) == SetOf(text, settings, false));
    }
  }
}

TEST_CASE("mostly-ASCII documents: split path gives ICU's shingle sets") {
  // Documents that are ASCII except for scattered pieces chosen to interact
  // with their neighbours: combining marks and Format/ZWJ characters right
  // after a space (UAX #29 WB4 attaches them), U+2019 (MidNumLet, WB6/WB7),
  // Hebrew letters next to '"' (WB7b/WB7c), regional indicators (WB15/WB16),
  // ideographs and Thai (dictionary segmentation), NBSP and ideographic
  // space (NFKC maps them to U+0020), and ill-formed bytes.
  const std::vector<std::string> pieces = {
      "\xCC\x81",
      "\xCC\x88",
      "\xE2\x80\x8D",
      "\xC2\xAD",
      "\xE2\x80\x99",
      "\xD7\x90\"\xD7\x91",
      "\xD7\x90",
      "\xF0\x9F\x87\xAC\xF0\x9F\x87\xB7",
      "\xE6\xB8\xAF\xE3\x81\xAE",
      "\xE0\xB8\xA0\xE0\xB8\xB2\xE0\xB8\xA9\xE0\xB8\xB2",
      "\xC2\xA0",
      "\xE3\x80\x80",
      "\xFF",
      "\xE2\x82",
      "\xC3\xA9",
      "\xEF\xAC\x81",
      "\xF0\x9F\x98\x80\xE2\x80\x8D\xF0\x9F\x98\x80"};
  const std::string ascii = "ab Cd e1 2.5 x'y 3,4 _ __ a.b. \n \r\n:@q\t- ";
  std::mt19937_64 random(99);  // sequence fixed by the C++ standard
  for (int doc = 0; doc < 300; ++doc) {
    std::string text;
    const size_t parts = random() % 40;
    for (size_t i = 0; i < parts; ++i) {
      if (random() % 4 == 0) {
        text += pieces[random() % pieces.size()];
      } else {
        text += ascii[random() % ascii.size()];
      }
    }
    for (const auto& [mode, k] :
         {std::pair{ShingleMode::kWord, 1u}, std::pair{ShingleMode::kWord, 2u},
          std::pair{ShingleMode::kWord, 3u}, std::pair{ShingleMode::kWord, 5u},
          std::pair{ShingleMode::kChar, 2u},
          std::pair{ShingleMode::kChar, 5u}}) {
      const auto settings = Settings(mode, k);
      TextStats split_stats, icu_stats;
      INFO("text: \"" << text << "\" " << ShingleModeName(mode) << " k=" << k);
      CHECK(SetOf(text, settings, true, &split_stats) ==
            SetOf(text, settings, false, &icu_stats));
      CHECK(split_stats.tokens == icu_stats.tokens);
      CHECK(split_stats.invalid_utf8 == icu_stats.invalid_utf8);
    }
  }
}

TEST_CASE("arbitrary bytes: paths agree and spans stay inside the input") {
  std::mt19937_64 random(31337);  // sequence fixed by the C++ standard
  for (int doc = 0; doc < 200; ++doc) {
    std::string text;
    const size_t length = random() % 200;
    for (size_t i = 0; i < length; ++i) {
      const uint64_t r = random();
      // Half ASCII letters and spaces, half any byte at all.
      text += (r & 1) ? " aZ9.'\n"[(r >> 1) % 7] : static_cast<char>(r >> 8);
    }
    for (const auto& [mode, k] :
         {std::pair{ShingleMode::kWord, 1u}, std::pair{ShingleMode::kWord, 3u},
          std::pair{ShingleMode::kChar, 4u}}) {
      const auto settings = Settings(mode, k);
      INFO("document " << doc << " mode " << ShingleModeName(mode));
      TextStats fast, icu;
      const ShingleSet set = SetOf(text, settings, true, &fast);
      CHECK(set == SetOf(text, settings, false, &icu));
      CHECK(fast.invalid_utf8 == icu.invalid_utf8);
      CHECK(fast.tokens == icu.tokens);
      auto shingles = ShingleTexts(text, settings);
      REQUIRE(shingles.ok());
      Strings strings;
      for (const ShingleText& s : *shingles) {
        CHECK(s.begin < s.end);
        CHECK(s.end <= text.size());
        strings.push_back(s.text);
      }
      CHECK(HashAll(strings, kDefaultSeed) == set);
    }
  }
}

// ---------------------------------------------------------------------------
// The independent reference.

struct Reference {
  // (path, mode, k) -> sorted hashes, and replacement count per path.
  std::map<std::tuple<std::string, std::string, uint32_t>, ShingleSet> sets;
  std::map<std::string, uint32_t> invalid;
  // (mode, k, path a, path b) -> (|A n B|, |A u B|).
  std::map<std::tuple<std::string, uint32_t, std::string, std::string>,
           std::pair<uint64_t, uint64_t>>
      pairs;
};

ShingleSet ParseHashes(const std::string& field) {
  ShingleSet set;
  std::istringstream in(field);
  std::string hex;
  while (in >> hex) set.push_back(std::stoull(hex, nullptr, 16));
  return set;
}

Reference RunReference(const fs::path& dir, uint64_t seed, bool pairs) {
  const std::string command =
      std::string("/usr/bin/python3 ") + KINDRED_SOURCE_DIR +
      "/tests/reference/shingle_reference.py --seed " + std::to_string(seed) +
      (pairs ? " --pairs '" : " '") + dir.string() + "'";
  FILE* pipe = popen(command.c_str(), "r");
  REQUIRE(pipe != nullptr);
  std::string output;
  char buffer[1 << 16];
  size_t got;
  while ((got = fread(buffer, 1, sizeof(buffer), pipe)) > 0) {
    output.append(buffer, got);
  }
  REQUIRE(pclose(pipe) == 0);
  Reference ref;
  std::istringstream lines(output);
  std::string line;
  while (std::getline(lines, line)) {
    std::vector<std::string> f;
    std::istringstream fields(line);
    std::string field;
    while (std::getline(fields, field, '\t')) f.push_back(field);
    if (f.size() == 5) f.push_back("");  // a set with no hashes
    REQUIRE(f.size() >= 6);
    if (f[0] == "S") {
      const uint32_t k = std::stoul(f[3]);
      ref.sets[{f[1], f[2], k}] = ParseHashes(f[5]);
      ref.invalid[f[1]] = std::stoul(f[4]);
    } else {
      REQUIRE(f.size() == 7);
      ref.pairs[{f[1], std::stoul(f[2]), f[3], f[4]}] = {std::stoull(f[5]),
                                                         std::stoull(f[6])};
    }
  }
  return ref;
}

std::string ReadFile(const fs::path& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream out;
  out << in.rdbuf();
  return out.str();
}

std::pair<uint64_t, uint64_t> OverlapOf(const ShingleSet& a,
                                        const ShingleSet& b) {
  std::vector<uint64_t> common;
  std::set_intersection(a.begin(), a.end(), b.begin(), b.end(),
                        std::back_inserter(common));
  return {common.size(), a.size() + b.size() - common.size()};
}

constexpr std::tuple<ShingleMode, const char*, uint32_t> kReferenceCases[] = {
    {ShingleMode::kWord, "word", 1},
    {ShingleMode::kWord, "word", 3},
    {ShingleMode::kWord, "word", 5},
    {ShingleMode::kChar, "char", 3},
    {ShingleMode::kChar, "char", 5}};

// Checks every document under `dir` against the reference output; returns
// the computed sets keyed like the reference.
void CompareWithReference(const fs::path& dir,
                          const std::vector<std::string>& paths, uint64_t seed,
                          bool pairs) {
  const Reference ref = RunReference(dir, seed, pairs);
  for (const auto& [mode, name, k] : kReferenceCases) {
    const auto settings = Settings(mode, k, seed);
    std::map<std::string, ShingleSet> ours;
    for (const std::string& path : paths) {
      const std::string text = ReadFile(dir / path);
      INFO("document " << path << ", " << name << " k=" << k);
      TextStats stats;
      ours[path] = SetOf(text, settings, true, &stats);
      const auto found = ref.sets.find({path, name, k});
      REQUIRE(found != ref.sets.end());
      CHECK(ours[path] == found->second);
      CHECK(SetOf(text, settings, false) == found->second);
      auto texts = ShingleTexts(text, settings);
      REQUIRE(texts.ok());
      Strings strings;
      for (const ShingleText& s : *texts) strings.push_back(s.text);
      CHECK(HashAll(strings, seed) == found->second);
      CHECK(stats.invalid_utf8 == ref.invalid.at(path));
    }
    if (!pairs) continue;
    for (size_t i = 0; i < paths.size(); ++i) {
      for (size_t j = i + 1; j < paths.size(); ++j) {
        INFO("pair " << paths[i] << " " << paths[j] << ", " << name
                     << " k=" << k);
        const auto expected = ref.pairs.find({name, k, paths[i], paths[j]});
        REQUIRE(expected != ref.pairs.end());
        CHECK(OverlapOf(ours[paths[i]], ours[paths[j]]) == expected->second);
      }
    }
  }
}

// A temporary directory removed on destruction.
class TempDir {
 public:
  TempDir() {
    std::string pattern =
        (fs::temp_directory_path() / "kindred_shingles_XXXXXX").string();
    REQUIRE(mkdtemp(pattern.data()) != nullptr);
    path_ = pattern;
  }
  ~TempDir() { fs::remove_all(path_); }
  const fs::path& path() const { return path_; }

 private:
  fs::path path_;
};

// Hand-picked awkward documents.
std::vector<std::string> HandPickedDocuments() {
  return {
      "",
      "word",
      "   \t\r\n  ",
      "The Harbour Gazette, 3 March 2023: storm closes the pier.",
      "THE HARBOUR GAZETTE -- 3 March 2023 -- Storm closes the pier!",
      "e-mail: editor@gazette.example, tel. 555-0101; fax 555,0102.",
      "can't won't it's 3.14 1,000,000 a.b.c a..b _x_ __ _ x_1 1_x",
      std::string("nul\0inside\0text", 15),
      "bad \xFF\xFE bytes \xC3( \xE2\x82 \xF0\x9F\x98 end\xC0",
      "\xED\xA0\x80 surrogate \xF4\x90\x80\x80 too high",
      "\xCE\x97 "
      "\xCE\xBA\xCE\xB1\xCF\x84\xCE\xB1\xCE\xB9\xCE\xB3\xCE\xAF\xCE\xB4"
      "\xCE\xB1 \xCE\xAD\xCE\xBA\xCE\xBB\xCE\xB5\xCE\xB9\xCF\x83\xCE\xB5 \xCF"
      "\x84\xCE\xBF \xCE\xBB\xCE\xB9\xCE\xBC\xCE\xAC\xCE\xBD\xCE\xB9.",
      "\xE6\xB8\xAF\xE3\x81\xAE\xE6\xA1\x9F\xE6\xA9\x8B\xE3\x81\x8C\xE5\xB5\x90"
      "\xE3\x81\xA7\xE9\x96\x89\xE9\x8E\x96\xE3\x81\x95\xE3\x82\x8C\xE3\x81\xBE"
      "\xE3\x81\x97\xE3\x81\x9F\xE3\x80\x82\xEF\xBD\xB6\xEF\xBE\x80\xEF\xBD\xB6"
      "\xEF\xBE\x85 \xEF\xBC\xA1\xEF\xBC\xA2\xEF\xBC\xA3",
      "\xC2\xBF"
      "D\xC3\xB3nde est\xC3\xA1 el muelle? \xC2\xA1"
      "Ma\xC3\xB1"
      "ana "
      "cerrar\xC3\xA1n el puerto! Man\xCC\x83"
      "ana.",
      "Stra\xC3\x9F"
      "e \xEF\xAC\x81"
      "ne \xE2\x84\xAB \xC3\x85 \xE2\x91\xA0 "
      "\xC2\xBD \xE2\x80\x8B zero\xE2\x80\x8Bwidth \xC2\xAD soft\xC2\xAD"
      "hyphen",
      "a\x1C"
      "b\x1D"
      "c\x1E"
      "d\x1F"
      "e \xC2\x85 f\xE2\x80\xA8g\xC2\xA0h"
      "\xE3\x80\x80i\xE1\x9A\x80j",
      "emoji \xF0\x9F\x98\x80\xF0\x9F\x91\x8D\xF0\x9F\x8F\xBD \xF0\x9F\x87\xAC"
      "\xF0\x9F\x87\xB7 \xF0\x9D\x90\x80\xF0\x9D\x90\x81 \xE0\xB8\xA0\xE0\xB8"
      "\xB2\xE0\xB8\xA9\xE0\xB8\xB2\xE0\xB9\x84\xE0\xB8\x97\xE0\xB8\xA2",
  };
}

// Generated documents: sentences over a mixed vocabulary, with near
// duplicates (edited copies) so that pairwise overlaps are not all zero.
std::vector<std::string> GeneratedDocuments() {
  const std::vector<std::string> words = {
      "harbour",
      "Gazette",
      "storm",
      "pier",
      "council",
      "ferry",
      "3.5",
      "1,200",
      "O'Brien",
      "e-mail",
      "x_y",
      "fish",
      "market",
      "TIDE",
      "\xCE\xB8\xCE\xAC\xCE\xBB\xCE\xB1\xCF\x83\xCF\x83\xCE\xB1",  // θάλασσα
      "\xE6\xB8\xAF",                                              // 港
      "\xE3\x83\x95\xE3\x82\xA7\xE3\x83\xAA\xE3\x83\xBC",  // フェリー
      "ma\xC3\xB1"
      "ana",
      "caf\xC3\xA9",
      "na\xC3\xAFve",
      "\xEF\xAC\x81sh",
      "\xFF",
      "\xC3",
      std::string(1, '\0'),
      "\xE2\x80\x94"};
  const std::vector<std::string> gaps = {
      " ", "  ", ", ", ". ", "\n", "\t", " - ", "\xC2\xA0", "\xE3\x80\x80"};
  std::mt19937_64 random(42);  // sequence fixed by the C++ standard
  std::vector<std::string> docs;
  for (int d = 0; d < 24; ++d) {
    std::string doc;
    const size_t length = 1 + random() % 60;
    for (size_t i = 0; i < length; ++i) {
      const std::string& w = words[random() % words.size()];
      doc += w;
      doc += gaps[random() % gaps.size()];
    }
    docs.push_back(doc);
    std::string copy = doc;  // an edited copy: a few bytes changed
    for (int e = 0; e < 3 && !copy.empty(); ++e) {
      copy[random() % copy.size()] = "xyz!"[random() % 4];
    }
    docs.push_back(copy);
  }
  return docs;
}

TEST_CASE("shingle sets and overlaps equal the independent reference") {
  TempDir dir;
  std::vector<std::string> paths;
  auto add = [&](const std::string& text) {
    char name[32];
    std::snprintf(name, sizeof(name), "doc%03zu.txt", paths.size());
    std::ofstream(dir.path() / name, std::ios::binary) << text;
    paths.push_back(name);
  };
  for (const std::string& doc : HandPickedDocuments()) add(doc);
  for (const std::string& doc : GeneratedDocuments()) add(doc);
  CompareWithReference(dir.path(), paths, kDefaultSeed, true);
  CompareWithReference(dir.path(), paths, 12345, false);
}

TEST_CASE("sample corpus shingle sets equal the independent reference") {
  const fs::path root = fs::path(KINDRED_SOURCE_DIR) / "sample_corpus";
  std::vector<std::string> paths;
  if (fs::is_directory(root)) {
    for (const auto& entry : fs::recursive_directory_iterator(root)) {
      if (entry.is_regular_file() && !entry.is_symlink()) {
        paths.push_back(fs::relative(entry.path(), root).string());
      }
    }
  }
  std::sort(paths.begin(), paths.end());
  if (paths.empty()) {
    WARN("sample_corpus has no files yet; nothing compared");
    return;
  }
  WARN("comparing " << paths.size() << " sample_corpus files");
  CompareWithReference(root, paths, kDefaultSeed, false);
}

}  // namespace
}  // namespace kindred
