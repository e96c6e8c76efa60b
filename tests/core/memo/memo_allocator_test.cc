// Which 2 MiB pages of a memo array a sliced search leaves to the kernel's
// huge-page policy: only those wholly inside touched blocks; the others are
// advised against huge pages (memo_allocator.h).
#include "core/memo/memo_allocator.h"

#include <cstdio>
#include <fstream>
#include <string>
#include <vector>

#include "gtest/gtest.h"

namespace sliceplan {
namespace {

using memo_allocator_internal::kHugePage;
using memo_allocator_internal::WhollyTouched;

// Blocks of 2^bits entries, touched where `table` says so (blocks past it
// count as touched).
TouchedRuns Runs(int bits, std::vector<uint8_t> table) {
  return {bits, [table](uint64_t b) { return b >= table.size() || table[b] != 0; }};
}

// A page's first and last entry for elements of `bytes` each.
bool PageTouched(const TouchedRuns& runs, uint64_t page, uint64_t bytes) {
  return WhollyTouched(runs, page * kHugePage / bytes, ((page + 1) * kHugePage - 1) / bytes);
}

TEST(MemoAllocatorTest, BlocksOfTwoMiBOrMoreTouchWholePages) {
  // Blocks of 2^19 entries: 4 MiB of 8-byte entries, 2 MiB of 4-byte ones.
  const TouchedRuns runs = Runs(19, {1, 0, 1, 1});
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
  std::vector<uint8_t> table(16, 1);
  table[5] = 0;
  const TouchedRuns runs = Runs(16, table);
  EXPECT_TRUE(PageTouched(runs, 0, 8));   // blocks 0-3
  EXPECT_FALSE(PageTouched(runs, 1, 8));  // blocks 4-7, 5 untouched
  EXPECT_TRUE(PageTouched(runs, 2, 8));
  EXPECT_TRUE(PageTouched(runs, 9, 8));
}

// The kernel's flags of the mapping holding `address` (/proc/self/smaps's
// VmFlags line: "nh" is advised against huge pages); "" if none found.
std::string VmFlags(const void* address) {
  std::ifstream smaps("/proc/self/smaps");
  const auto at = reinterpret_cast<uintptr_t>(address);
  bool inside = false;
  for (std::string line; std::getline(smaps, line);) {
    uintptr_t begin = 0, end = 0;
    if (std::sscanf(line.c_str(), "%lx-%lx ", &begin, &end) == 2 && line.find('-') < 16) {
      inside = begin <= at && at < end;
    } else if (inside && line.rfind("VmFlags:", 0) == 0) {
      return line;
    }
  }
  return "";
}

bool NoHuge(const void* address) { return VmFlags(address).find(" nh") != std::string::npos; }

// Blocks of 4 MiB of doubles, the middle one untouched: its two pages
// are advised against huge pages, the others are left to the kernel.
TEST(MemoAllocatorTest, UntouchedPagesAreAdvisedAgainstHugePages) {
  if (!std::ifstream("/sys/kernel/mm/transparent_hugepage/enabled")) {
    GTEST_SKIP() << "no transparent huge pages on this kernel: nothing to advise";
  }
  const TouchedRuns runs = Runs(19, {1, 0, 1});
  TouchedRunsScope scope(runs);
  std::vector<double, MemoAllocator<double>> memo(size_t{3} << 19);
  const char* base = reinterpret_cast<const char*>(memo.data());
  ASSERT_EQ(reinterpret_cast<uintptr_t>(base) % kHugePage, 0u);
  ASSERT_NE(VmFlags(base), "") << "no smaps entry";
  EXPECT_FALSE(NoHuge(base));
  EXPECT_FALSE(NoHuge(base + kHugePage));
  EXPECT_TRUE(NoHuge(base + 2 * kHugePage));
  EXPECT_TRUE(NoHuge(base + 3 * kHugePage));
  EXPECT_FALSE(NoHuge(base + 4 * kHugePage));
  EXPECT_FALSE(NoHuge(base + 5 * kHugePage));
}

// Outside a scope no page of a block is advised either way, and the
// block is aligned to a huge page.
TEST(MemoAllocatorTest, BlocksOutsideAScopeAreLeftToTheKernel) {
  std::vector<double, MemoAllocator<double>> memo(size_t{1} << 19);
  const char* base = reinterpret_cast<const char*>(memo.data());
  EXPECT_EQ(reinterpret_cast<uintptr_t>(base) % kHugePage, 0u);
  EXPECT_FALSE(NoHuge(base));
  EXPECT_FALSE(NoHuge(base + kHugePage));
}

}  // namespace
}  // namespace sliceplan
