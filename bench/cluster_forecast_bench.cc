// The cluster model's search forecast (core/capacity/cluster_forecast.h)
// against the search itself: for random and star queries of a few sizes
// in a physical space of 4 node counts x 4 sample rates (the default
// space's searches finish inside the forecast's budget up to 12
// relations), the forecast from a 0.2 s budget beside the whole search's
// wall time (one slice, one thread, stopped at 120 s). Not a test; run by hand:
//
//   build/bench/cluster_forecast_bench
#include <chrono>
#include <cstdio>

#include "core/capacity/cluster_forecast.h"
#include "core/slice_solver.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

constexpr double kBudget = 0.2;
constexpr double kCap = 120;

double Measure(const Query& q, const SearchOptions& options) {
  const auto start = std::chrono::steady_clock::now();
  SearchControl control(nullptr, start + std::chrono::seconds(static_cast<int>(kCap)));
  const auto r = SolveSlice(q, options, {0, 1}, control);
  const double t = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  return r.ok() ? t : -t;
}

}  // namespace
}  // namespace sliceplan

int main() {
  using namespace sliceplan;
  using testing::GraphShape;
  std::printf("%-7s %3s %-7s %3s  %10s %10s %6s  %s\n", "graph", "n", "space", "xp", "forecast",
              "measured", "ratio", "forecast says");
  for (const bool wide : {true}) {
    for (const GraphShape shape : {GraphShape::kRandom, GraphShape::kStar}) {
      for (const bool cross : {true, false}) {
        for (int n = 6; n <= 11; ++n) {
          const Query q = testing::MakeQuery(shape, n, 7);
          SearchOptions options{PlanShape::kBushy, cross, CostModelKind::kCluster};
          if (wide) {
            options.cluster.params.node_counts = {2, 4, 16, 64};
            options.cluster.params.sample_rates = {1, 0.3, 0.1, 0.03};
          }
          auto f = ForecastClusterSearch(q, options, kBudget);
          if (!f.ok()) {
            std::printf("forecast failed: %s\n", std::string(f.status().message()).c_str());
            continue;
          }
          const double measured = f->measured ? f->seconds : Measure(q, options);
          std::printf("%-7s %3d %-7s %3s  %10.3g %10.3g %6.2f  %s\n",
                      testing::ShapeName(shape).c_str(), n, wide ? "4x4" : "3x1",
                      cross ? "yes" : "no", f->seconds, measured,
                      measured > 0 ? f->seconds / measured : 0.0, f->Describe().c_str());
          if (measured < 0 || measured > kCap / 8) break;  // the next size runs past the cap
        }
      }
    }
  }
}
