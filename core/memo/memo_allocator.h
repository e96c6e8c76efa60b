// The allocator of memo arrays: new elements of trivial types are left
// uninitialised (default-initialised) instead of zeroed, so a memo of 2^n
// entries is not written in full before the search writes the entries it
// uses. Blocks of 2 MiB or more are aligned to 2 MiB and left to the
// kernel's own huge-page policy: they are not advised as transparent huge
// pages, because a fault in an advised region may first compact memory,
// and that made searches spike to 2-3.6 times their time (a 0.45 s
// search took 1.6 s; docs/benchmarks.md, "Huge pages"). A memo of which
// the search touches only some runs of entries (a sliced connected-only
// search, TouchedRunsScope) is advised against them where a huge page
// could make untouched bytes resident: the pages not wholly inside the
// touched runs, and each block's tail. Only for element types every
// reader initialises first.
#ifndef SLICEPLAN_CORE_MEMO_MEMO_ALLOCATOR_H_
#define SLICEPLAN_CORE_MEMO_MEMO_ALLOCATOR_H_

#include <sys/mman.h>

#include <cstdint>
#include <cstdlib>
#include <functional>
#include <new>
#include <type_traits>
#include <utility>

#include "absl/base/thread_annotations.h"
#include "absl/container/flat_hash_set.h"
#include "absl/synchronization/mutex.h"

namespace sliceplan {

// The entries a search will touch, as blocks of 2^block_bits consecutive
// entries: block b is touched when touched(b). A page is tested block by
// block up to its first untouched one, so the test must find one within a
// few blocks wherever a page spans many (a slice's forbidden patterns
// recur every 8 blocks at most).
struct TouchedRuns {
  int block_bits = 0;
  std::function<bool(uint64_t block)> touched;
};

namespace memo_allocator_internal {
inline constexpr size_t kHugePage = size_t{2} << 20;
// Past any machine's memory; keeps the rounding below from overflowing.
inline constexpr size_t kMaxBytes = size_t{1} << 60;

// Set while a TouchedRunsScope is live on this thread.
inline thread_local const TouchedRuns* touched_runs = nullptr;

// True when every entry of the 2 MiB page [first, last] (entry indices)
// lies in a touched block.
inline bool WhollyTouched(const TouchedRuns& runs, uint64_t first, uint64_t last) {
  for (uint64_t b = first >> runs.block_bits; b <= last >> runs.block_bits; ++b) {
    if (!runs.touched(b)) return false;
  }
  return true;
}

// Advises against huge pages on the 2 MiB pages of [p, p + whole) that
// are not wholly inside touched entries, in runs of such pages.
inline void AdviseTouched(char* p, size_t whole, size_t element) {
  const TouchedRuns& runs = *touched_runs;
  size_t run_start = 0;
  for (size_t page = 0; page <= whole; page += kHugePage) {
    const bool untouched =
        page < whole && !WhollyTouched(runs, page / element, (page + kHugePage - 1) / element);
    if (untouched) continue;
    if (page > run_start) madvise(p + run_start, page - run_start, MADV_NOHUGEPAGE);
    run_start = page + kHugePage;
  }
}

// x rounded up to a whole number of huge pages (a size or an address).
inline uint64_t RoundUpToHugePage(uint64_t x) {
  return (x + kHugePage - 1) / kHugePage * kHugePage;
}

// A block allocated under a TouchedRunsScope is mapped on its own and
// unmapped when freed, so its advice never reaches heap memory that a
// later memo would be given (heap blocks are reused warm, with no page
// faults: a calibration part's 5 MiB memo ran twice as long per set when
// every block was mapped afresh). The registry holds those blocks.
inline absl::Mutex mapped_mu(absl::kConstInit);
inline absl::flat_hash_set<void*>& Mapped() ABSL_EXCLUSIVE_LOCKS_REQUIRED(mapped_mu) {
  static auto* const mapped = new absl::flat_hash_set<void*>();  // never destroyed
  return *mapped;
}

// `rounded` bytes, 2 MiB aligned, in a mapping of their own.
inline char* MapAligned(size_t rounded) {
  // Over-map by one huge page and trim to the aligned part.
  void* raw = mmap(nullptr, rounded + kHugePage, PROT_READ | PROT_WRITE,
                   MAP_PRIVATE | MAP_ANONYMOUS, -1, 0);
  if (raw == MAP_FAILED) throw std::bad_alloc();
  const auto start = reinterpret_cast<uintptr_t>(raw);
  const uintptr_t aligned = RoundUpToHugePage(start);
  if (aligned > start) munmap(raw, aligned - start);
  const uintptr_t end = start + rounded + kHugePage;
  if (end > aligned + rounded) {
    munmap(reinterpret_cast<void*>(aligned + rounded), end - aligned - rounded);
  }
  return reinterpret_cast<char*>(aligned);
}

inline void* Allocate(size_t bytes, size_t element) {
  if (bytes < kHugePage) {
    if (void* p = std::malloc(bytes)) return p;
    throw std::bad_alloc();
  }
  if (bytes > kMaxBytes) throw std::bad_alloc();
  const size_t rounded = RoundUpToHugePage(bytes);
  if (touched_runs == nullptr) {
    void* p = std::aligned_alloc(kHugePage, rounded);
    if (p == nullptr) throw std::bad_alloc();
    return p;
  }
  char* p = MapAligned(rounded);
  {
    absl::MutexLock lock(&mapped_mu);
    Mapped().insert(p);
  }
  // A huge page over the block's tail would make the tail's every byte
  // resident, up to 2 MiB an array (a slice's memo would then not shrink
  // with the slice), so the tail is advised against them where huge pages
  // are the default. Advice only: ignored where unsupported.
  const size_t whole = bytes / kHugePage * kHugePage;
  AdviseTouched(p, whole, element);
  if (rounded > whole) madvise(p + whole, rounded - whole, MADV_NOHUGEPAGE);
  return p;
}

inline void Deallocate(void* p, size_t bytes) noexcept {
  if (bytes >= kHugePage) {
    absl::MutexLock lock(&mapped_mu);
    if (Mapped().erase(p) != 0) {
      munmap(p, RoundUpToHugePage(bytes));
      return;
    }
  }
  std::free(p);
}
}  // namespace memo_allocator_internal

// While one lives, memo arrays allocated on this thread are advised
// against huge pages wherever a 2 MiB page is not wholly inside touched
// entries: where huge pages are the kernel's default, a huge page over one
// touched entry would make 2 MiB around it resident, so a slice's memory
// would not shrink with the slice. `runs` must outlive the scope. Not
// nestable across threads; RAII.
class TouchedRunsScope {
 public:
  explicit TouchedRunsScope(const TouchedRuns& runs)
      : before_(memo_allocator_internal::touched_runs) {
    memo_allocator_internal::touched_runs = &runs;
  }
  ~TouchedRunsScope() { memo_allocator_internal::touched_runs = before_; }
  TouchedRunsScope(const TouchedRunsScope&) = delete;
  TouchedRunsScope& operator=(const TouchedRunsScope&) = delete;

 private:
  const TouchedRuns* before_;
};

template <class T>
class MemoAllocator {
 public:
  using value_type = T;
  MemoAllocator() = default;
  template <class U>
  MemoAllocator(const MemoAllocator<U>&) noexcept {}  // NOLINT: allocator rebind

  T* allocate(size_t n) {
    return static_cast<T*>(memo_allocator_internal::Allocate(n * sizeof(T), sizeof(T)));
  }
  void deallocate(T* p, size_t n) noexcept {
    memo_allocator_internal::Deallocate(p, n * sizeof(T));
  }

  template <class U>
  void construct(U* p) noexcept(std::is_nothrow_default_constructible_v<U>) {
    ::new (static_cast<void*>(p)) U;
  }
  template <class U, class... Args>
  void construct(U* p, Args&&... args) {
    ::new (static_cast<void*>(p)) U(std::forward<Args>(args)...);
  }

  template <class U>
  bool operator==(const MemoAllocator<U>&) const noexcept {
    return true;
  }
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MEMO_MEMO_ALLOCATOR_H_
