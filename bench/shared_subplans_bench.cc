// The anytime search with and without Pareto sub-plans shared across trees
// (tiers/shared_subplans.h), past the exact search's reach: for 20, 30 and
// 60 relations (random graphs with cycles, 4 seeds), node counts {4, 16},
// sample rates {1, 0.1}, 8 sub-plans per node (the size past 16
// relations), 300 and 1,500 moves, the approximation factor alpha of each
// set against the dominance filter of the union of every set this run
// found for the query (mean and worst), and seconds per run. Not a test;
// run by hand:
//
//   build/bench/shared_subplans_bench [N ...]
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <vector>

#include "core/cost/pareto.h"
#include "tests/support/physical_plans.h"
#include "tests/support/wide_queries.h"
#include "tiers/anytime_frontier.h"

int main(int argc, char** argv) {
  using namespace sliceplan;
  std::vector<int> sizes;
  for (int i = 1; i < argc; ++i) sizes.push_back(std::atoi(argv[i]));
  if (sizes.empty()) sizes = {20, 30, 60};
  const ClusterSearchConfig config = testing::SmallClusterConfig();
  std::printf("%3s %5s %6s %9s %10s %8s %7s\n", "n", "share", "moves", "seconds", "mean alpha",
              "worst", "plans");
  for (int n : sizes) {
    constexpr int kQueries = 4;
    // sets[config][query]; configs: (share, moves) in print order.
    std::vector<std::vector<std::vector<ClusterCosts>>> sets(4);
    std::vector<double> seconds(4, 0);
    std::vector<std::vector<ClusterCosts>> all(kQueries);
    for (int q = 0; q < kQueries; ++q) {
      const WideQuery w = testing::MakeWideQuery(testing::WideShape::kTreeWithCycles, n, q + 1);
      int c = 0;
      for (const bool share : {false, true}) {
        for (uint64_t moves : {uint64_t{300}, uint64_t{1500}}) {
          AnytimeFrontierOptions o;
          o.cap_per_node = 8;
          o.max_moves = moves;
          o.share_subplans = share;
          SearchControl control;
          const auto start = std::chrono::steady_clock::now();
          const AnytimeFrontierResult r = AnytimeFrontier(w, config, o, control);
          seconds[c] +=
              std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
          std::vector<ClusterCosts> got;
          for (const FrontierPlan& p : r.frontier) got.push_back(p.physical.costs());
          all[q].insert(all[q].end(), got.begin(), got.end());
          sets[c].push_back(std::move(got));
          ++c;
        }
      }
    }
    int c = 0;
    for (const bool share : {false, true}) {
      for (int moves : {300, 1500}) {
        double sum = 0, worst = 1;
        size_t plans = 0;
        for (int q = 0; q < kQueries; ++q) {
          std::vector<ClusterCosts> ref;
          for (size_t i : FrontierIndices(all[q], config.objectives)) ref.push_back(all[q][i]);
          const double alpha = testing::CoverFactor(sets[c][q], ref);
          sum += alpha;
          worst = std::max(worst, alpha);
          plans += sets[c][q].size();
        }
        std::printf("%3d %5s %6d %9.3f %10.3f %8.3f %7zu\n", n, share ? "yes" : "no", moves,
                    seconds[c] / kQueries, sum / kQueries, worst, plans / kQueries);
        ++c;
      }
    }
    std::fflush(stdout);
  }
  return 0;
}
