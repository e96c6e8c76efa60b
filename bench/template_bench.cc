// Prepared queries against their targets (docs/templates.md): a
// 14-relation template (a random join graph, tests/support/test_queries.h,
// seed 5) with two parameters spanning four decades each (relation 0's rows
// and predicate 0's selectivity), a 16 x 16 grid, max-ratio 1.2, 2 workers:
// prepare's wall time and stored plans; choose's time in process (mean of
// 10,000 calls); and at 1,000 random points inside the box, the chosen
// plan's cost over a fresh exact optimum there (p50, p99, worst). Not a
// test; run by hand:  build/bench/template_bench
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <random>
#include <string>
#include <vector>

#include "absl/strings/str_cat.h"
#include "core/slice_solver.h"
#include "templates/template_prepare.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using Clock = std::chrono::steady_clock;

std::string TemplateJson(const Query& q) {
  std::string out = "{\"relations\": [";
  for (int i = 0; i < q.size(); ++i) {
    const Relation& r = q.relation(RelationId{static_cast<uint8_t>(i)});
    absl::StrAppend(&out, i ? ", " : "", "{\"name\": \"", r.name, "\", \"rows\": ",
                    i == 0 ? std::string("{\"parameter\": \"fact_rows\"}") : absl::StrCat(r.rows),
                    "}");
  }
  out += "], \"predicates\": [";
  for (size_t j = 0; j < q.predicates().size(); ++j) {
    const Predicate& p = q.predicates()[j];
    std::string names;
    ForEachMember(p.relations, [&](RelationId r) {
      absl::StrAppend(&names, names.empty() ? "" : ", ", "\"", q.relation(r).name, "\"");
    });
    absl::StrAppend(
        &out, j ? ", " : "", "{\"relations\": [", names, "], \"selectivity\": ",
        j == 0 ? std::string("{\"parameter\": \"since\"}") : absl::StrCat(p.selectivity), "}");
  }
  out +=
      "], \"parameters\": [{\"name\": \"fact_rows\", \"min\": 1e4, \"max\": 1e8}, "
      "{\"name\": \"since\", \"min\": 1e-6, \"max\": 1e-2}]}";
  return out;
}

double Quantile(std::vector<double> v, double q) {
  std::sort(v.begin(), v.end());
  return v[static_cast<size_t>(q * static_cast<double>(v.size() - 1))];
}

}  // namespace
}  // namespace sliceplan

int main() {
  using namespace sliceplan;
  const Query base = testing::MakeQuery(testing::GraphShape::kRandom, 14, 5);
  auto t = QueryTemplate::Parse(TemplateJson(base));
  if (!t.ok()) {
    std::fprintf(stderr, "%s\n", t.status().ToString().c_str());
    return 1;
  }
  PrepareOptions options;
  options.grid = 16;
  options.workers = 2;
  absl::StatusOr<PreparedPlans> prepared;
  for (double ratio : {1.0, 1.01, 1.2}) {  // the last one is measured below
    options.max_ratio = ratio;
    prepared = PrepareTemplate(*t, options);
    if (!prepared.ok()) {
      std::fprintf(stderr, "%s\n", prepared.status().ToString().c_str());
      return 1;
    }
    std::printf(
        "prepare, max-ratio %.2f: %zu grid points in %.2f s, %zu distinct optima, %zu plans "
        "kept, worst ratio on the grid %.4f\n",
        ratio, prepared->grid_points, prepared->seconds, prepared->distinct_optima,
        prepared->plans.size(), prepared->worst_ratio);
  }
  std::mt19937_64 rng(7);
  std::uniform_real_distribution<double> u(0, 1);
  const auto draw = [&] {
    return std::vector<double>{1e4 * std::pow(1e4, u(rng)), 1e-6 * std::pow(1e4, u(rng))};
  };
  const std::vector<double> fixed = draw();
  constexpr int kCalls = 10000;
  const auto start = Clock::now();
  double sink = 0;
  for (int i = 0; i < kCalls; ++i) {
    sink += ChooseStoredPlan(*t, *prepared, fixed, false)->plan.root().cost;
  }
  const double per_call = std::chrono::duration<double>(Clock::now() - start).count() / kCalls;
  std::printf("choose: %.1f us per call in process (%zu stored plans)%s\n", per_call * 1e6,
              prepared->plans.size(), sink > 0 ? "" : " ");
  std::vector<double> ratios;
  for (int i = 0; i < 1000; ++i) {
    const std::vector<double> v = draw();
    const double chosen = ChooseStoredPlan(*t, *prepared, v, false)->plan.root().cost;
    SearchControl control;
    auto exact = SolveSlice(*t->At(v), SearchOptions{}, {0, 1}, control);
    ratios.push_back(chosen / exact->plan->root().cost);
  }
  std::printf("1,000 random points: chosen over the exact optimum p50 %.4f, p99 %.4f, worst %.4f\n",
              Quantile(ratios, 0.5), Quantile(ratios, 0.99), Quantile(ratios, 1.0));
  return 0;
}
