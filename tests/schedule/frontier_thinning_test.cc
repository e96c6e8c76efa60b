// Thinning an anytime set (schedule/frontier_thinning.h): the indices kept
// are spread from the first plan to the last, the chosen one among them,
// exactly `keep` of them where the chosen one is not already a spread
// point; the outcome's chosen index follows its plan; nothing changes
// when the set already fits.
#include "schedule/frontier_thinning.h"

#include <gtest/gtest.h>

namespace sliceplan {
namespace {

TEST(FrontierThinningTest, SpreadIndicesByHand) {
  EXPECT_EQ(SpreadIndices(10, 3, std::nullopt), (std::vector<size_t>{0, 4, 9}));
  EXPECT_EQ(SpreadIndices(10, 4, std::nullopt), (std::vector<size_t>{0, 3, 6, 9}));
  // The chosen plan takes one place; the rest spread from first to last.
  EXPECT_EQ(SpreadIndices(10, 4, 5), (std::vector<size_t>{0, 4, 5, 9}));
  // A chosen plan that is a spread point leaves one place unused.
  EXPECT_EQ(SpreadIndices(10, 3, 9), (std::vector<size_t>{0, 9}));
  EXPECT_EQ(SpreadIndices(10, 1, 7), (std::vector<size_t>{7}));
  EXPECT_EQ(SpreadIndices(10, 1, std::nullopt), (std::vector<size_t>{0}));
  EXPECT_EQ(SpreadIndices(3, 5, 1), (std::vector<size_t>{0, 1, 2}));
}

TEST(FrontierThinningTest, KeepsAtMostKeepAndTheChosenOne) {
  for (size_t size = 1; size <= 40; ++size) {
    for (size_t keep = 1; keep <= size + 1; ++keep) {
      for (size_t chosen = 0; chosen < size; chosen += 3) {
        const std::vector<size_t> got = SpreadIndices(size, keep, chosen);
        EXPECT_LE(got.size(), std::min(size, keep));
        EXPECT_TRUE(std::is_sorted(got.begin(), got.end()));
        EXPECT_TRUE(std::find(got.begin(), got.end(), chosen) != got.end());
        if (keep >= 3) {  // both ends whenever two spread places exist
          EXPECT_EQ(got.front(), 0u);
          EXPECT_EQ(got.back(), size - 1);
        }
      }
    }
  }
}

TieredOutcome SetOf(size_t n) {
  TieredOutcome out;
  out.tier = SearchTier::kAnytime;
  out.reason = "anytime: requested";
  for (size_t i = 0; i < n; ++i) {
    WidePlan p;
    WideNode leaf;
    leaf.relation = 0;
    leaf.metrics.latency_s = static_cast<double>(i);
    p.nodes.push_back(leaf);
    out.frontier.push_back(p);
  }
  return out;
}

TEST(FrontierThinningTest, TheChosenIndexFollowsItsPlan) {
  TieredOutcome out = SetOf(10);
  out.chosen = 5;
  ThinFrontier(out, 4, "a test's limit");
  ASSERT_EQ(out.frontier.size(), 4u);
  ASSERT_TRUE(out.chosen.has_value());
  EXPECT_EQ(out.frontier[*out.chosen].root().metrics.latency_s, 5);
  EXPECT_EQ(out.frontier.front().root().metrics.latency_s, 0);
  EXPECT_EQ(out.frontier.back().root().metrics.latency_s, 9);
  EXPECT_NE(out.reason.find("; 4 of the 10 plans are returned (a test's limit)"), std::string::npos)
      << out.reason;
  TieredOutcome none = SetOf(10);  // no plan met the bounds
  ThinFrontier(none, 2, "x");
  EXPECT_FALSE(none.chosen.has_value());
  EXPECT_EQ(none.frontier.size(), 2u);
  TieredOutcome fits = SetOf(3);
  fits.chosen = 2;
  ThinFrontier(fits, 3, "x");
  EXPECT_EQ(fits.frontier.size(), 3u);
  EXPECT_EQ(fits.reason, "anytime: requested");
}

}  // namespace
}  // namespace sliceplan
