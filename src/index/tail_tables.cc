#include "index/tail_tables.h"

#include <algorithm>
#include <iterator>

namespace kindred::index {

void TailTables::Add(const SegmentView& segment, uint32_t first_doc) {
  // Stored keys ascend, ties by local document: already (key, doc) order.
  std::vector<Entry> run;
  run.reserve(segment.key_count());
  for (uint64_t i = 0; i < segment.key_count(); ++i) {
    run.emplace_back(segment.keys()[i], first_doc + segment.key_docs()[i]);
  }
  if (!run.empty()) runs_.push_back(std::move(run));
  // Merge the newest runs while the older of the two is not much larger.
  while (runs_.size() >= 2 && runs_[runs_.size() - 2].size() <= 2 * runs_.back().size()) {
    std::vector<Entry> merged;
    std::vector<Entry>& older = runs_[runs_.size() - 2];
    std::vector<Entry>& newer = runs_.back();
    merged.reserve(older.size() + newer.size());
    std::merge(older.begin(), older.end(), newer.begin(), newer.end(), std::back_inserter(merged));
    runs_.pop_back();
    runs_.back() = std::move(merged);
  }
  for (uint32_t local = 0; local < segment.doc_count(); ++local) {
    ids_[segment.id(local)] = first_doc + local;
  }
}

std::optional<uint32_t> TailTables::Newest(std::string_view id) const {
  auto it = ids_.find(id);
  if (it == ids_.end()) return std::nullopt;
  return it->second;
}

}  // namespace kindred::index
