// The allocator of memo arrays: new elements of trivial types are left
// uninitialised (default-initialised) instead of zeroed, so a memo of 2^n
// entries is not written in full before the search writes the entries it
// uses; blocks of 2 MiB or more are aligned to 2 MiB and their whole 2 MiB
// pages offered to the kernel as transparent huge pages, so first touching
// a large memo takes one page fault per 2 MiB instead of per 4 KiB, and a
// block's resident size is still its bytes, not its bytes rounded up
// (SmallPagesScope turns the huge pages off). Only for element types every
// reader initialises first.
#ifndef SLICEPLAN_CORE_MEMO_MEMO_ALLOCATOR_H_
#define SLICEPLAN_CORE_MEMO_MEMO_ALLOCATOR_H_

#include <sys/mman.h>

#include <cstdlib>
#include <new>
#include <type_traits>
#include <utility>

namespace sliceplan {

namespace memo_allocator_internal {
inline constexpr size_t kHugePage = size_t{2} << 20;
// Past any machine's memory; keeps the rounding below from overflowing.
inline constexpr size_t kMaxBytes = size_t{1} << 60;

// Set while a SmallPagesScope is live on this thread.
inline thread_local bool small_pages = false;

inline void* Allocate(size_t bytes) {
  if (bytes < kHugePage || small_pages) {
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
  madvise(p, whole, MADV_HUGEPAGE);
  if (rounded > whole) madvise(static_cast<char*>(p) + whole, rounded - whole, MADV_NOHUGEPAGE);
  return p;
}
}  // namespace memo_allocator_internal

// While one lives, memo arrays allocated on this thread keep the kernel's
// 4 KiB pages: for a memo of which the search touches only some blocks
// (a sliced connected-only search), a huge page over a touched entry would
// make 2 MiB around it resident. Not nestable across threads; RAII.
class SmallPagesScope {
 public:
  SmallPagesScope() : before_(memo_allocator_internal::small_pages) {
    memo_allocator_internal::small_pages = true;
  }
  ~SmallPagesScope() { memo_allocator_internal::small_pages = before_; }
  SmallPagesScope(const SmallPagesScope&) = delete;
  SmallPagesScope& operator=(const SmallPagesScope&) = delete;

 private:
  bool before_;
};

template <class T>
class MemoAllocator {
 public:
  using value_type = T;
  MemoAllocator() = default;
  template <class U>
  MemoAllocator(const MemoAllocator<U>&) noexcept {}  // NOLINT: allocator rebind

  T* allocate(size_t n) {
    return static_cast<T*>(memo_allocator_internal::Allocate(n * sizeof(T)));
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
