#include "core/band_spill.h"

#include <algorithm>
#include <bit>

#include "absl/base/internal/endian.h"
#include "kindred/banding.h"
#include "kindred/errors.h"

namespace kindred {

void SortEntries(EntryVector& entries, EntryVector& scratch, HugePageVector<uint32_t>& offsets) {
  // Keys are hashes, spread evenly, so one counting pass on their top bits
  // scatters the entries into partitions of a few entries each, in key
  // order; each partition is then sorted on its own. About three times
  // faster than one std::sort of the whole band; a crowded partition (many
  // equal keys) still costs only O(n log n).
  const size_t n = entries.size();
  if (n < 1024) {
    std::sort(entries.begin(), entries.end());
    return;
  }
  const int bits = std::min(20, static_cast<int>(std::bit_width(n / 4)));
  const int shift = 64 - bits;
  offsets.assign((size_t{1} << bits) + 1, 0);
  for (const BucketEntry& entry : entries) ++offsets[(entry.key >> shift) + 1];
  for (size_t p = 1; p < offsets.size(); ++p) offsets[p] += offsets[p - 1];
  scratch.resize(n);
  for (const BucketEntry& entry : entries) scratch[offsets[entry.key >> shift]++] = entry;
  // offsets[p] is now the end of partition p (the start of p + 1).
  size_t begin = 0;
  for (size_t p = 0; p + 1 < offsets.size(); ++p) {
    const size_t end = offsets[p];
    if (end - begin > 1) std::sort(scratch.begin() + begin, scratch.begin() + end);
    begin = end;
  }
  entries.swap(scratch);
}

namespace {

constexpr size_t kEntryBytes = 12;
constexpr size_t kCursorEntries = 4096;  // entries buffered per file cursor

}  // namespace

absl::StatusOr<std::unique_ptr<BandSpill>> BandSpill::Create(FileSystem* fs, const std::string& dir,
                                                             uint32_t bands) {
  absl::StatusOr<std::unique_ptr<ScratchFile>> file = fs->CreateScratch(dir);
  if (!file.ok()) return Annotate(file.status(), "cannot spill band keys");
  return std::unique_ptr<BandSpill>(new BandSpill(*std::move(file), dir, bands));
}

BandSpill::~BandSpill() = default;

absl::Status BandSpill::AddRun(uint32_t first_doc, size_t docs,
                               absl::Span<const uint64_t* const> columns) {
  std::vector<Section> sections(bands_);
  EntryVector entries, scratch;
  HugePageVector<uint32_t> offsets;
  std::string bytes;
  for (uint32_t band = 0; band < bands_; ++band) {
    entries.clear();
    const uint64_t* column = columns[band];
    for (size_t i = 0; i < docs; ++i) {
      if (column[i] != kNoBandKey) {
        entries.push_back({column[i], static_cast<uint32_t>(first_doc + i)});
      }
    }
    SortEntries(entries, scratch, offsets);
    bytes.resize(entries.size() * kEntryBytes);
    char* out = bytes.data();
    for (const BucketEntry& entry : entries) {
      absl::little_endian::Store64(out, entry.key);
      absl::little_endian::Store32(out + 8, entry.doc);
      out += kEntryBytes;
    }
    sections[band] = Section{file_->size(), entries.size()};
    if (bytes.empty()) continue;
    if (absl::Status status = file_->Append(bytes); !status.ok()) {
      return Annotate(status, "cannot spill band keys");
    }
  }
  runs_.push_back(std::move(sections));
  return absl::OkStatus();
}

// A sorted source of entries: a section of the spill file, read in chunks,
// or the resident entries in memory.
struct BandMerger::Cursor {
  const BandSpill* spill = nullptr;  // null: reads `memory`
  uint64_t offset = 0;               // next unread byte of the section
  uint64_t left = 0;                 // entries not yet buffered
  std::vector<BucketEntry> buffer;
  absl::Span<const BucketEntry> memory;
  size_t next = 0;  // in buffer or memory

  bool has() const { return next < (spill == nullptr ? memory.size() : buffer.size()); }
  const BucketEntry& head() const { return spill == nullptr ? memory[next] : buffer[next]; }

  // Refills the buffer when it is used up; the scratch file's error when a
  // read fails.
  absl::Status Fill() {
    if (spill == nullptr || next < buffer.size() || left == 0) return absl::OkStatus();
    const size_t count = static_cast<size_t>(std::min<uint64_t>(left, kCursorEntries));
    std::string bytes(count * kEntryBytes, '\0');
    if (absl::Status status = spill->file_->ReadAt(offset, absl::MakeSpan(bytes)); !status.ok()) {
      return Annotate(status, "cannot read spilled band keys");
    }
    buffer.resize(count);
    for (size_t i = 0; i < count; ++i) {
      buffer[i].key = absl::little_endian::Load64(bytes.data() + i * kEntryBytes);
      buffer[i].doc = absl::little_endian::Load32(bytes.data() + i * kEntryBytes + 8);
    }
    offset += bytes.size();
    left -= count;
    next = 0;
    return absl::OkStatus();
  }
};

BandMerger::BandMerger(const BandSpill& spill, uint32_t band,
                       absl::Span<const BucketEntry> resident) {
  for (const auto& run : spill.runs_) {
    auto cursor = std::make_unique<Cursor>();
    cursor->spill = &spill;
    cursor->offset = run[band].offset;
    cursor->left = run[band].count;
    cursors_.push_back(std::move(cursor));
  }
  auto cursor = std::make_unique<Cursor>();
  cursor->memory = resident;
  cursors_.push_back(std::move(cursor));
}

BandMerger::~BandMerger() = default;

absl::StatusOr<bool> BandMerger::Next(BucketEntry* entry) {
  // Min-heap on each cursor's head: the comparison says "a after b".
  auto after = [this](uint32_t a, uint32_t b) { return cursors_[b]->head() < cursors_[a]->head(); };
  if (!started_) {
    started_ = true;
    for (uint32_t i = 0; i < cursors_.size(); ++i) {
      if (absl::Status s = cursors_[i]->Fill(); !s.ok()) return s;
      if (cursors_[i]->has()) heap_.push_back(i);
    }
    std::make_heap(heap_.begin(), heap_.end(), after);
  }
  if (heap_.empty()) return false;
  std::pop_heap(heap_.begin(), heap_.end(), after);
  Cursor& cursor = *cursors_[heap_.back()];
  *entry = cursor.head();
  ++cursor.next;
  if (absl::Status s = cursor.Fill(); !s.ok()) return s;
  if (cursor.has()) {
    std::push_heap(heap_.begin(), heap_.end(), after);
  } else {
    heap_.pop_back();
  }
  return true;
}

}  // namespace kindred
