// ns per costed split of the dense bushy search (cout, cross products, one
// thread), and the slowest slice's time over the unsliced time for P = 2..16.
// Not a test: run by hand, see docs/benchmarks.md.
//
//   build/bench/split_cost_bench [n ...]      (default 16 18 20)
//   build/bench/split_cost_bench ratios N ... (the bushy slice ratios at each N)
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <vector>

#include "core/slice_solver.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

struct Run {
  double seconds;
  uint64_t splits;
  uint64_t memo_bytes;
};

Run SolveOnce(const Query& q, PlanShape shape, SliceSpec slice) {
  SearchControl control;
  auto r = SolveSlice(q, {shape, true, CostModelKind::kCout}, slice, control);
  if (!r.ok()) {
    std::fprintf(stderr, "%s\n", std::string(r.status().message()).c_str());
    std::exit(1);
  }
  return {r->stats.seconds, r->stats.splits, r->stats.memo_bytes};
}

// Best of `reps` runs (the least disturbed by the other core's load).
Run Best(const Query& q, PlanShape shape, SliceSpec slice, int reps) {
  Run best = SolveOnce(q, shape, slice);
  for (int i = 1; i < reps; ++i) {
    const Run r = SolveOnce(q, shape, slice);
    if (r.seconds < best.seconds) best = r;
  }
  return best;
}

void NsPerSplit(int n) {
  const Query q = testing::MakeQuery(testing::GraphShape::kRandom, n, 1);
  const Run r = Best(q, PlanShape::kBushy, {0, 1}, 3);
  std::printf("n=%d bushy unsliced: %llu splits, %.3f s, %.3f ns/split, memo %.1f MiB\n", n,
              static_cast<unsigned long long>(r.splits), r.seconds,
              1e9 * r.seconds / static_cast<double>(r.splits),
              static_cast<double>(r.memo_bytes) / (1 << 20));
}

void SliceRatios(int n, PlanShape shape) {
  const Query q = testing::MakeQuery(testing::GraphShape::kRandom, n, 1);
  const Run whole = Best(q, shape, {0, 1}, 5);
  const double per_bit = shape == PlanShape::kBushy ? 21.0 / 27.0 : 0.75;
  std::printf("%s n=%d unsliced %.3f s\n", shape == PlanShape::kBushy ? "bushy" : "left-deep", n,
              whole.seconds);
  std::printf("  %3s %10s %10s %10s %12s %12s\n", "P", "slowest_s", "ratio", "formula",
              "memo_ratio", "mem_formula");
  for (int k = 1; k <= 4; ++k) {
    const uint32_t p = 1u << k;
    double slowest = 0;
    uint64_t memo = 0;
    for (uint32_t i = 0; i < p; ++i) {
      const Run r = Best(q, shape, {i, p}, 5);
      slowest = std::max(slowest, r.seconds);
      memo = std::max(memo, r.memo_bytes);
    }
    const double mem_formula = std::pow(shape == PlanShape::kBushy ? 7.0 / 8.0 : 0.75, k);
    std::printf("  %3u %10.3f %10.3f %10.3f %12.3f %12.3f\n", p, slowest, slowest / whole.seconds,
                std::pow(per_bit, k),
                static_cast<double>(memo) / static_cast<double>(whole.memo_bytes), mem_formula);
  }
}

}  // namespace
}  // namespace sliceplan

int main(int argc, char** argv) {
  if (argc >= 4 && std::string(argv[1]) == "slice") {  // one slice: slice N P [I]
    const int n = std::atoi(argv[2]);
    const auto p = static_cast<uint32_t>(std::atoi(argv[3]));
    const auto index = static_cast<uint32_t>(argc > 4 ? std::atoi(argv[4]) : 0);
    const auto q = sliceplan::testing::MakeQuery(sliceplan::testing::GraphShape::kRandom, n, 1);
    const auto r = sliceplan::Best(q, sliceplan::PlanShape::kBushy, {index, p}, 3);
    std::printf("n=%d P=%u slice %u: %.4f s, %llu splits, %.3f ns/split\n", n, p, index, r.seconds,
                static_cast<unsigned long long>(r.splits),
                1e9 * r.seconds / static_cast<double>(r.splits));
    return 0;
  }
  if (argc >= 3 && std::string(argv[1]) == "ratios") {  // slice ratios: ratios N [N ...]
    for (int i = 2; i < argc; ++i) {
      sliceplan::SliceRatios(std::atoi(argv[i]), sliceplan::PlanShape::kBushy);
    }
    return 0;
  }
  std::vector<int> sizes;
  for (int i = 1; i < argc; ++i) sizes.push_back(std::atoi(argv[i]));
  if (sizes.empty()) sizes = {16, 18, 20};
  for (int n : sizes) sliceplan::NsPerSplit(n);
  sliceplan::SliceRatios(18, sliceplan::PlanShape::kBushy);
  sliceplan::SliceRatios(18, sliceplan::PlanShape::kLeftDeep);
  return 0;
}
