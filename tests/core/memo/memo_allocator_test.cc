// Which 2 MiB pages of a memo array a sliced search leaves to the kernel's
// huge-page policy: only those wholly inside touched blocks; the others are
// advised against huge pages (memo_allocator.h).
#include "core/memo/memo_allocator.h"

#include "gtest/gtest.h"

namespace sliceplan {
namespace {

using memo_allocator_internal::kHugePage;
using memo_allocator_internal::WhollyTouched;

// A page's first and last entry for elements of `bytes` each.
bool PageTouched(const TouchedRuns& runs, uint64_t page, uint64_t bytes) {
  return WhollyTouched(runs, page * kHugePage / bytes, ((page + 1) * kHugePage - 1) / bytes);
}

TEST(MemoAllocatorTest, BlocksOfTwoMiBOrMoreLeaveTheirPagesToTheKernel) {
  // Blocks of 2^19 entries: 4 MiB of 8-byte entries, 2 MiB of 4-byte ones.
  const TouchedRuns runs{19, {1, 0, 1, 1}};
  EXPECT_TRUE(PageTouched(runs, 0, 8));
  EXPECT_TRUE(PageTouched(runs, 1, 8));
  EXPECT_FALSE(PageTouched(runs, 2, 8));  // block 1
  EXPECT_FALSE(PageTouched(runs, 3, 8));
  EXPECT_TRUE(PageTouched(runs, 4, 8));
  EXPECT_TRUE(PageTouched(runs, 0, 4));
  EXPECT_FALSE(PageTouched(runs, 1, 4));
  EXPECT_TRUE(PageTouched(runs, 2, 4));
}

TEST(MemoAllocatorTest, APageOverOneUntouchedSmallBlockIsAdvisedAgainstHuge) {
  // Blocks of 2^16 8-byte entries (512 KiB): a page spans four of them.
  TouchedRuns runs{16, std::vector<uint8_t>(16, 1)};
  runs.touched[5] = 0;
  EXPECT_TRUE(PageTouched(runs, 0, 8));   // blocks 0-3
  EXPECT_FALSE(PageTouched(runs, 1, 8));  // blocks 4-7, 5 untouched
  EXPECT_TRUE(PageTouched(runs, 2, 8));
  // Entries past the table count as touched.
  EXPECT_TRUE(PageTouched(runs, 9, 8));
}

TEST(MemoAllocatorTest, ArraysAllocateUnderTouchedRuns) {
  const TouchedRuns runs{16, {1, 0, 1, 1, 0, 1, 1, 1}};
  TouchedRunsScope scope(runs);
  std::vector<double, MemoAllocator<double>> memo(size_t{1} << 19);
  memo[0] = 1;
  memo[memo.size() - 1] = 2;
  EXPECT_EQ(memo[0] + memo[memo.size() - 1], 3);
  EXPECT_EQ(reinterpret_cast<uintptr_t>(memo.data()) % kHugePage, 0u);
}

}  // namespace
}  // namespace sliceplan
