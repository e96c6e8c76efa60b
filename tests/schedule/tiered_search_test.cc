// The tiers behind one request (schedule/tiered_search.h), over the
// embedded pool: a forced tier answers with a valid plan of its own (or
// greedy's, where that is cheaper);
// exact is the optimum of the subset DP; auto is exact when it fits and
// never costlier than greedy when it does not; refusals name the reason.
#include "schedule/tiered_search.h"

#include <chrono>
#include <string>

#include "core/capacity/rate_calibration.h"
#include "core/cost/cluster_range.h"
#include "core/cost/cluster_recost.h"
#include "core/model/cardinality.h"
#include "gtest/gtest.h"
#include "schedule/embedded_pool.h"
#include "tests/support/cluster_reference.h"
#include "tests/support/reference_dp.h"
#include "tests/support/test_queries.h"
#include "tests/support/wide_queries.h"
#include "tiers/wide_plan.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

SearchOptions Bushy(bool cross_products) {
  SearchOptions options;
  options.cross_products = cross_products;
  return options;
}

// The cluster model with node counts {4, 16} and sample rates {1, 0.1}.
SearchOptions SmallCluster() {
  SearchOptions options;
  options.cost = CostModelKind::kCluster;
  options.cluster.params.node_counts = {4, 16};
  options.cluster.params.sample_rates = {1.0, 0.1};
  return options;
}

absl::StatusOr<TieredOutcome> Tiers(const WideQuery& q, const SearchOptions& options,
                                    SearchTier tier, double budget = 10) {
  TierRequest request;
  request.tier = tier;
  request.budget_seconds = budget;
  return RunEmbeddedTiers(q, options, request, 2);
}

TEST(TieredSearchTest, AForcedTierAnswersWithAValidPlan) {
  for (bool cross : {true, false}) {
    const Query exact = testing::MakeQuery(GraphShape::kRandom, 12, 4);
    const WideQuery q = WideQuery::FromExact(exact);
    const double best = testing::DpBestBushy(exact, cross);
    for (SearchTier tier :
         {SearchTier::kGreedy, SearchTier::kLinear, SearchTier::kIdp, SearchTier::kExact}) {
      SCOPED_TRACE(TierName(tier) + (cross ? " cross" : " connected"));
      auto out = Tiers(q, Bushy(cross), tier);
      ASSERT_TRUE(out.ok()) << out.status();
      // The answer is the cheapest plan found, greedy's included (idp and
      // linear start from it), named by the tier that found it.
      if (tier == SearchTier::kLinear || tier == SearchTier::kIdp) {
        EXPECT_TRUE(out->tier == tier || out->tier == SearchTier::kGreedy) << TierName(out->tier);
      } else {
        EXPECT_EQ(out->tier, tier);
      }
      EXPECT_TRUE(CheckWidePlan(out->plan, q.size()).ok());
      EXPECT_GE(out->plan.cost(), best * (1 - 1e-12));  // nothing beats the optimum
      if (tier == SearchTier::kExact) {
        EXPECT_TRUE(out->proven_optimal);
        EXPECT_NEAR(out->plan.cost(), best, best * 1e-12);
      }
    }
  }
}

TEST(TieredSearchTest, AutoRunsTheExactSearchWhenItFits) {
  const Query exact = testing::MakeQuery(GraphShape::kChain, 10, 1);
  auto out = Tiers(WideQuery::FromExact(exact), Bushy(true), SearchTier::kAuto);
  ASSERT_TRUE(out.ok()) << out.status();
  EXPECT_EQ(out->tier, SearchTier::kExact) << out->reason;
  EXPECT_TRUE(out->proven_optimal);
  const double best = testing::DpBestBushy(exact, true);
  EXPECT_NEAR(out->plan.cost(), best, best * 1e-12);
}

TEST(TieredSearchTest, AutoMeasuresTheRatesBeforeGivingTheExactSearchUp) {
  // A 22-relation random graph without cross products, and a budget that
  // the default connected rate (8 us per set, cautious) refuses: auto must
  // measure this machine's rate and run the exact search. The budget is
  // derived from both forecasts, so a slower build (sanitisers) is tested
  // the same way; a build too slow for any budget to separate them skips.
  const Query exact = testing::MakeQuery(GraphShape::kRandom, 22, 1);
  const ExactWork work = MeasureExactWork(exact, Bushy(false));
  const double by_default = FastestForecast(exact, Bushy(false), work, 1, {}).seconds;
  const auto start = std::chrono::steady_clock::now();
  auto rates = CalibrateRatesOnce(exact, Bushy(false));
  const double measuring =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  ASSERT_TRUE(rates.ok()) << rates.status();
  const double by_rate = FastestForecast(exact, Bushy(false), work, 1, *rates).seconds;
  const double budget = 0.9 * by_default / kExactShare;  // the defaults say no
  if (2 * measuring > kCalibrationShare * budget ||
      by_rate > 0.5 * kExactShare * (1 - kCalibrationShare) * budget) {
    GTEST_SKIP() << "this build measures " << by_rate << " s in " << measuring
                 << " s: no budget separates the forecasts";
  }
  TierRequest request;
  request.budget_seconds = budget;
  auto out = RunEmbeddedTiers(WideQuery::FromExact(exact), Bushy(false), request, 1);
  ASSERT_TRUE(out.ok()) << out.status();
  EXPECT_EQ(out->tier, SearchTier::kExact) << out->reason;
  EXPECT_TRUE(out->proven_optimal);
  EXPECT_NE(out->reason.find("rates measured on this machine"), std::string::npos) << out->reason;
  // With the defaults insisted on, the same budget gives the search up.
  request.rates_given = true;
  request.tier = SearchTier::kAuto;
  auto cautious = RunEmbeddedTiers(WideQuery::FromExact(exact), Bushy(false), request, 1);
  ASSERT_TRUE(cautious.ok()) << cautious.status();
  EXPECT_NE(cautious->tier, SearchTier::kExact) << cautious->reason;
}

TEST(TieredSearchTest, APartialExactRunWithNoSliceSolvedStillAnswers) {
  // The exact tier forced, a deadline no slice can meet, the best plan so
  // far asked for: greedy's plan, marked unproven, never an error.
  const Query exact = testing::MakeQuery(GraphShape::kClique, 18, 2);
  const WideQuery q = WideQuery::FromExact(exact);
  TierRequest request;
  request.tier = SearchTier::kExact;
  ScheduleOptions schedule;
  schedule.partial_on_deadline = true;
  schedule.deadline = SteadyAfter(0.001);
  auto out = RunEmbeddedTiers(q, Bushy(true), request, 1, schedule);
  ASSERT_TRUE(out.ok()) << out.status();
  EXPECT_FALSE(out->proven_optimal);
  EXPECT_EQ(out->tier, SearchTier::kGreedy) << out->reason;
  EXPECT_TRUE(CheckWidePlan(out->plan, q.size()).ok());
  EXPECT_NE(out->reason.find("not proven optimal"), std::string::npos) << out->reason;
  // Without partial answers the deadline is still an error.
  schedule.partial_on_deadline = false;
  schedule.deadline = SteadyAfter(0.001);
  EXPECT_EQ(RunEmbeddedTiers(q, Bushy(true), request, 1, schedule).status().code(),
            absl::StatusCode::kDeadlineExceeded);
}

// The cluster model under auto: a small query gets the exact frontier,
// proven; a query the exact search cannot finish in half the time gets
// the anytime set (not proven), never nothing, every plan's metrics its
// physical choices' (recomputed here).
TEST(TieredSearchTest, TheClusterModelGetsASetAtEverySize) {
  SearchOptions options = SmallCluster();
  const Query small = testing::MakeQuery(GraphShape::kRandom, 6, 2);
  auto exact = Tiers(WideQuery::FromExact(small), options, SearchTier::kAuto, 10);
  ASSERT_TRUE(exact.ok()) << exact.status();
  EXPECT_EQ(exact->tier, SearchTier::kExact);
  EXPECT_TRUE(exact->proven_optimal);
  const Query large = testing::MakeQuery(GraphShape::kRandom, 26, 2);
  const auto start = std::chrono::steady_clock::now();
  auto anytime = Tiers(WideQuery::FromExact(large), options, SearchTier::kAuto, 1);
  EXPECT_LT(std::chrono::steady_clock::now() - start, std::chrono::milliseconds(1500));
  ASSERT_TRUE(anytime.ok()) << anytime.status();
  EXPECT_EQ(anytime->tier, SearchTier::kAnytime);
  EXPECT_FALSE(anytime->proven_optimal);
  ASSERT_FALSE(anytime->frontier.empty());
  const Cardinality card(large);
  for (const WidePlan& wide : anytime->frontier) {
    const Plan plan = ToExactPlan(wide);
    auto again = RecostClusterPlan(large, card, options.cluster.params, plan);
    ASSERT_TRUE(again.ok()) << again.status();
    EXPECT_NEAR(again->back().latency_s, plan.root().metrics.latency_s,
                1e-9 * plan.root().metrics.latency_s);
    EXPECT_NEAR(again->back().node_seconds, plan.root().metrics.node_seconds,
                1e-9 * plan.root().metrics.node_seconds);
  }
  auto forced = Tiers(WideQuery::FromExact(small), options, SearchTier::kAnytime, 0.3);
  ASSERT_TRUE(forced.ok()) << forced.status();
  EXPECT_EQ(forced->tier, SearchTier::kAnytime);
  EXPECT_NE(forced->reason.find("anytime: requested"), std::string::npos) << forced->reason;
}

// Past the exact engine's 64 relations the cluster model's auto and
// anytime tiers answer with a Pareto set: every plan a valid tree over
// all relations, the set non-dominated, each plan's metrics recomputed
// from its tree and physical choices by the independent reference (its
// own cardinalities), the chosen plan the answer's. The exact tier alone
// is refused by size.
void ExpectAValidWideFrontier(const TieredOutcome& out, const WideQuery& q,
                              const ClusterParams& params) {
  ASSERT_FALSE(out.frontier.empty());
  ASSERT_TRUE(out.chosen.has_value());
  EXPECT_EQ(WideTreeString(out.plan, q), WideTreeString(out.frontier[*out.chosen], q));
  for (size_t i = 0; i < out.frontier.size(); ++i) {
    const WidePlan& plan = out.frontier[i];
    ASSERT_TRUE(CheckWidePlan(plan, q.size()).ok()) << CheckWidePlan(plan, q.size());
    const testing::RefCosts ref = testing::RefCostsOfWide(q, params, plan);
    const ClusterCosts& m = plan.root().metrics;
    EXPECT_NEAR(ref.latency, m.latency_s, 1e-9 * m.latency_s) << i;
    EXPECT_NEAR(ref.node_seconds, m.node_seconds, 1e-9 * m.node_seconds) << i;
    EXPECT_NEAR(ref.completeness, m.completeness, 1e-12) << i;
    for (size_t j = 0; j < out.frontier.size(); ++j) {
      const ClusterCosts& o = out.frontier[j].root().metrics;
      EXPECT_FALSE(j != i && o.latency_s <= m.latency_s && o.node_seconds <= m.node_seconds &&
                   o.completeness >= m.completeness)
          << "plan " << j << " dominates plan " << i;
    }
  }
}

TEST(TieredSearchTest, TheClusterModelTakesQueriesPastSixtyFourRelations) {
  SearchOptions options = SmallCluster();
  const WideQuery q65 = testing::MakeWideQuery(testing::WideShape::kTreeWithCycles, 65, 7);
  for (SearchTier tier : {SearchTier::kAuto, SearchTier::kAnytime}) {
    auto out = Tiers(q65, options, tier, 0.5);
    ASSERT_TRUE(out.ok()) << out.status();
    EXPECT_EQ(out->tier, SearchTier::kAnytime);
    EXPECT_FALSE(out->proven_optimal);
    ExpectAValidWideFrontier(*out, q65, options.cluster.params);
  }
  auto exact = Tiers(q65, options, SearchTier::kExact, 0.5);
  ASSERT_FALSE(exact.ok());
  EXPECT_EQ(exact.status().code(), absl::StatusCode::kInvalidArgument);
  EXPECT_NE(exact.status().message().find("the anytime tier, or auto, takes any size"),
            std::string::npos)
      << exact.status();
}

TEST(TieredSearchTest, AThousandRelationsGetAParetoSetWithinTheDeadline) {
  SearchOptions options = SmallCluster();
  const WideQuery q = testing::MakeWideQuery(testing::WideShape::kTreeWithCycles, 1000, 3);
  for (const bool cross : {true, false}) {
    options.cross_products = cross;
    const auto start = std::chrono::steady_clock::now();
    auto out = Tiers(q, options, SearchTier::kAuto, 1.5);
    EXPECT_LT(std::chrono::steady_clock::now() - start, std::chrono::seconds(5));
    ASSERT_TRUE(out.ok()) << out.status();
    EXPECT_EQ(out->tier, SearchTier::kAnytime);
    ExpectAValidWideFrontier(*out, q, options.cluster.params);
    if (!cross) {
      for (const WidePlan& p : out->frontier) EXPECT_FALSE(HasCrossProduct(p, q));
    }
  }
}

TEST(TieredSearchTest, ASaturatingJoinIsRefusedAtAnySize) {
  // 100 relations of 1e300 rows and no predicate: every plan's cost is the
  // ceiling, whichever tier builds it (docs/numeric-range.md).
  std::vector<Relation> relations;
  for (int i = 0; i < 100; ++i) relations.push_back({"r" + std::to_string(i), 1e300});
  auto q = WideQuery::Create(std::move(relations), {});
  ASSERT_TRUE(q.ok());
  for (SearchTier tier : {SearchTier::kAuto, SearchTier::kGreedy, SearchTier::kIdp}) {
    auto out = Tiers(*q, Bushy(true), tier);
    ASSERT_FALSE(out.ok()) << TierName(tier);
    EXPECT_EQ(out.status().code(), absl::StatusCode::kOutOfRange) << out.status();
    EXPECT_NE(out.status().message().find("the join of all 100 relations"), std::string::npos);
  }
}

TEST(TieredSearchTest, AutoPastTheExactReachIsNeverCostlierThanGreedy) {
  const WideQuery q = testing::MakeWideQuery(testing::WideShape::kSnowflake, 120, 3);
  auto out = Tiers(q, Bushy(true), SearchTier::kAuto, 2);
  ASSERT_TRUE(out.ok()) << out.status();
  EXPECT_NE(out->tier, SearchTier::kExact);
  EXPECT_FALSE(out->proven_optimal);
  EXPECT_TRUE(CheckWidePlan(out->plan, q.size()).ok());
  auto greedy = Tiers(q, Bushy(true), SearchTier::kGreedy);
  ASSERT_TRUE(greedy.ok());
  EXPECT_LE(out->plan.cost(), greedy->plan.cost());
  EXPECT_LE(out->plan.cost(), out->start_cost);
}

TEST(TieredSearchTest, RefusalsNameTheReason) {
  const WideQuery q = WideQuery::FromExact(testing::MakeQuery(GraphShape::kStar, 8, 2));
  SearchOptions left_deep = Bushy(true);
  left_deep.shape = PlanShape::kLeftDeep;
  auto idp = Tiers(q, left_deep, SearchTier::kIdp);
  EXPECT_EQ(idp.status().code(), absl::StatusCode::kInvalidArgument) << idp.status();
  SearchOptions cluster = Bushy(true);
  cluster.cost = CostModelKind::kCluster;
  auto greedy = Tiers(q, cluster, SearchTier::kGreedy);
  EXPECT_EQ(greedy.status().code(), absl::StatusCode::kInvalidArgument) << greedy.status();
  const WideQuery apart = testing::MakeWideQuery(testing::WideShape::kTree, 80, 1);
  auto exact = Tiers(apart, Bushy(true), SearchTier::kExact);
  EXPECT_EQ(exact.status().code(), absl::StatusCode::kInvalidArgument) << exact.status();
  EXPECT_NE(exact.status().message().find("64"), std::string::npos) << exact.status();
}

// Cluster parameters that saturate every plan are refused in every tier,
// naming them: up front where even the cheapest stage saturates, after the
// search where only the plans' larger stages do (the anytime tier used to
// return a set of plans at the ceiling).
TEST(TieredSearchTest, SaturatingClusterParametersAreRefusedInEveryTier) {
  const WideQuery q = WideQuery::FromExact(testing::MakeQuery(GraphShape::kRandom, 6, 3));
  SearchOptions startup = Bushy(true);
  startup.cost = CostModelKind::kCluster;
  startup.cluster.params.stage_startup_s = 1e308;
  SearchOptions slow = Bushy(true);
  slow.cost = CostModelKind::kCluster;
  slow.cluster.params.cpu_rows_per_s = 1e-296;
  slow.cluster.params.net_bytes_per_s = 1e-296;
  slow.cluster.params.scan_bytes_per_s = 1e-296;
  // Only the plans' larger stages saturate: the refusal comes after the
  // search, not up front.
  ASSERT_TRUE(CheckClusterInRange(q.relations(), slow.cluster.params).ok());
  for (SearchTier tier : {SearchTier::kAuto, SearchTier::kExact, SearchTier::kAnytime}) {
    SCOPED_TRACE(TierName(tier));
    auto out = Tiers(q, startup, tier, 1);
    EXPECT_TRUE(absl::IsOutOfRange(out.status())) << out.status();
    EXPECT_NE(out.status().message().find("stage_startup_s"), std::string::npos) << out.status();
    out = Tiers(q, slow, tier, 1);
    EXPECT_TRUE(absl::IsOutOfRange(out.status())) << out.status();
    EXPECT_NE(out.status().message().find("cpu_rows_per_s"), std::string::npos) << out.status();
  }
}

// The anytime search reports the set's size at least once a second (and
// at its end), through the request's progress callback.
TEST(TieredSearchTest, TheAnytimeSearchReportsItsSetsSizeEverySecond) {
  const WideQuery q = WideQuery::FromExact(testing::MakeQuery(GraphShape::kRandom, 12, 5));
  SearchOptions cluster = Bushy(true);
  cluster.cost = CostModelKind::kCluster;
  std::vector<ScheduleProgress> events;
  ScheduleOptions schedule;
  schedule.on_progress = [&](const ScheduleProgress& p) { events.push_back(p); };
  TierRequest request;
  request.tier = SearchTier::kAnytime;
  request.budget_seconds = 1.3;
  auto out = RunEmbeddedTiers(q, cluster, request, 1, schedule);
  ASSERT_TRUE(out.ok()) << out.status();
  ASSERT_GE(events.size(), 2u);  // at about 1 s, and at the end
  for (size_t i = 0; i < events.size(); ++i) {
    ASSERT_TRUE(events[i].frontier_plans.has_value());
    EXPECT_GT(*events[i].frontier_plans, 0u);
    EXPECT_GT(events[i].trees, 0u);
    if (i > 0) {
      EXPECT_GE(events[i].elapsed_seconds, events[i - 1].elapsed_seconds);
    }
  }
  EXPECT_EQ(*events.back().frontier_plans, out->frontier.size());
}

TEST(TieredSearchTest, ADisconnectedGraphWithoutCrossProductsIsNotFound) {
  const Query two = testing::MakeQueryOrDie({{"quays", 10, 8}, {"tugs", 20, 8}}, {});
  auto out = Tiers(WideQuery::FromExact(two), Bushy(false), SearchTier::kAuto);
  EXPECT_EQ(out.status().code(), absl::StatusCode::kNotFound) << out.status();
}

}  // namespace
}  // namespace sliceplan
