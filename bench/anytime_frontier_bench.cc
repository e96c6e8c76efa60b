// The anytime frontier search against the exact frontier: for 7 to 10
// relations (chain, star, random; 4 seeds each), node counts {4, 16},
// sample rates {1, 0.1}, bushy with cross products, the approximation
// factor alpha of its set against the exact engine's Pareto set (the
// smallest alpha such that every exact plan is alpha-covered), mean and
// worst, for caps per node and moves or time. Not a test; run by hand:
//
//   build/bench/anytime_frontier_bench [N ...]   (default: 7 10)
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <vector>

#include "core/slice_solver.h"
#include "tests/support/physical_plans.h"
#include "tests/support/test_queries.h"
#include "tiers/anytime_frontier.h"

int main(int argc, char** argv) {
  using namespace sliceplan;
  std::vector<int> sizes;
  for (int i = 1; i < argc; ++i) sizes.push_back(std::atoi(argv[i]));
  if (sizes.empty()) sizes = {7, 10};
  const ClusterSearchConfig config = testing::SmallClusterConfig();
  std::printf("%3s %5s %5s %7s %9s  %10s %10s %9s\n", "n", "share", "cap", "moves", "seconds",
              "mean alpha", "worst", "trees");
  for (int n : sizes) {
    std::vector<std::pair<Query, std::vector<ClusterCosts>>> cases;
    for (uint64_t seed = 1; seed <= 4; ++seed) {
      for (auto shape : {testing::GraphShape::kChain, testing::GraphShape::kStar,
                         testing::GraphShape::kRandom}) {
        Query q = testing::MakeQuery(shape, n, seed);
        SearchOptions o;
        o.cost = CostModelKind::kCluster;
        o.cluster = config;
        SearchControl control;
        auto exact = SolveSlice(q, o, {0, 1}, control);
        if (!exact.ok()) return 1;
        std::vector<ClusterCosts> ref;
        for (const Plan& p : exact->frontier) ref.push_back(p.root().metrics);
        cases.emplace_back(std::move(q), std::move(ref));
      }
    }
    for (const bool share : {false, true}) {
      for (size_t cap : {size_t{8}, size_t{32}}) {
        for (uint64_t moves : {uint64_t{300}, uint64_t{3000}}) {
          const auto count = static_cast<double>(cases.size());
          double worst = 1, sum = 0, seconds = 0;
          uint64_t trees = 0;
          for (size_t c = 0; c < cases.size(); ++c) {
            SearchControl control;
            AnytimeFrontierOptions options;
            options.max_moves = moves;
            options.seed = c + 1;
            options.cap_per_node = cap;
            options.share_subplans = share;
            const auto start = std::chrono::steady_clock::now();
            const AnytimeFrontierResult r =
                AnytimeFrontier(WideQuery::FromExact(cases[c].first), config, options, control);
            seconds +=
                std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
            std::vector<ClusterCosts> got;
            for (const FrontierPlan& p : r.frontier) got.push_back(p.physical.costs());
            const double alpha = testing::CoverFactor(got, cases[c].second);
            worst = std::max(worst, alpha);
            sum += alpha;
            trees += r.trees;
          }
          std::printf("%3d %5s %5zu %7llu %9.3f  %10.3f %10.3f %9llu\n", n, share ? "yes" : "no",
                      cap, static_cast<unsigned long long>(moves), seconds / count, sum / count,
                      worst, static_cast<unsigned long long>(trees / cases.size()));
        }
      }
    }
  }
  return 0;
}
