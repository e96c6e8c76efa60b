// Many-objective search (cluster model, three objectives, sample rates
// {1, 0.1, 0.01}, node counts {4, 16, 64}, bushy with cross products): time,
// frontier size and the largest Pareto set of any memo entry for alpha =
// 1, 1.05, 1.2; and the slowest slice over the unsliced time for P = 4, 16.
// Not a test; see docs/benchmarks.md.
//
//   build/bench/pareto_bench [--budget=SECONDS] [--alphas=A,...] [--no-slices] [n ...]
//       (default: 60 s a run, alphas 1,1.05,1.2, n = 8 10 12 14; --no-slices: the
//       unsliced search only)
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <vector>

#include "absl/strings/numbers.h"
#include "absl/strings/str_split.h"
#include "absl/strings/string_view.h"
#include "core/slice_solver.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

SearchOptions Options(double alpha) {
  SearchOptions o;
  o.cost = CostModelKind::kCluster;
  o.cluster.params.sample_rates = {1.0, 0.1, 0.01};
  o.cluster.alpha = alpha;
  return o;
}

struct Run {
  double seconds = 0;
  size_t frontier = 0;
  size_t largest = 0;
  bool ok = false;
};

// Each run gets at most this long (--budget); slower ones are reported as such.
int budget_seconds = 60;

Run Solve(const Query& q, const SearchOptions& o, SliceSpec slice) {
  SearchControl control(nullptr,
                        std::chrono::steady_clock::now() + std::chrono::seconds(budget_seconds));
  auto r = SolveSlice(q, o, slice, control);
  if (!r.ok()) {
    std::printf("%3d %6.2f  over %d s (%s)\n", q.size(), o.cluster.alpha, budget_seconds,
                std::string(r.status().message()).c_str());
    return {};
  }
  return {r->stats.seconds, r->frontier.size(), r->largest_set, true};
}

}  // namespace
}  // namespace sliceplan

int main(int argc, char** argv) {
  using namespace sliceplan;
  std::vector<int> sizes;
  std::vector<double> alphas = {1.0, 1.05, 1.2};
  bool slices = true;
  const auto bad = [](const std::string& arg) {
    std::fprintf(stderr,
                 "bad argument %s: want [--no-slices] [--budget=SECONDS] [--alphas=A,B,...] "
                 "[N ...] (2 <= N <= 64, alpha >= 1)\n",
                 arg.c_str());
    return 2;
  };
  for (int i = 1; i < argc; ++i) {
    const std::string arg = argv[i];
    if (arg == "--no-slices") {
      slices = false;
    } else if (arg.rfind("--budget=", 0) == 0) {
      if (!absl::SimpleAtoi(arg.substr(9), &budget_seconds) || budget_seconds <= 0) {
        return bad(arg);
      }
    } else if (arg.rfind("--alphas=", 0) == 0) {
      alphas.clear();
      for (const absl::string_view part : absl::StrSplit(arg.substr(9), ',')) {
        double alpha = 0;
        if (!absl::SimpleAtod(part, &alpha) || !(alpha >= 1)) return bad(arg);
        alphas.push_back(alpha);
      }
    } else {
      int n = 0;
      if (!absl::SimpleAtoi(arg, &n) || n < 2 || n > kMaxRelations) return bad(arg);
      sizes.push_back(n);
    }
  }
  if (sizes.empty()) sizes = {8, 10, 12, 14};
  std::printf("%3s %6s %10s %9s %12s %16s %16s\n", "n", "alpha", "seconds", "frontier",
              "largest_set", "P=4 slowest/all", "P=16 slowest/all");
  for (int n : sizes) {
    const Query q = testing::MakeQuery(testing::GraphShape::kRandom, n, 1);
    for (double alpha : alphas) {
      const SearchOptions o = Options(alpha);
      const Run whole = Solve(q, o, {0, 1});
      if (!whole.ok) continue;
      double ratio[2] = {0, 0};
      int k = 0;
      for (uint32_t p : {4u, 16u}) {
        if (!slices || std::countr_zero(p) > MaxSliceBits(n, PlanShape::kBushy)) {
          ratio[k++] = -1;
          continue;
        }
        double slowest = 0;
        for (uint32_t i = 0; i < p; ++i) slowest = std::max(slowest, Solve(q, o, {i, p}).seconds);
        ratio[k++] = slowest / whole.seconds;
      }
      std::printf("%3d %6.2f %10.3f %9zu %12zu %16.3f %16.3f\n", n, alpha, whole.seconds,
                  whole.frontier, whole.largest, ratio[0], ratio[1]);
      std::fflush(stdout);
    }
  }
  return 0;
}
