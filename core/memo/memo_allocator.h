// The allocator of memo arrays: new elements of trivial types are left
// uninitialised (default-initialised) instead of zeroed, so a memo of 2^n
// entries is not written in full before the search writes the entries it
// uses; blocks of 2 MiB or more are aligned to 2 MiB and their whole 2 MiB
// pages offered to the kernel as transparent huge pages, so first touching
// a large memo takes one page fault per 2 MiB instead of per 4 KiB, and a
// block's resident size is still its bytes, not its bytes rounded up. A
// memo of which the search touches only some runs of entries (a sliced
// connected-only search) says which (TouchedRunsScope): only the 2 MiB
// pages wholly inside touched runs are huge. Only for element types every
// reader initialises first.
#ifndef SLICEPLAN_CORE_MEMO_MEMO_ALLOCATOR_H_
#define SLICEPLAN_CORE_MEMO_MEMO_ALLOCATOR_H_

#include <sys/mman.h>

#include <cstdint>
#include <cstdlib>
#include <new>
#include <type_traits>
#include <utility>
#include <vector>

namespace sliceplan {

// The entries a search will touch, as blocks of 2^block_bits consecutive
// entries: block b is touched when touched[b] is non-zero (entries past the
// table count as touched).
struct TouchedRuns {
  int block_bits = 0;
  std::vector<uint8_t> touched;
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
    if (b < runs.touched.size() && runs.touched[b] == 0) return false;
  }
  return true;
}

// Advises the whole 2 MiB pages of [p, p + whole) huge where every entry
// of the page is touched, and the others not, in runs of like pages.
inline void AdviseTouched(char* p, size_t whole, size_t element) {
  const TouchedRuns& runs = *touched_runs;
  size_t run_start = 0;
  bool run_huge = false;
  for (size_t page = 0; page <= whole; page += kHugePage) {
    const bool huge =
        page < whole && WhollyTouched(runs, page / element, (page + kHugePage - 1) / element);
    if (page == whole || (page > run_start && huge != run_huge)) {
      if (page > run_start) {
        madvise(p + run_start, page - run_start, run_huge ? MADV_HUGEPAGE : MADV_NOHUGEPAGE);
      }
      run_start = page;
    }
    run_huge = huge;
  }
}

inline void* Allocate(size_t bytes, size_t element) {
  if (bytes < kHugePage) {
    if (void* p = std::malloc(bytes)) return p;
    throw std::bad_alloc();
  }
  if (bytes > kMaxBytes) throw std::bad_alloc();
  const size_t rounded = (bytes + kHugePage - 1) / kHugePage * kHugePage;
  void* p = std::aligned_alloc(kHugePage, rounded);
  if (p == nullptr) throw std::bad_alloc();
  // Huge pages for the whole 2 MiB pages of the block only: a huge page
  // over its tail would make the tail's every byte resident, up to 2 MiB an
  // array (a slice's memo would then not shrink with the slice), so the
  // tail is advised against them where huge pages are the default. Advice
  // only: ignored where unsupported.
  const size_t whole = bytes / kHugePage * kHugePage;
  if (touched_runs != nullptr) {
    AdviseTouched(static_cast<char*>(p), whole, element);
  } else {
    madvise(p, whole, MADV_HUGEPAGE);
  }
  if (rounded > whole) madvise(static_cast<char*>(p) + whole, rounded - whole, MADV_NOHUGEPAGE);
  return p;
}
}  // namespace memo_allocator_internal

// While one lives, memo arrays allocated on this thread take huge pages
// only where a whole 2 MiB page lies in touched entries: a huge page over
// one touched entry would make 2 MiB around it resident, so a slice's
// memory would not shrink with the slice; where the touched runs are 2 MiB
// or longer (a sliced search on two workers) the slice keeps the huge
// pages' fewer faults. `runs` must outlive the scope. Not nestable across
// threads; RAII.
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
  void deallocate(T* p, size_t) noexcept { std::free(p); }

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
