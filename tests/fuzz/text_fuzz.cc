// Fuzz target: UTF-8 decoding, NFKC_Casefold normalization, UAX #29
// segmentation and shingling of arbitrary bytes.
//
// Input: one control byte (bit 0: char shingles instead of words; bits 1-3:
// k - 1), then the document's bytes. Besides crashes and sanitizer reports,
// it checks properties that hold for every input:
//   - the ASCII fast path gives the same shingle set as ICU alone;
//   - a bag of shingles, sorted, is the shingle set;
//   - the shingles as text, hashed and deduplicated, are the shingle set;
//   - repaired UTF-8 is well-formed (repairing it again changes nothing) and
//     the repair count is the invalid_utf8 statistic;
//   - tokens of the automatic path equal ICU's, with spans inside the input.
#include <algorithm>
#include <array>
#include <cstddef>
#include <cstdint>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "fuzz_util.h"
#include "kindred/settings.h"
#include "kindred/shingles.h"
#include "kindred/text.h"

namespace kindred::fuzz {
namespace {

SignatureSettings SettingsFor(uint8_t control) {
  SignatureSettings settings;
  settings.mode = (control & 1) != 0 ? ShingleMode::kChar : ShingleMode::kWord;
  settings.k = 1 + ((control >> 1) & 7);
  return settings;
}

// One Shingler per (control bits, fast path), built on first use.
Shingler& ShinglerFor(uint8_t control, bool fast) {
  static std::array<std::unique_ptr<Shingler>, 32> shinglers;
  const size_t slot = ((control & 15u) << 1) | (fast ? 1u : 0u);
  if (shinglers[slot] == nullptr) {
    auto created = Shingler::Create(SettingsFor(control), fast);
    Require(created.ok(), "Shingler::Create succeeds for valid settings");
    shinglers[slot] = std::move(*created);
  }
  return *shinglers[slot];
}

void CheckShingles(uint8_t control, std::string_view text) {
  ShingleSet fast_set, icu_set;
  TextStats fast_stats, icu_stats;
  absl::Status fast = ShinglerFor(control, true).Shingle(text, &fast_set, &fast_stats);
  absl::Status icu = ShinglerFor(control, false).Shingle(text, &icu_set, &icu_stats);
  Require(fast.ok() && icu.ok(), "shingling a small document succeeds");
  Require(fast_set == icu_set, "ASCII fast path and ICU give the same shingle set");
  Require(std::is_sorted(fast_set.begin(), fast_set.end()) &&
              std::adjacent_find(fast_set.begin(), fast_set.end()) == fast_set.end(),
          "a shingle set is sorted and distinct");
  Require(fast_stats.invalid_utf8 == icu_stats.invalid_utf8, "both paths count the same repairs");

  std::vector<uint64_t> bag;
  Require(ShinglerFor(control, true).ShingleBag(text, &bag).ok(), "ShingleBag succeeds");
  SortShingles(&bag);
  Require(bag == fast_set, "a sorted bag is the shingle set");

  const SignatureSettings settings = SettingsFor(control);
  auto texts = ShingleTexts(text, settings);
  Require(texts.ok(), "ShingleTexts succeeds");
  std::vector<uint64_t> hashed;
  for (const ShingleText& shingle : *texts) {
    Require(shingle.begin <= shingle.end && shingle.end <= text.size(), "shingle span in input");
    hashed.push_back(HashShingle(shingle.text, settings.seed));
  }
  SortShingles(&hashed);
  Require(hashed == fast_set, "shingle texts hash to the shingle set");

  uint32_t replaced = 0;
  std::string repaired = RepairUtf8(text, &replaced);
  Require(replaced == fast_stats.invalid_utf8, "repair count is the invalid_utf8 statistic");
  uint32_t again = 0;
  Require(RepairUtf8(repaired, &again) == repaired && again == 0, "repaired UTF-8 is well-formed");
}

void CheckTokens(std::string_view text) {
  auto automatic = TokenizeWithSpans(text, TextPath::kAuto);
  auto icu = TokenizeWithSpans(text, TextPath::kIcu);
  Require(automatic.ok() && icu.ok(), "tokenizing a small document succeeds");
  Require(automatic->size() == icu->size(), "same token count on both paths");
  for (size_t i = 0; i < icu->size(); ++i) {
    const Token& a = (*automatic)[i];
    const Token& b = (*icu)[i];
    Require(a.text == b.text && a.begin == b.begin && a.end == b.end, "same tokens on both paths");
    Require(b.begin < b.end && b.end <= text.size(), "token span inside the input");
    Require(!b.text.empty(), "tokens are not empty");
  }
  auto normalized = NormalizeText(text);
  Require(normalized.ok(), "normalizing a small document succeeds");
  if (IsAscii(text)) {
    auto ascii = TokenizeWithSpans(text, TextPath::kAscii);
    Require(ascii.ok() && ascii->size() == icu->size(), "ASCII path on ASCII input");
  }
}

}  // namespace
}  // namespace kindred::fuzz

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  if (size == 0) return 0;
  const std::string_view text(reinterpret_cast<const char*>(data + 1), size - 1);
  kindred::fuzz::CheckShingles(data[0], text);
  kindred::fuzz::CheckTokens(text);
  return 0;
}
