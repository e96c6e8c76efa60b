// What the engine's estimates are worth, on outside data: graphs of the
// CEB-IMDb cardinality-estimation workload with the true rows of every
// connected set (the DPconv paper's repository, Stoian and Kipf 2024, MIT;
// tests/data/ceb-imdb/README.md). For each graph, the connected-only bushy
// plan chosen on the independence model's estimates is costed (C_out) on
// the true rows and set over the true optimum (the plan chosen with every
// connected set listed at its true rows): median, 90th percentile and
// worst over the files. Then the price of listing: the search time with
// every connected set listed over the same search on the model alone, on
// the largest graphs (best of 5 each, interleaved). Not a test; run by hand:
//
//   build/bench/estimates_bench [DIRECTORY]
//   (default: ../shared/data/ceb-imdb-sample if present, else
//   tests/data/ceb-imdb)
#include <algorithm>
#include <cstdio>
#include <filesystem>
#include <string>
#include <vector>

#include "core/model/plan.h"
#include "core/plan_cover.h"
#include "core/slice_solver.h"
#include "tests/support/ceb_graphs.h"

namespace sliceplan {
namespace {

SearchOptions Connected() {
  SearchOptions options;
  options.cross_products = false;
  return options;
}

struct Solved {
  Plan plan;
  double seconds = 0;
};

Solved Solve(const Query& q) {
  SearchControl control;
  auto r = SolveSlice(q, Connected(), {0, 1}, control);
  if (!r.ok() || !r->plan) {
    std::fprintf(stderr, "%s\n", r.ok() ? "no plan" : r.status().ToString().c_str());
    std::exit(1);
  }
  return {*r->plan, r->stats.seconds};
}

double Quantile(std::vector<double> v, double q) {
  std::sort(v.begin(), v.end());
  return v[static_cast<size_t>(q * static_cast<double>(v.size() - 1))];
}

}  // namespace
}  // namespace sliceplan

int main(int argc, char** argv) {
  using namespace sliceplan;
  std::string dir = argc > 1 ? argv[1] : "../shared/data/ceb-imdb-sample";
  if (!std::filesystem::is_directory(dir)) dir = SLICEPLAN_SOURCE_DIR "/tests/data/ceb-imdb";
  std::vector<std::string> files;
  for (const auto& e : std::filesystem::directory_iterator(dir)) {
    if (e.path().extension() == ".csv") files.push_back(e.path().string());
  }
  std::sort(files.begin(), files.end());
  std::vector<double> ratios;
  std::vector<std::pair<double, double>> price;  // (listed s, model s) for n >= 14
  for (const std::string& file : files) {
    auto g = testing::ReadCebGraph(file);
    if (!g.ok()) {
      std::fprintf(stderr, "%s\n", g.status().ToString().c_str());
      return 1;
    }
    // Both plans costed on the true rows (CostPlanOn refills each node).
    Plan chosen_plan = Solve(g->model).plan, best_plan = Solve(g->listed).plan;
    const double chosen = CostPlanOn(chosen_plan, g->listed);
    const double best = CostPlanOn(best_plan, g->listed);
    ratios.push_back(chosen / best);
    if (g->model.size() >= 14) {
      double listed_s = 1e300, model_s = 1e300;
      for (int r = 0; r < 5; ++r) {
        listed_s = std::min(listed_s, Solve(g->listed).seconds);
        model_s = std::min(model_s, Solve(g->model).seconds);
      }
      price.push_back({listed_s, model_s});
    }
  }
  std::printf("%zu graphs from %s\n", ratios.size(), dir.c_str());
  std::printf(
      "true cost of the plan chosen on the model's estimates over the true optimum: median %.3f, "
      "90th percentile %.3f, worst %.3f; %zu of %zu plans not optimal\n",
      Quantile(ratios, 0.5), Quantile(ratios, 0.9), Quantile(ratios, 1.0),
      static_cast<size_t>(
          std::count_if(ratios.begin(), ratios.end(), [](double r) { return r > 1 + 1e-9; })),
      ratios.size());
  std::vector<double> over;
  for (const auto& [listed_s, model_s] : price) over.push_back(listed_s / model_s);
  if (!over.empty()) {
    std::printf(
        "search time with every connected set listed over the model alone (%zu graphs of 14-16 "
        "relations): median %.2f, worst %.2f\n",
        over.size(), Quantile(over, 0.5), Quantile(over, 1.0));
  }
  return 0;
}
