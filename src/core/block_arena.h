// kindred: append-only storage in large blocks, for the per-document arrays
// of a signed corpus (shingle sets, signatures).
//
// Growing one std::vector by doubling copies everything several times and
// faults in fresh pages at each step; on a corpus of millions of documents
// that cost more than signing itself. Blocks are never moved, so appending
// copies each value once, and blocks from 2 MiB on are 2 MiB aligned and advised as huge
// pages where the kernel allows it, which cuts page faults by ~500x.
//
// Not thread-safe for Append; reads of appended data may be concurrent.
#ifndef KINDRED_CORE_BLOCK_ARENA_H_
#define KINDRED_CORE_BLOCK_ARENA_H_

#include <sys/mman.h>

#include <algorithm>
#include <cstdlib>
#include <cstring>
#include <memory>
#include <new>
#include <vector>

namespace kindred {

// `bytes` (a multiple of 2 MiB) of uninitialized memory, 2 MiB aligned and
// advised as huge pages where the kernel allows it; release with std::free.
// Throws std::bad_alloc when there is none.
inline void* AllocateHugePages(size_t bytes) {
  void* memory = std::aligned_alloc(size_t{2} << 20, bytes);
  if (memory == nullptr) throw std::bad_alloc();
#ifdef MADV_HUGEPAGE
  madvise(memory, bytes, MADV_HUGEPAGE);
#endif
  return memory;
}

template <typename T>
class BlockArena {
 public:
  static constexpr size_t kAlignment = size_t{2} << 20;    // one huge page
  static constexpr size_t kSmallAlignment = 64;             // a cache line
  static constexpr size_t kBlockBytes = size_t{32} << 20;  // per block, at most
  // The first block; each next one doubles up to kBlockBytes, so that a
  // corpus of a few documents (a query, a test) does not fault in a whole
  // huge page per arena.
  static constexpr size_t kFirstBlockBytes = size_t{64} << 10;

  BlockArena() = default;
  BlockArena(BlockArena&&) noexcept = default;
  BlockArena& operator=(BlockArena&&) noexcept = default;

  // Copies `count` values into contiguous storage and returns where they
  // are; valid until Reset() or the arena's end. Requires count > 0 or
  // returns null.
  const T* Append(const T* values, size_t count) {
    T* out = Allocate(count);
    if (count > 0) std::memcpy(out, values, count * sizeof(T));
    return out;
  }

  // Room for `count` values, not initialized, contiguous; valid until
  // Reset() or the arena's end. Requires count > 0 or returns null.
  T* Allocate(size_t count) {
    if (count == 0) return nullptr;
    if (blocks_.empty() || free_ < count) NextBlock(count);
    T* out = next_;
    next_ += count;
    free_ -= count;
    used_ += count;
    return out;
  }

  // Forgets every value but keeps the blocks, to be filled again (memory
  // already faulted in is reused).
  void Reset() {
    current_ = 0;
    next_ = blocks_.empty() ? nullptr : blocks_[0].data.get();
    free_ = blocks_.empty() ? 0 : blocks_[0].values;
    used_ = 0;
  }

  // Bytes held by the arena's blocks.
  size_t bytes_reserved() const { return reserved_; }
  // Bytes of the values appended since construction or Reset().
  size_t bytes_used() const { return used_ * sizeof(T); }

 private:
  struct Free {
    void operator()(T* block) const { std::free(block); }
  };
  struct Block {
    std::unique_ptr<T, Free> data;
    size_t values;
  };

  // Moves to the next kept block with room for `at_least` values, or
  // allocates one.
  void NextBlock(size_t at_least) {
    while (!blocks_.empty() && current_ + 1 < blocks_.size()) {
      ++current_;
      if (blocks_[current_].values >= at_least) {
        next_ = blocks_[current_].data.get();
        free_ = blocks_[current_].values;
        return;
      }
    }
    const size_t grown = blocks_.empty() ? kFirstBlockBytes
                                         : std::min(kBlockBytes, 2 * blocks_.back().values * sizeof(T));
    size_t bytes = std::max(grown, at_least * sizeof(T));
    void* memory;
    if (bytes >= kAlignment) {
      bytes = (bytes + kAlignment - 1) / kAlignment * kAlignment;
      memory = AllocateHugePages(bytes);
    } else {
      bytes = (bytes + kSmallAlignment - 1) / kSmallAlignment * kSmallAlignment;
      memory = std::aligned_alloc(kSmallAlignment, bytes);
      if (memory == nullptr) throw std::bad_alloc();
    }
    blocks_.push_back(Block{std::unique_ptr<T, Free>(static_cast<T*>(memory)), bytes / sizeof(T)});
    current_ = blocks_.size() - 1;
    next_ = blocks_.back().data.get();
    free_ = blocks_.back().values;
    reserved_ += bytes;
  }

  std::vector<Block> blocks_;
  size_t current_ = 0;  // block being filled
  T* next_ = nullptr;
  size_t free_ = 0;
  size_t used_ = 0;
  size_t reserved_ = 0;
};

// An allocator for large arrays (std::vector<T, HugePageAllocator<T>>): an
// allocation of 512 KiB or more is rounded up to whole 2 MiB pages, 2 MiB
// aligned and advised as huge pages, like the arena's blocks, so that
// filling a per-document array of millions of entries faults in a page per
// 2 MiB instead of per 4 KiB (each fault costs microseconds; from 512 KiB
// on, one huge page costs less than the small pages it replaces). The
// rounding reserves address space, not memory: pages never touched stay
// unbacked where huge pages are off. Smaller allocations come from operator
// new.
template <typename T>
struct HugePageAllocator {
  using value_type = T;
  static constexpr size_t kHugePage = size_t{2} << 20;
  static constexpr size_t kSmallest = size_t{512} << 10;  // smaller: operator new

  HugePageAllocator() = default;
  template <typename U>
  HugePageAllocator(const HugePageAllocator<U>&) {}

  T* allocate(size_t n) {
    const size_t bytes = n * sizeof(T);
    if (bytes < kSmallest) return static_cast<T*>(::operator new(bytes));
    return static_cast<T*>(AllocateHugePages((bytes + kHugePage - 1) / kHugePage * kHugePage));
  }
  void deallocate(T* p, size_t n) {
    if (n * sizeof(T) < kSmallest) {
      ::operator delete(p);
    } else {
      std::free(p);
    }
  }
  template <typename U>
  bool operator==(const HugePageAllocator<U>&) const {
    return true;
  }
};

template <typename T>
using HugePageVector = std::vector<T, HugePageAllocator<T>>;

}  // namespace kindred

#endif  // KINDRED_CORE_BLOCK_ARENA_H_
