// The anytime search across a pool of in-process workers: does a second
// worker give a better set by the same deadline? For each size (default
// 12, 30 and 100 relations, two random graphs with cycles each), the
// cluster model with node counts {4, 16} and sample rates {1, 0.1}, bushy
// with cross products: `--tier=anytime` on 1 and on 2 workers with the
// same budget (1, 2 and 5 s), its set's approximation factor alpha (the
// smallest alpha such that every reference plan is alpha-covered by a
// returned one, docs/cost-models.md) against a reference set: the exact
// frontier up to 12 relations, else the dominance filter of the union of
// a 2-worker run given ten times the budget and every run measured here.
// Not a test; run by hand (minutes):
//
//   build/bench/anytime_pool_bench [N ...]
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <vector>

#include "core/cost/pareto.h"
#include "core/slice_solver.h"
#include "schedule/embedded_pool.h"
#include "tests/support/physical_plans.h"
#include "tests/support/wide_queries.h"

namespace {

using namespace sliceplan;

SearchOptions Cluster() {
  SearchOptions o;
  o.cost = CostModelKind::kCluster;
  o.cluster = testing::SmallClusterConfig();
  return o;
}

std::vector<ClusterCosts> Anytime(const WideQuery& q, int workers, double seconds) {
  TierRequest request;
  request.tier = SearchTier::kAnytime;
  request.budget_seconds = seconds;
  auto out = RunEmbeddedTiers(q, Cluster(), request, workers);
  std::vector<ClusterCosts> costs;
  if (!out.ok()) {
    std::fprintf(stderr, "%s\n", std::string(out.status().message()).c_str());
    return costs;
  }
  for (const WidePlan& p : out->frontier) costs.push_back(p.root().metrics);
  return costs;
}

std::vector<ClusterCosts> Exact(const WideQuery& q) {
  SearchControl control;
  auto exact = SolveSlice(*ToExactQuery(q), Cluster(), {0, 1}, control);
  std::vector<ClusterCosts> out;
  if (exact.ok()) {
    for (const Plan& p : exact->frontier) out.push_back(p.root().metrics);
  }
  return out;
}

std::vector<ClusterCosts> Filter(const std::vector<ClusterCosts>& all) {
  std::vector<ClusterCosts> out;
  for (size_t i : FrontierIndices(all, Cluster().cluster.objectives)) out.push_back(all[i]);
  return out;
}

}  // namespace

int main(int argc, char** argv) {
  std::vector<int> sizes;
  for (int i = 1; i < argc; ++i) sizes.push_back(std::atoi(argv[i]));
  if (sizes.empty()) sizes = {12, 30, 100};
  std::printf("%4s %5s %8s %8s %7s %7s %9s\n", "n", "query", "budget", "workers", "plans", "alpha",
              "reference");
  for (int n : sizes) {
    const double budget = n <= 12 ? 1 : n <= 30 ? 2 : 5;
    for (uint64_t seed = 1; seed <= 2; ++seed) {
      const WideQuery q = testing::MakeWideQuery(testing::WideShape::kTreeWithCycles, n, seed);
      std::vector<std::vector<ClusterCosts>> runs;
      for (int workers : {1, 2}) runs.push_back(Anytime(q, workers, budget));
      std::vector<ClusterCosts> reference;
      const char* what = "exact";
      if (n <= 12) {
        reference = Exact(q);
      } else {
        what = "10x union";
        std::vector<ClusterCosts> all = Anytime(q, 2, 10 * budget);
        for (const auto& r : runs) all.insert(all.end(), r.begin(), r.end());
        reference = Filter(all);
      }
      for (int w = 0; w < 2; ++w) {
        std::printf("%4d %5llu %7gs %8d %7zu %7.3f %9s\n", n, static_cast<unsigned long long>(seed),
                    budget, w + 1, runs[w].size(), testing::CoverFactor(runs[w], reference), what);
      }
      std::fflush(stdout);
    }
  }
  return 0;
}
