// Quoting user strings in messages: cut short, escaped, and the UTF-8
// check against the well-formedness rules of RFC 3629 (section 4 table).
#include "core/model/user_text.h"

#include "gtest/gtest.h"

namespace sliceplan {
namespace {

TEST(UserTextTest, ShortNamesPassUnchanged) { EXPECT_EQ(ShortName("berths"), "berths"); }

TEST(UserTextTest, LongNamesAreCutWithTheirLength) {
  const std::string cut = ShortName(std::string(1000, 'q'));
  EXPECT_EQ(cut, std::string(kQuotedPrefix, 'q') + "... (1000 bytes)");
}

TEST(UserTextTest, UnprintableBytesAreEscaped) {
  EXPECT_EQ(ShortName("a\xff\n\\"), "a\\xff\\x0a\\x5c");
}

TEST(UserTextTest, Utf8WellFormedness) {
  EXPECT_TRUE(IsValidUtf8("plain ascii"));
  EXPECT_TRUE(IsValidUtf8("\xc3\xa9"));           // U+00E9
  EXPECT_TRUE(IsValidUtf8("\xe2\x82\xac"));       // U+20AC
  EXPECT_TRUE(IsValidUtf8("\xf0\x9f\x9a\xa2"));   // U+1F6A2
  EXPECT_FALSE(IsValidUtf8("\xff"));              // never valid
  EXPECT_FALSE(IsValidUtf8("\xc3\x28"));          // bad continuation
  EXPECT_FALSE(IsValidUtf8("\xc0\xaf"));          // overlong '/'
  EXPECT_FALSE(IsValidUtf8("\xed\xa0\x80"));      // surrogate U+D800
  EXPECT_FALSE(IsValidUtf8("\xf4\x90\x80\x80"));  // past U+10FFFF
  EXPECT_FALSE(IsValidUtf8("\xe2\x82"));          // cut short
}

}  // namespace
}  // namespace sliceplan
