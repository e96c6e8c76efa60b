// Prepared queries (templates/template_prepare.h, templates/plan_set.h,
// wire/query_template.h): the grid guarantee recomputed from the stored
// plans and independent optima (the subset DP of tests/support); choose
// against a fresh optimization at random points inside the box; the plan
// set file round trip; bad templates and values refused by name.
#include "templates/template_prepare.h"

#include <atomic>
#include <cmath>
#include <random>
#include <string>

#include "core/plan_cover.h"
#include "core/slice_solver.h"
#include "gtest/gtest.h"
#include "templates/plan_set.h"
#include "tests/support/reference_dp.h"

namespace sliceplan {
namespace {

// A 7-relation yard template: the berths' rows and a moves-cranes
// selectivity are parameters spanning 3 and 4 decades.
constexpr char kTemplate[] = R"({
  "relations": [
    {"name": "moves", "rows": 2e6}, {"name": "cranes", "rows": 40},
    {"name": "berths", "rows": {"parameter": "berth_rows"}}, {"name": "vessels", "rows": 900},
    {"name": "shifts", "rows": 300}, {"name": "crews", "rows": 1200}, {"name": "yards", "rows": 15}
  ],
  "predicates": [
    {"relations": ["moves", "cranes"], "selectivity": {"parameter": "since"}},
    {"relations": ["cranes", "berths"], "selectivity": 0.02},
    {"relations": ["berths", "vessels"], "selectivity": 0.001},
    {"relations": ["moves", "shifts"], "selectivity": 0.003},
    {"relations": ["shifts", "crews"], "selectivity": 0.004},
    {"relations": ["berths", "yards"], "selectivity": 0.05},
    {"relations": ["moves", "vessels"], "selectivity": 0.0011}
  ],
  "parameters": [{"name": "berth_rows", "min": 10, "max": 10000},
                 {"name": "since", "min": 1e-5, "max": 0.1}]
})";

QueryTemplate Yard() {
  auto t = QueryTemplate::Parse(kTemplate);
  EXPECT_TRUE(t.ok()) << t.status();
  return *std::move(t);
}

TEST(TemplatePrepareTest, EveryGridPointHasAStoredPlanWithinTheRatio) {
  const QueryTemplate t = Yard();
  PrepareOptions options;
  options.grid = 6;
  options.max_ratio = 1.2;
  options.workers = 2;
  auto prepared = PrepareTemplate(t, options);
  ASSERT_TRUE(prepared.ok()) << prepared.status();
  EXPECT_EQ(prepared->grid_points, 36u);
  ASSERT_FALSE(prepared->plans.empty());
  EXPECT_LE(prepared->plans.size(), prepared->distinct_optima);
  const auto a = GridValues(t.parameters()[0], 6), b = GridValues(t.parameters()[1], 6);
  EXPECT_DOUBLE_EQ(a.front(), 10);
  EXPECT_DOUBLE_EQ(a.back(), 10000);
  EXPECT_NEAR(a[1], 10 * std::pow(1000.0, 0.2), 1e-9);  // log-spaced
  double worst = 1;
  for (double x : a) {
    for (double y : b) {
      auto q = t.At(std::vector<double>{x, y});
      ASSERT_TRUE(q.ok());
      const double optimum = testing::DpBestBushy(*q, true);
      double least = 1e300;
      for (Plan plan : prepared->plans) least = std::min(least, CostPlanOn(plan, *q));
      EXPECT_GE(least, optimum * (1 - 1e-12));
      EXPECT_LE(least, 1.2 * optimum * (1 + 1e-12)) << x << " " << y;
      worst = std::max(worst, least / optimum);
    }
  }
  EXPECT_NEAR(prepared->worst_ratio, worst, 1e-9 * worst);
}

TEST(TemplatePrepareTest, ChooseIsTheCheapestStoredPlanAtRandomPoints) {
  const QueryTemplate t = Yard();
  PrepareOptions options;
  options.grid = 5;
  auto prepared = PrepareTemplate(t, options);
  ASSERT_TRUE(prepared.ok()) << prepared.status();
  std::mt19937_64 rng(11);
  std::uniform_real_distribution<double> u(0, 1);
  for (int i = 0; i < 40; ++i) {
    const std::vector<double> v{10 * std::pow(1000.0, u(rng)), 1e-5 * std::pow(1e4, u(rng))};
    auto choice = ChooseStoredPlan(t, *prepared, v, false);
    ASSERT_TRUE(choice.ok()) << choice.status();
    auto q = t.At(v);
    ASSERT_TRUE(q.ok());
    double least = 1e300;
    for (Plan plan : prepared->plans) least = std::min(least, CostPlanOn(plan, *q));
    EXPECT_DOUBLE_EQ(choice->plan.root().cost, least);
    // Never below the optimum there, and within the bound for the whole
    // box (the cell-corner argument of docs/templates.md).
    const double optimum = testing::DpBestBushy(*q, true);
    EXPECT_GE(choice->plan.root().cost, optimum * (1 - 1e-12));
    ASSERT_TRUE(prepared->box_ratio_bound.has_value());
    EXPECT_LE(choice->plan.root().cost, optimum * *prepared->box_ratio_bound * (1 + 1e-12));
  }
  EXPECT_GE(*prepared->box_ratio_bound, prepared->worst_ratio);
  auto robust = ChooseStoredPlan(t, *prepared, std::vector<double>{100, 1e-3}, true);
  ASSERT_TRUE(robust.ok());
  for (double w : prepared->plan_worst) EXPECT_LE(prepared->plan_worst[robust->index], w);
}

// The box bound by hand on a one-parameter grid of 2 points: one cell,
// the optimum at the lower corner and the best kept plan at the upper.
TEST(TemplatePrepareTest, TheBoxBoundIsTheCellCornerRatio) {
  auto t = QueryTemplate::Parse(R"({
    "relations": [{"name": "a", "rows": {"parameter": "n"}}, {"name": "b", "rows": 100},
                  {"name": "c", "rows": 10}],
    "predicates": [{"relations": ["a", "b"], "selectivity": 0.01},
                   {"relations": ["b", "c"], "selectivity": 0.1}],
    "parameters": [{"name": "n", "min": 10, "max": 1000}]})");
  ASSERT_TRUE(t.ok()) << t.status();
  PrepareOptions options;
  options.grid = 2;
  options.max_ratio = 1e6;  // keeps one plan
  auto prepared = PrepareTemplate(*t, options);
  ASSERT_TRUE(prepared.ok()) << prepared.status();
  ASSERT_EQ(prepared->plans.size(), 1u);
  auto low = t->At(std::vector<double>{10}), high = t->At(std::vector<double>{1000});
  ASSERT_TRUE(low.ok() && high.ok());
  Plan kept = prepared->plans[0];
  const double expected = CostPlanOn(kept, *high) / testing::DpBestBushy(*low, true);
  ASSERT_TRUE(prepared->box_ratio_bound.has_value());
  EXPECT_DOUBLE_EQ(*prepared->box_ratio_bound, expected);
}

// A point solver from outside (the coordinator's pool) is what prepare
// uses; its error ends the prepare, naming the grid point.
TEST(TemplatePrepareTest, AGivenPointSolverIsUsedAndItsErrorNamesThePoint) {
  const QueryTemplate t = Yard();
  PrepareOptions options;
  options.grid = 3;
  std::atomic<int> calls{0};
  options.solve_point = [&](const Query& q, const SearchOptions& o) -> absl::StatusOr<Plan> {
    ++calls;
    SearchControl control;
    auto r = SolveSlice(q, o, {0, 1}, control);
    if (!r.ok()) return r.status();
    return *r->plan;
  };
  auto prepared = PrepareTemplate(t, options);
  ASSERT_TRUE(prepared.ok()) << prepared.status();
  EXPECT_EQ(calls.load(), 9);
  options.solve_point = [](const Query&, const SearchOptions&) -> absl::StatusOr<Plan> {
    return absl::UnavailableError("no worker is healthy");
  };
  auto failed = PrepareTemplate(t, options);
  ASSERT_FALSE(failed.ok());
  EXPECT_EQ(failed.status().code(), absl::StatusCode::kUnavailable);
  EXPECT_NE(failed.status().message().find("grid point ("), std::string::npos) << failed.status();
  EXPECT_NE(failed.status().message().find("no worker is healthy"), std::string::npos);
}

TEST(TemplatePrepareTest, ThePlanSetFileRoundTrips) {
  const QueryTemplate t = Yard();
  PrepareOptions options;
  options.grid = 4;
  auto prepared = PrepareTemplate(t, options);
  ASSERT_TRUE(prepared.ok());
  auto back = ParsePlanSet(PlanSetJson(t, *prepared));
  ASSERT_TRUE(back.ok()) << back.status();
  ASSERT_EQ(back->prepared.plans.size(), prepared->plans.size());
  for (size_t p = 0; p < prepared->plans.size(); ++p) {
    ASSERT_EQ(back->prepared.plans[p].nodes.size(), prepared->plans[p].nodes.size());
    for (size_t i = 0; i < prepared->plans[p].nodes.size(); ++i) {
      EXPECT_EQ(back->prepared.plans[p].nodes[i].relations, prepared->plans[p].nodes[i].relations);
    }
    EXPECT_DOUBLE_EQ(back->prepared.plan_worst[p], prepared->plan_worst[p]);
  }
  EXPECT_EQ(back->query_template.parameters().size(), 2u);
  EXPECT_FALSE(ParsePlanSet("{\"plans\": []}").ok());
}

TEST(TemplatePrepareTest, BadTemplatesAndValuesAreRefusedByName) {
  const auto refusal = [](std::string json) {
    auto t = QueryTemplate::Parse(json);
    return t.ok() ? std::string("accepted") : std::string(t.status().message());
  };
  const std::string rels =
      R"("relations": [{"name": "a", "rows": {"parameter": "p"}}, {"name": "b", "rows": 5}],
         "predicates": [{"relations": ["a", "b"], "selectivity": 0.1}])";
  EXPECT_NE(refusal("{" + rels + "}").find("parameters: missing"), std::string::npos);
  EXPECT_NE(refusal("{" + rels + R"(, "parameters": [{"name": "q", "min": 1, "max": 2}]})")
                .find("relations[0].rows: unknown parameter \"p\""),
            std::string::npos);
  EXPECT_NE(refusal("{" + rels + R"(, "parameters": [{"name": "p", "min": 5, "max": 2}]})")
                .find("0 < min <= max"),
            std::string::npos);
  EXPECT_NE(refusal("{" + rels +
                    R"(, "parameters": [{"name": "p", "min": 1, "max": 2},
                                        {"name": "z", "min": 1, "max": 2}]})")
                .find("parameters[1] (z): used by no rows or selectivity"),
            std::string::npos);
  EXPECT_NE(refusal(R"({"relations": [{"name": "a", "rows": 3}, {"name": "b", "rows": 5}],
                  "predicates": [{"relations": ["a", "b"], "selectivity": {"parameter": "s"}}],
                  "parameters": [{"name": "s", "min": 0.1, "max": 2}]})")
                .find("a selectivity's range must lie in (0, 1]"),
            std::string::npos);
  const QueryTemplate t = Yard();
  const auto value_refusal = [&](std::vector<std::pair<std::string, double>> named) {
    auto v = t.Values(named);
    return v.ok() ? std::string("accepted") : std::string(v.status().message());
  };
  EXPECT_EQ(value_refusal({{"berth_rows", 100}, {"since", 0.5}}),
            "since=0.5: outside the template's range [1e-05, 0.1]");
  EXPECT_EQ(value_refusal({{"berth_rows", 100}}), "--set: no value for parameter \"since\"");
  EXPECT_EQ(value_refusal({{"berth_rows", 100}, {"since", 0.01}, {"draft", 1}}),
            "--set: unknown parameter \"draft\"");
  EXPECT_EQ(value_refusal({{"berth_rows", 100}, {"since", 0.01}}), "accepted");
}

}  // namespace
}  // namespace sliceplan

namespace sliceplan {
namespace {

// A template with a semi and an anti join: the stored plans keep their
// join types through the plan set file, and the plan chosen at a point
// costs the exact optimum there (one distinct optimum on this grid).
TEST(TemplatePrepareTest, JoinsKeepTheirTypesThroughThePlanSet) {
  auto t = QueryTemplate::Parse(R"({
    "parameters": [{"name": "alarms", "min": 100, "max": 1e6}],
    "relations": [{"name": "vessels", "rows": 6500}, {"name": "alarms", "rows": {"parameter": "alarms"}},
                  {"name": "voyages", "rows": 420000}, {"name": "berths", "rows": 14000},
                  {"name": "bookings", "rows": 20000}],
    "predicates": [{"relations": ["voyages", "vessels"], "selectivity": 1.5e-4},
                   {"relations": ["voyages", "berths"], "selectivity": 7.1e-5}],
    "joins": [{"type": "semi", "left": ["vessels"], "right": ["alarms"],
               "predicate": {"relations": ["vessels", "alarms"], "selectivity": 1.5e-4}},
              {"type": "anti", "left": ["berths"], "right": ["bookings"],
               "predicate": {"relations": ["berths", "bookings"], "selectivity": 7.1e-5}}]})");
  ASSERT_TRUE(t.ok()) << t.status();
  PrepareOptions options;
  options.grid = 4;
  auto prepared = PrepareTemplate(*t, options);
  ASSERT_TRUE(prepared.ok()) << prepared.status();
  auto back = ParsePlanSet(PlanSetJson(*t, *prepared));
  ASSERT_TRUE(back.ok()) << back.status();
  for (size_t p = 0; p < prepared->plans.size(); ++p) {
    int semi = 0, anti = 0;
    for (size_t i = 0; i < prepared->plans[p].nodes.size(); ++i) {
      EXPECT_EQ(back->prepared.plans[p].nodes[i].type, prepared->plans[p].nodes[i].type);
      semi += back->prepared.plans[p].nodes[i].type == JoinType::kSemi;
      anti += back->prepared.plans[p].nodes[i].type == JoinType::kAnti;
    }
    EXPECT_EQ(semi, 1);
    EXPECT_EQ(anti, 1);
  }
  const std::vector<double> values = {5000};
  auto choice = ChooseStoredPlan(back->query_template, back->prepared, values, false);
  ASSERT_TRUE(choice.ok()) << choice.status();
  auto at = t->At(values);
  ASSERT_TRUE(at.ok());
  SearchControl control;
  auto exact = SolveSlice(*at, SearchOptions{}, SliceSpec{0, 1}, control);
  ASSERT_TRUE(exact.ok() && exact->plan);
  EXPECT_NEAR(choice->plan.root().cost, exact->plan->root().cost, 1e-9 * exact->plan->root().cost);
}

}  // namespace
}  // namespace sliceplan
