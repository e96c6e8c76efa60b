// The direct memo: the slot is the set, one bit per set, erasure.
#include "core/memo/direct_memo.h"

#include "gtest/gtest.h"

namespace sliceplan {
namespace {

TEST(DirectMemoTest, SlotIsTheSetAndBitsTrackMembership) {
  DirectMemo memo(10);
  EXPECT_EQ(memo.slot_count(), 1024u);
  EXPECT_EQ(memo.bytes(), 128u);
  EXPECT_EQ(DirectMemo::BitmapBytes(10), 128u);
  bool added = false;
  EXPECT_EQ(memo.Insert(0b1011, added), 0b1011u);
  EXPECT_TRUE(added);
  EXPECT_EQ(memo.Insert(0b1011, added), 0b1011u);
  EXPECT_FALSE(added);
  EXPECT_EQ(memo.Insert(1023, added), 1023u);
  EXPECT_EQ(memo.size(), 2u);
  EXPECT_EQ(memo.Find(0b1011), 0b1011u);
  EXPECT_FALSE(memo.Find(0b1010).has_value());
  EXPECT_EQ(memo.SetOf(77), 77u);
  EXPECT_EQ(memo.words()[0], uint64_t{1} << 0b1011);
  memo.Erase(0b1011);
  memo.Erase(0b1011);  // erasing twice is harmless
  EXPECT_FALSE(memo.Contains(0b1011));
  EXPECT_EQ(memo.size(), 1u);
}

TEST(DirectMemoTest, SmallQueriesTakeOneWord) {
  DirectMemo memo(3);
  EXPECT_EQ(memo.words().size(), 1u);
  bool added = false;
  memo.Insert(7, added);
  EXPECT_TRUE(memo.Contains(7));
  EXPECT_EQ(memo.size(), 1u);
}

}  // namespace
}  // namespace sliceplan
