#include "index/key_sorter.h"

#include <fcntl.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <memory>

#include "absl/strings/str_cat.h"
#include "index/codec.h"

namespace kindred::index {
namespace {

constexpr size_t kEntryBytes = 12;  // key u64, doc u32, little-endian

absl::Status ScratchError(const std::string& dir, const char* what, int error) {
  return absl::AbortedError(absl::StrCat("scratch directory ", dir, ": cannot ", what,
                                         " sorted band keys: ", strerror(error)));
}

// One run of the scratch file, read through a buffer.
struct Cursor {
  int fd;
  uint64_t offset;  // next unread byte
  uint64_t left;    // entries not yet buffered
  size_t capacity;  // entries per read
  std::vector<BucketEntry> buffer;
  size_t next = 0;

  bool has() const { return next < buffer.size(); }
  const BucketEntry& head() const { return buffer[next]; }
  absl::Status Fill(const std::string& dir) {
    if (next < buffer.size() || left == 0) return absl::OkStatus();
    const size_t count = static_cast<size_t>(std::min<uint64_t>(left, capacity));
    std::string bytes(count * kEntryBytes, '\0');
    for (size_t done = 0; done < bytes.size();) {
      const ssize_t n = pread(fd, bytes.data() + done, bytes.size() - done, offset + done);
      if (n < 0 && errno == EINTR) continue;
      if (n <= 0) return ScratchError(dir, "read", n < 0 ? errno : EIO);
      done += static_cast<size_t>(n);
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

KeySorter::KeySorter(uint64_t budget_bytes, std::string scratch_dir)
    : budget_(budget_bytes == 0 ? 0 : std::max<uint64_t>(budget_bytes, 64)),
      dir_(std::move(scratch_dir)),
      // Entries and the sort's scratch copy take 32 bytes an entry; half
      // the budget leaves room for the rest of the writer.
      run_capacity_(budget_ == 0 ? SIZE_MAX : static_cast<size_t>(budget_ / 64)) {}

KeySorter::~KeySorter() {
  if (fd_ >= 0) close(fd_);
}

absl::Status KeySorter::Add(uint64_t key, uint32_t doc) {
  entries_.push_back({key, doc});
  ++count_;
  if (entries_.size() >= run_capacity_) return Spill();
  return absl::OkStatus();
}

absl::Status KeySorter::Spill() {
  if (fd_ < 0) {
    std::string name = absl::StrCat(dir_, "/kindred-keys-XXXXXX");
    fd_ = mkstemp(name.data());
    if (fd_ < 0) return ScratchError(dir_, "create a file for", errno);
    unlink(name.c_str());
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
  for (size_t done = 0; done < bytes.size();) {
    const ssize_t n = pwrite(fd_, bytes.data() + done, bytes.size() - done, end_ + done);
    if (n < 0 && errno == EINTR) continue;
    if (n <= 0) return ScratchError(dir_, "write", n < 0 ? errno : ENOSPC);
    done += static_cast<size_t>(n);
  }
  runs_.push_back({end_, entries_.size()});
  end_ += bytes.size();
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
    cursors.push_back(Cursor{fd_, run.offset, run.count, capacity, {}, 0});
  }
  std::vector<uint32_t> heap;
  const auto after = [&](uint32_t a, uint32_t b) { return cursors[b].head() < cursors[a].head(); };
  for (uint32_t i = 0; i < cursors.size(); ++i) {
    if (absl::Status s = cursors[i].Fill(dir_); !s.ok()) return s;
    if (cursors[i].has()) heap.push_back(i);
  }
  std::make_heap(heap.begin(), heap.end(), after);
  while (!heap.empty()) {
    std::pop_heap(heap.begin(), heap.end(), after);
    Cursor& cursor = cursors[heap.back()];
    visit(cursor.head());
    ++cursor.next;
    if (absl::Status s = cursor.Fill(dir_); !s.ok()) return s;
    if (cursor.has()) {
      std::push_heap(heap.begin(), heap.end(), after);
    } else {
      heap.pop_back();
    }
  }
  return absl::OkStatus();
}

}  // namespace kindred::index
