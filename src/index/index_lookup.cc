// IndexReader's band-key lookup: the banding queries use, the candidates
// of a query's band keys, and the walk over every stored key.
#include <algorithm>

#include "absl/strings/str_format.h"
#include "index/key_table.h"
#include "index/reader_segment.h"
#include "index/tail_tables.h"
#include "kindred/banding.h"
#include "kindred/index.h"

namespace kindred {

// The entries of one key in one table: rows [begin, end) of an in-memory
// table, or of segment `segment`'s table when `table` is null.
struct IndexReader::KeyRange {
  const std::pair<uint64_t, uint32_t>* table;
  size_t segment;
  size_t begin, end;
};

absl::Status IndexReader::UseBanding(uint32_t bands, uint32_t rows) {
  if (bands < 1 || rows < 1 || uint64_t{bands} * rows > settings_.signature.perms) {
    return absl::InvalidArgumentError(
        absl::StrFormat("bands x rows = %u x %u does not fit the index's %u-slot signatures", bands,
                        rows, settings_.signature.perms));
  }
  bands_ = bands;
  rows_ = rows;
  memory_keys_.clear();
  if (bands == settings_.bands && rows == settings_.rows) return absl::OkStatus();
  memory_keys_ = index::BuildKeyTable(
      index::KeyPlan{Banding{bands, rows}, nullptr}, 0, document_count_, [this](uint32_t doc) {
        return index::KeyedDocument{signature(doc), shingle_count(doc), !is_live(doc)};
      });
  return absl::OkStatus();
}

uint64_t IndexReader::FindKeyRanges(uint64_t key, std::vector<KeyRange>* ranges) const {
  // The range of `key` in a sorted in-memory table, added when not empty.
  const auto add_table = [key, ranges](const index::KeyTable& table) {
    const auto [lo, hi] = std::equal_range(
        table.begin(), table.end(), index::KeyRow(key, 0),
        [](const index::KeyRow& x, const index::KeyRow& y) { return x.first < y.first; });
    if (lo != hi) {
      ranges->push_back({table.data(), 0, static_cast<size_t>(lo - table.begin()),
                         static_cast<size_t>(hi - table.begin())});
    }
    return static_cast<uint64_t>(hi - lo);
  };
  const bool stored = memory_keys_.empty() && bands_ == settings_.bands && rows_ == settings_.rows;
  if (!stored) return add_table(memory_keys_);
  // Segments one by one up to the tail, then the tail's runs: document
  // numbers ascend across the ranges either way.
  uint64_t entries = 0;
  const size_t tail_from = tail_ != nullptr ? tail_from_ : segment_views_.size();
  for (size_t s = 0; s < tail_from; ++s) {
    const Segment& segment = segment_views_[s];
    const uint64_t* end = segment.keys() + segment.key_count();
    const auto [lo, hi] = std::equal_range(segment.keys(), end, key);
    if (lo == hi) continue;
    ranges->push_back({nullptr, s, static_cast<size_t>(lo - segment.keys()),
                       static_cast<size_t>(hi - segment.keys())});
    entries += hi - lo;
  }
  if (tail_ != nullptr) {
    for (const index::KeyTable& run : tail_->runs()) entries += add_table(run);
  }
  return entries;
}

void IndexReader::Candidates(absl::Span<const uint64_t> keys, std::vector<uint32_t>* out,
                             uint64_t max_bucket, uint64_t* crowded) const {
  const size_t start = out->size();
  const auto doc_at = [&](const KeyRange& range, size_t i) {
    if (range.table != nullptr) return range.table[i].second;
    const Segment& segment = segment_views_[range.segment];
    return segment_first_doc_[range.segment] + segment.key_docs()[i];
  };
  std::vector<KeyRange> ranges;
  for (uint64_t key : keys) {
    if (key == kNoBandKey) continue;
    ranges.clear();
    const uint64_t entries = FindKeyRanges(key, &ranges);
    const bool capped = max_bucket > 0 && entries > max_bucket;
    if (capped && crowded != nullptr) ++*crowded;
    bool found = false;
    for (const KeyRange& range : ranges) {
      for (size_t i = range.begin; i < range.end && !(capped && found); ++i) {
        const uint32_t doc = doc_at(range, i);
        if (!is_live(doc)) continue;
        out->push_back(doc);
        found = true;
      }
    }
  }
  std::sort(out->begin() + start, out->end());
  out->erase(std::unique(out->begin() + start, out->end()), out->end());
}

void IndexReader::ForEachBandKey(
    const std::function<void(uint64_t key, uint32_t doc)>& visit) const {
  if (!(bands_ == settings_.bands && rows_ == settings_.rows)) {
    for (const auto& [key, doc] : memory_keys_) visit(key, doc);
    return;
  }
  for (size_t s = 0; s < segment_views_.size(); ++s) {
    const Segment& segment = segment_views_[s];
    for (uint64_t i = 0; i < segment.key_count(); ++i) {
      uint32_t doc = segment_first_doc_[s] + segment.key_docs()[i];
      if (is_live(doc)) visit(segment.keys()[i], doc);
    }
  }
}

}  // namespace kindred
