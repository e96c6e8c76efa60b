// The slowest slice of the connected-only search over the unsliced search:
// for each graph, shape and slice count P = 2^k, every slice is solved in
// turn (one thread, cout) and the slowest one's wall time, splits and memo
// bytes are set beside the unsliced search's, and beside the formula of
// docs/slicing.md: splits (21/27)^k bushy or (3/4)^k left-deep, memo
// (7/8)^k or (3/4)^k. Each slice is solved `repeats` times and its best
// time kept (the VM's noise is one-sided). Not a test; run by hand:
//
//   build/bench/connected_slice_bench [random|star N ...]
//   (default: random 22, star 22, random 24)
//   build/bench/connected_slice_bench one random|star N bushy|left-deep P I
//   (slice I of P alone, five times or $CONNECTED_SLICE_BENCH_RUNS: for a
//   profiler)
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <vector>

#include "absl/strings/numbers.h"
#include "core/slice_solver.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

constexpr int kRepeats = 3;
constexpr int kMaxK = 4;

struct Run {
  double seconds = 0;
  double call_seconds = 0;  // the whole SolveSlice call
  uint64_t splits = 0;
  uint64_t memo_bytes = 0;
  uint64_t memo_entries = 0;
  double cost = 0;
};

Run Solve(const Query& q, PlanShape shape, SliceSpec slice, int repeats = kRepeats) {
  const SearchOptions options{shape, false, CostModelKind::kCout};
  Run best;
  best.seconds = 1e300;
  for (int r = 0; r < repeats; ++r) {
    SearchControl control;
    const auto start = std::chrono::steady_clock::now();
    auto result = SolveSlice(q, options, slice, control);
    const double call =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    if (!result.ok()) {
      std::fprintf(stderr, "slice %u of %u: %s\n", slice.index, slice.count,
                   std::string(result.status().message()).c_str());
      std::exit(1);
    }
    best.seconds = std::min(best.seconds, result->stats.seconds);
    best.call_seconds = r == 0 ? call : std::min(best.call_seconds, call);
    best.splits = result->stats.splits;
    best.memo_bytes = result->stats.memo_bytes;
    best.memo_entries = result->stats.memo_entries;
    best.cost = result->plan ? result->plan->root().cost : 1e300;
  }
  return best;
}

void Report(const char* name, const Query& q, PlanShape shape) {
  const bool bushy = shape == PlanShape::kBushy;
  const Run whole = Solve(q, shape, {0, 1});
  std::printf("%-10s %-9s P=1  %.3f s  %llu splits  %.1f MiB\n", name,
              bushy ? "bushy" : "left-deep", whole.seconds,
              static_cast<unsigned long long>(whole.splits),
              static_cast<double>(whole.memo_bytes) / 1048576.0);
  for (int k = 1; k <= kMaxK; ++k) {
    const uint32_t p = 1u << k;
    Run slowest;
    double best_cost = 1e300;
    for (uint32_t i = 0; i < p; ++i) {
      const Run run = Solve(q, shape, {i, p});
      best_cost = std::min(best_cost, run.cost);
      if (run.seconds > slowest.seconds) slowest = run;
    }
    if (std::abs(best_cost - whole.cost) > 1e-9 * whole.cost) {
      std::fprintf(stderr, "%s P=%u: slices' best %.17g, unsliced %.17g\n", name, p, best_cost,
                   whole.cost);
      std::exit(1);
    }
    const double split_formula = std::pow(bushy ? 21.0 / 27 : 0.75, k);
    const double memo_formula = std::pow(bushy ? 7.0 / 8 : 0.75, k);
    const double time_ratio = slowest.seconds / whole.seconds;
    const double memo_ratio =
        static_cast<double>(slowest.memo_bytes) / static_cast<double>(whole.memo_bytes);
    std::printf(
        "%-10s %-9s P=%-2u slowest %.3f s (%.3f, %.2fx formula %.3f)  splits %.3f  memo %.3f "
        "(%.2fx formula %.3f)\n",
        name, bushy ? "bushy" : "left-deep", p, slowest.seconds, time_ratio,
        time_ratio / split_formula, split_formula,
        static_cast<double>(slowest.splits) / static_cast<double>(whole.splits), memo_ratio,
        memo_ratio / memo_formula, memo_formula);
    std::fflush(stdout);
  }
}

}  // namespace
}  // namespace sliceplan

int main(int argc, char** argv) {
  using namespace sliceplan;
  if (argc == 7 && std::string(argv[1]) == "one") {
    const GraphShape graph =
        std::string(argv[2]) == "star" ? GraphShape::kStar : GraphShape::kRandom;
    const PlanShape shape =
        std::string(argv[4]) == "bushy" ? PlanShape::kBushy : PlanShape::kLeftDeep;
    const Query q = testing::MakeQuery(graph, std::atoi(argv[3]), 1);
    const SliceSpec slice{static_cast<uint32_t>(std::atoi(argv[6])),
                          static_cast<uint32_t>(std::atoi(argv[5]))};
    const char* runs = std::getenv("CONNECTED_SLICE_BENCH_RUNS");
    for (int r = 0; r < (runs ? std::atoi(runs) : 5); ++r) {
      const Run run = Solve(q, shape, slice, 1);
      std::printf("search %.4f s, call %.4f s, %llu splits, %llu memo entries\n", run.seconds,
                  run.call_seconds, static_cast<unsigned long long>(run.splits),
                  static_cast<unsigned long long>(run.memo_entries));
    }
    return 0;
  }
  std::vector<std::pair<std::string, int>> graphs;
  for (int i = 1; i + 1 < argc; i += 2) {
    int n = 0;
    if (!absl::SimpleAtoi(argv[i + 1], &n) || n < 4 || n > 30) {
      std::fprintf(stderr, "usage: connected_slice_bench [random|star N ...]\n");
      return 2;
    }
    graphs.emplace_back(argv[i], n);
  }
  if (graphs.empty()) graphs = {{"random", 22}, {"star", 22}, {"random", 24}};
  for (const auto& [kind, n] : graphs) {
    const GraphShape shape = kind == "star" ? GraphShape::kStar : GraphShape::kRandom;
    const Query q = testing::MakeQuery(shape, n, 1);
    const std::string name = kind + " " + std::to_string(n);
    Report(name.c_str(), q, PlanShape::kBushy);
    Report(name.c_str(), q, PlanShape::kLeftDeep);
  }
  return 0;
}
