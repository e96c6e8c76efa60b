// Choosing the plan an answer names from a frontier: bounds filter,
// the preference (one metric, or weights) ranks, and no plan meeting the
// bounds is said, not guessed. Frontier values are hand-made.
#include "core/cost/plan_choice.h"

#include "gtest/gtest.h"

namespace sliceplan {
namespace {

// latency, node-seconds, completeness
const std::vector<ClusterCosts> kFrontier = {
    {10, 400, 0.5}, {20, 100, 0.9}, {40, 50, 1.0}, {80, 40, 1.0}};

TEST(PlanChoiceTest, DefaultIsTheFastest) { EXPECT_EQ(ChoosePlan(kFrontier, {}), 0u); }

TEST(PlanChoiceTest, BestOnOneMetric) {
  EXPECT_EQ(ChoosePlan(kFrontier, {{}, Preference::Best(Metric::kNodeSeconds)}), 3u);
  // Most complete; of the two complete plans the first in frontier order.
  EXPECT_EQ(ChoosePlan(kFrontier, {{}, Preference::Best(Metric::kCompleteness)}), 2u);
}

// Weights 1 on latency and 0.5 on node-seconds: scores 210, 70, 65, 100.
TEST(PlanChoiceTest, WeightedSum) {
  EXPECT_EQ(ChoosePlan(kFrontier, {{}, {1, 0.5, 0}}), 2u);
  // With 1000 on incompleteness: 210 + 500, 70 + 100, 65, 100: still 2.
  EXPECT_EQ(ChoosePlan(kFrontier, {{}, {1, 0.5, 1000}}), 2u);
  // Node-seconds only weighted lightly, latency heavily: the fastest.
  EXPECT_EQ(ChoosePlan(kFrontier, {{}, {100, 0.01, 0}}), 0u);
}

TEST(PlanChoiceTest, BoundsFilterBeforeThePreference) {
  const ChoiceRule rule{{{Metric::kCompleteness, false, 0.95}}, Preference::Best(Metric::kLatency)};
  EXPECT_EQ(ChoosePlan(kFrontier, rule), 2u);
  const ChoiceRule two{{{Metric::kCompleteness, false, 0.8}, {Metric::kNodeSeconds, true, 60}},
                       Preference::Best(Metric::kLatency)};
  EXPECT_EQ(ChoosePlan(kFrontier, two), 2u);
}

TEST(PlanChoiceTest, NoPlanMeetingTheBoundsIsNone) {
  const ChoiceRule rule{{{Metric::kLatency, true, 5}}, {}};
  EXPECT_FALSE(ChoosePlan(kFrontier, rule).has_value());
  EXPECT_FALSE(ChoosePlan({}, {}).has_value());
}

TEST(PlanChoiceTest, ParsersForTheCommandLine) {
  auto b = ParseBound("latency_s<=60");
  ASSERT_TRUE(b.ok());
  EXPECT_TRUE(b->metric == Metric::kLatency && b->at_most && b->value == 60);
  EXPECT_FALSE(ParseBound("latency_s<60").ok());
  EXPECT_FALSE(ParseBound("speed<=1").ok());
  auto p = ParsePreference("weights:latency_s=1,node_seconds=0.01");
  ASSERT_TRUE(p.ok());
  EXPECT_TRUE(p->latency == 1 && p->node_seconds == 0.01 && p->incompleteness == 0);
  EXPECT_EQ(ParsePreference("weights:node_seconds=1,node_seconds=2").status().message(),
            "prefer: node_seconds is weighted twice");
}

}  // namespace
}  // namespace sliceplan
