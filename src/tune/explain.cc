#include "kindred/explain.h"

#include <algorithm>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/str_cat.h"
#include "kindred/signer.h"
#include "kindred/verify.h"

namespace kindred {
namespace {

std::vector<uint64_t> HashSequence(absl::Span<const ShingleText> shingles, uint64_t seed) {
  std::vector<uint64_t> hashes;
  hashes.reserve(shingles.size());
  for (const ShingleText& shingle : shingles) hashes.push_back(HashShingle(shingle.text, seed));
  return hashes;
}

ShingleSet ToSet(std::vector<uint64_t> hashes) {
  std::sort(hashes.begin(), hashes.end());
  hashes.erase(std::unique(hashes.begin(), hashes.end()), hashes.end());
  return hashes;
}

// The byte range covered by shingles [first, last] of a sequence.
TextSpan RunSpan(absl::Span<const ShingleText> shingles, size_t first, size_t last) {
  TextSpan span{shingles[first].begin, shingles[first].end};
  for (size_t i = first + 1; i <= last; ++i) span.end = std::max(span.end, shingles[i].end);
  return span;
}

// Merges overlapping ranges of an ascending-by-begin list.
std::vector<TextSpan> MergeSpans(std::vector<TextSpan> spans) {
  std::sort(spans.begin(), spans.end(),
            [](const TextSpan& x, const TextSpan& y) { return x.begin < y.begin; });
  std::vector<TextSpan> merged;
  for (const TextSpan& span : spans) {
    if (!merged.empty() && span.begin < merged.back().end) {
      merged.back().end = std::max(merged.back().end, span.end);
    } else {
      merged.push_back(span);
    }
  }
  return merged;
}

}  // namespace

std::vector<TextSpan> SharedSpans(absl::Span<const ShingleText> shingles,
                                  absl::Span<const uint64_t> other, uint64_t seed) {
  std::vector<TextSpan> runs;
  size_t run_start = 0;
  bool in_run = false;
  for (size_t i = 0; i <= shingles.size(); ++i) {
    const bool shared =
        i < shingles.size() &&
        std::binary_search(other.begin(), other.end(), HashShingle(shingles[i].text, seed));
    if (shared && !in_run) run_start = i;
    if (!shared && in_run) runs.push_back(RunSpan(shingles, run_start, i - 1));
    in_run = shared;
  }
  return MergeSpans(std::move(runs));
}

std::vector<AlignedPassage> AlignPassages(absl::Span<const ShingleText> a,
                                          absl::Span<const ShingleText> b, uint64_t seed) {
  const std::vector<uint64_t> hash_a = HashSequence(a, seed);
  const std::vector<uint64_t> hash_b = HashSequence(b, seed);
  absl::flat_hash_map<uint64_t, size_t> first_in_b;
  for (size_t j = 0; j < hash_b.size(); ++j) first_in_b.emplace(hash_b[j], j);
  std::vector<AlignedPassage> passages;
  for (size_t i = 0; i < hash_a.size();) {
    auto anchor = first_in_b.find(hash_a[i]);
    if (anchor == first_in_b.end()) {
      ++i;
      continue;
    }
    const size_t j = anchor->second;
    size_t length = 1;
    while (i + length < hash_a.size() && j + length < hash_b.size() &&
           hash_a[i + length] == hash_b[j + length]) {
      ++length;
    }
    passages.push_back({RunSpan(a, i, i + length - 1), RunSpan(b, j, j + length - 1),
                        static_cast<uint32_t>(length)});
    i += length;
  }
  std::stable_sort(
      passages.begin(), passages.end(),
      [](const AlignedPassage& x, const AlignedPassage& y) { return x.shingles > y.shingles; });
  return passages;
}

void MeasureExplanation(absl::Span<const uint64_t> set_a, absl::Span<const uint64_t> set_b,
                        absl::Span<const uint32_t> signature_a,
                        absl::Span<const uint32_t> signature_b, Explanation* out) {
  out->measure = MeasureOverlap(set_a, set_b);
  out->measure.b = 1;
  out->measure.estimate = EstimateJaccard(signature_a, signature_b);
}

absl::StatusOr<Explanation> Explain(std::string_view text_a, std::string_view text_b,
                                    const SignatureSettings& settings) {
  absl::StatusOr<std::vector<ShingleText>> shingles_a = ShingleTexts(text_a, settings);
  if (!shingles_a.ok()) return shingles_a.status();
  absl::StatusOr<std::vector<ShingleText>> shingles_b = ShingleTexts(text_b, settings);
  if (!shingles_b.ok()) return shingles_b.status();
  const ShingleSet set_a = ToSet(HashSequence(*shingles_a, settings.seed));
  const ShingleSet set_b = ToSet(HashSequence(*shingles_b, settings.seed));
  const Signer signer(settings);
  Explanation out;
  out.settings = settings;
  MeasureExplanation(set_a, set_b, signer.Sign(set_a), signer.Sign(set_b), &out);
  out.marked_a = SharedSpans(*shingles_a, set_b, settings.seed);
  out.marked_b = SharedSpans(*shingles_b, set_a, settings.seed);
  out.passages = AlignPassages(*shingles_a, *shingles_b, settings.seed);
  return out;
}

absl::StatusOr<std::vector<std::string>> ReadTexts(CorpusReader& reader,
                                                   absl::Span<const std::string> ids) {
  absl::flat_hash_map<std::string, size_t> wanted;
  for (size_t i = 0; i < ids.size(); ++i) wanted.emplace(ids[i], i);
  std::vector<std::string> texts(ids.size());
  std::vector<uint8_t> found(ids.size(), 0);
  std::vector<Document> batch;
  for (;;) {
    absl::StatusOr<size_t> read = reader.ReadBatch(&batch, 256, 16 << 20);
    if (!read.ok()) return read.status();
    if (*read == 0) break;
    for (size_t d = 0; d < *read; ++d) {
      auto it = wanted.find(batch[d].id);
      if (it == wanted.end()) continue;
      for (size_t i = 0; i < ids.size(); ++i) {
        if (ids[i] == batch[d].id && !found[i]) {
          texts[i] = batch[d].text;
          found[i] = 1;
        }
      }
    }
  }
  for (size_t i = 0; i < ids.size(); ++i) {
    if (!found[i]) {
      return absl::NotFoundError(absl::StrCat("id \"", ids[i], "\" is not in the corpus"));
    }
  }
  return texts;
}

std::string MarkSpans(std::string_view text, absl::Span<const TextSpan> spans,
                      std::string_view open, std::string_view close) {
  std::string out;
  out.reserve(text.size() + spans.size() * (open.size() + close.size()));
  size_t at = 0;
  for (const TextSpan& span : spans) {
    out.append(text.substr(at, span.begin - at));
    out.append(open);
    out.append(text.substr(span.begin, span.end - span.begin));
    out.append(close);
    at = span.end;
  }
  out.append(text.substr(std::min(at, text.size())));
  return out;
}

}  // namespace kindred
