#include "rpc/request_id.h"

#include <set>

#include "gtest/gtest.h"

namespace sliceplan {
namespace {

TEST(RequestIdTest, ValidIdsArePlainTokensUpToTheLimit) {
  EXPECT_TRUE(IsValidRequestId("4f1c-a.b_c:9"));
  EXPECT_TRUE(IsValidRequestId(std::string(kMaxRequestIdBytes, 'a')));
  EXPECT_FALSE(IsValidRequestId(""));
  EXPECT_FALSE(IsValidRequestId(std::string(kMaxRequestIdBytes + 1, 'a')));
  for (const char* bad : {"a b", "a\"b", "a\nb", "a=b", "a/b", "\xc3\xa9"}) {
    EXPECT_FALSE(IsValidRequestId(bad)) << bad;
  }
}

TEST(RequestIdTest, NewIdsAreSixteenHexDigitsAndDiffer) {
  std::set<std::string> seen;
  for (int i = 0; i < 1000; ++i) {
    const std::string id = NewRequestId();
    ASSERT_EQ(id.size(), 16u);
    EXPECT_EQ(id.find_first_not_of("0123456789abcdef"), std::string::npos) << id;
    EXPECT_TRUE(IsValidRequestId(id));
    seen.insert(id);
  }
  EXPECT_EQ(seen.size(), 1000u);  // 1000 draws of 64 bits: a repeat has odds near 3e-14
}

}  // namespace
}  // namespace sliceplan
