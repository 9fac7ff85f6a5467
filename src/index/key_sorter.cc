#include "index/key_sorter.h"

#include <algorithm>
#include <memory>

#include "index/codec.h"
#include "kindred/errors.h"

namespace kindred::index {
namespace {

constexpr size_t kEntryBytes = 12;  // key u64, doc u32, little-endian

// One run of the scratch file, read through a buffer.
struct Cursor {
  const ScratchFile* file;
  uint64_t offset;  // next unread byte
  uint64_t left;    // entries not yet buffered
  size_t capacity;  // entries per read
  std::vector<BucketEntry> buffer;
  size_t next = 0;

  bool has() const { return next < buffer.size(); }
  const BucketEntry& head() const { return buffer[next]; }
  absl::Status Fill() {
    if (next < buffer.size() || left == 0) return absl::OkStatus();
    const size_t count = static_cast<size_t>(std::min<uint64_t>(left, capacity));
    std::string bytes(count * kEntryBytes, '\0');
    if (absl::Status status = file->ReadAt(offset, absl::MakeSpan(bytes)); !status.ok()) {
      return Annotate(status, "cannot read sorted band keys");
    }
    buffer.resize(count);
    for (size_t i = 0; i < count; ++i) {
      buffer[i] = {LoadU64(bytes.data() + i * kEntryBytes),
                   LoadU32(bytes.data() + i * kEntryBytes + 8)};
    }
    next = 0;
    offset += bytes.size();
    left -= count;
    return absl::OkStatus();
  }
};

}  // namespace

KeySorter::KeySorter(uint64_t budget_bytes, std::string scratch_dir, FileSystem* fs)
    : budget_(budget_bytes == 0 ? 0 : std::max<uint64_t>(budget_bytes, 64)),
      dir_(std::move(scratch_dir)),
      // Entries and the sort's scratch copy take 32 bytes an entry; half
      // the budget leaves room for the rest of the writer.
      run_capacity_(budget_ == 0 ? SIZE_MAX : static_cast<size_t>(budget_ / 64)),
      fs_(fs) {}

KeySorter::~KeySorter() = default;

absl::Status KeySorter::Add(uint64_t key, uint32_t doc) {
  entries_.push_back({key, doc});
  ++count_;
  if (entries_.size() >= run_capacity_) return Spill();
  return absl::OkStatus();
}

absl::Status KeySorter::Spill() {
  if (file_ == nullptr) {
    absl::StatusOr<std::unique_ptr<ScratchFile>> file = fs_->CreateScratch(dir_);
    if (!file.ok()) return Annotate(file.status(), "cannot sort band keys");
    file_ = *std::move(file);
  }
  {
    EntryVector scratch;
    HugePageVector<uint32_t> offsets;
    SortEntries(entries_, scratch, offsets);
  }
  std::string bytes(entries_.size() * kEntryBytes, '\0');
  for (size_t i = 0; i < entries_.size(); ++i) {
    StoreU64(bytes.data() + i * kEntryBytes, entries_[i].key);
    StoreU32(bytes.data() + i * kEntryBytes + 8, entries_[i].doc);
  }
  const uint64_t offset = file_->size();
  if (absl::Status status = file_->Append(bytes); !status.ok()) {
    return Annotate(status, "cannot sort band keys");
  }
  runs_.push_back({offset, entries_.size()});
  entries_.clear();
  return absl::OkStatus();
}

absl::Status KeySorter::Finish() {
  if (!runs_.empty() && !entries_.empty()) return Spill();
  EntryVector scratch;
  HugePageVector<uint32_t> offsets;
  SortEntries(entries_, scratch, offsets);
  return absl::OkStatus();
}

absl::Status KeySorter::ForEach(const std::function<void(const BucketEntry&)>& visit) const {
  if (runs_.empty()) {
    for (const BucketEntry& entry : entries_) visit(entry);
    return absl::OkStatus();
  }
  // Half the budget buffers the runs' heads.
  const size_t capacity =
      std::max<size_t>(1024, static_cast<size_t>(budget_ / 2 / kEntryBytes / runs_.size()));
  std::vector<Cursor> cursors;
  for (const Run& run : runs_) {
    cursors.push_back(Cursor{file_.get(), run.offset, run.count, capacity, {}, 0});
  }
  std::vector<uint32_t> heap;
  const auto after = [&](uint32_t a, uint32_t b) { return cursors[b].head() < cursors[a].head(); };
  for (uint32_t i = 0; i < cursors.size(); ++i) {
    if (absl::Status s = cursors[i].Fill(); !s.ok()) return s;
    if (cursors[i].has()) heap.push_back(i);
  }
  std::make_heap(heap.begin(), heap.end(), after);
  while (!heap.empty()) {
    std::pop_heap(heap.begin(), heap.end(), after);
    Cursor& cursor = cursors[heap.back()];
    visit(cursor.head());
    ++cursor.next;
    if (absl::Status s = cursor.Fill(); !s.ok()) return s;
    if (cursor.has()) {
      std::push_heap(heap.begin(), heap.end(), after);
    } else {
      heap.pop_back();
    }
  }
  return absl::OkStatus();
}

}  // namespace kindred::index
