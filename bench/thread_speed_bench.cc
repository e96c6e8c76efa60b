// One slice on 1 thread beside the same slice on T threads sharing its memo,
// in one run: seconds of each (best of three), the speed-up and whether the
// optimum matched. Targets (docs/benchmarks.md): 1.7x or more on 2 threads
// for a 20-relation slice with cross products, 1.5x without. Not a test.
//
//   build/bench/thread_speed_bench [T] [SHAPE:N:CROSS:P ...]
//   (default T = 2; random:20:1:1 random:20:1:8 clique:18:0:1 random:24:0:1)
#include <cstdio>
#include <cstdlib>
#include <string>
#include <vector>

#include "absl/strings/numbers.h"
#include "absl/strings/str_split.h"
#include "core/slice_solver.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

struct Run {
  double seconds = 0;
  double cost = 0;
};

Run Best(const Query& q, bool cross, uint32_t p, int threads) {
  Run best;
  for (int rep = 0; rep < 3; ++rep) {
    SearchOptions options{PlanShape::kBushy, cross, CostModelKind::kCout};
    options.threads = threads;
    SearchControl control;
    auto r = SolveSlice(q, options, {0, p}, control);
    if (!r.ok()) {
      std::fprintf(stderr, "%s\n", std::string(r.status().message()).c_str());
      std::exit(1);
    }
    const double cost = r->plan ? r->plan->root().cost : -1;
    if (rep == 0 || r->stats.seconds < best.seconds) best = {r->stats.seconds, cost};
  }
  return best;
}

}  // namespace
}  // namespace sliceplan

int main(int argc, char** argv) {
  using namespace sliceplan;  // NOLINT: a driver's main
  std::vector<std::string> args(argv + 1, argv + argc);
  int threads = 2;
  if (!args.empty() && absl::SimpleAtoi(args[0], &threads)) args.erase(args.begin());
  if (args.empty()) args = {"random:20:1:1", "random:20:1:8", "clique:18:0:1", "random:24:0:1"};
  std::printf("%-7s %3s %5s %3s | %8s %8s | %7s %s\n", "shape", "n", "cross", "P", "1_thr_s",
              "T_thr_s", "speedup", "same_cost");
  for (const std::string& spec : args) {
    const std::vector<std::string> parts = absl::StrSplit(spec, ':');
    GraphShape shape;
    int n = 0, cross = 0, p = 0;
    if (parts.size() != 4 || !testing::ShapeFromName(parts[0], shape) ||
        !absl::SimpleAtoi(parts[1], &n) || !absl::SimpleAtoi(parts[2], &cross) ||
        !absl::SimpleAtoi(parts[3], &p) || n < 2 || n > 64 || p < 1) {
      std::fprintf(stderr, "bad spec %s: want SHAPE:N:CROSS(0|1):P\n", spec.c_str());
      return 2;
    }
    const Query q = testing::MakeQuery(shape, n, 1);
    const Run one = Best(q, cross != 0, static_cast<uint32_t>(p), 1);
    const Run many = Best(q, cross != 0, static_cast<uint32_t>(p), threads);
    std::printf("%-7s %3d %5d %3d | %8.3f %8.3f | %7.2f %s\n", parts[0].c_str(), n, cross, p,
                one.seconds, many.seconds, one.seconds / many.seconds,
                one.cost == many.cost ? "yes" : "NO");
  }
  return 0;
}
