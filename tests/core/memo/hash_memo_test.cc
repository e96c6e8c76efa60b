// The open-addressing memo: slots in insertion order that survive the
// index doubling, every set found again, the slot limit refused.
#include "core/memo/hash_memo.h"

#include <random>
#include <vector>

#include "gtest/gtest.h"

namespace sliceplan {
namespace {

TEST(HashMemoTest, SlotsFollowInsertionOrderAndSurviveGrowth) {
  HashMemo memo(1 << 20);
  std::mt19937_64 rng(5);
  std::vector<RelSet> sets;
  for (int i = 0; i < 100000; ++i) {
    RelSet s = rng() | 1;  // never empty
    bool added = false;
    const Slot slot = memo.Insert(s, added);
    if (!added) continue;  // a repeat (unlikely with 64 random bits)
    EXPECT_EQ(slot, sets.size());
    sets.push_back(s);
  }
  ASSERT_EQ(memo.size(), sets.size());
  for (size_t i = 0; i < sets.size(); ++i) {
    ASSERT_EQ(memo.Find(sets[i]), static_cast<Slot>(i));
    ASSERT_EQ(memo.SetOf(static_cast<Slot>(i)), sets[i]);
  }
  EXPECT_FALSE(memo.Find(2).has_value());
  // At most half full: the index holds at least two entries per set.
  EXPECT_GE(memo.bytes(), sets.size() * (sizeof(RelSet) + 2 * 16));
}

TEST(HashMemoTest, KnownSetKeepsItsSlot) {
  HashMemo memo(8);
  bool added = false;
  EXPECT_EQ(memo.Insert(0b101, added), 0u);
  EXPECT_TRUE(added);
  EXPECT_EQ(memo.Insert(0b11, added), 1u);
  EXPECT_EQ(memo.Insert(0b101, added), 0u);
  EXPECT_FALSE(added);
  EXPECT_EQ(memo.size(), 2u);
}

TEST(HashMemoTest, RefusesPastTheSlotLimit) {
  HashMemo memo(3);
  bool added = false;
  for (RelSet s : {RelSet{1}, RelSet{2}, RelSet{4}}) EXPECT_NE(memo.Insert(s, added), kNoSlot);
  EXPECT_EQ(memo.Insert(8, added), kNoSlot);
  EXPECT_FALSE(added);
  EXPECT_EQ(memo.Insert(2, added), 1u);  // known sets are still found
  EXPECT_EQ(memo.size(), 3u);
}

}  // namespace
}  // namespace sliceplan
