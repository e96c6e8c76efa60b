// Outer, semi and anti joins against inner ones: a star of n relations
// (the hub and n - 1 leaves) whose every third leaf joins the hub through
// a left, semi or anti join (in turn), searched connected-only, beside
// the same star with every join inner. One thread, cout, each search
// repeated and its best wall time kept. Not a test; run by hand:
//
//   build/bench/joins_bench [N ...]   (default: 16 18 20)
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <vector>

#include "core/slice_solver.h"

namespace sliceplan {
namespace {

constexpr int kRepeats = 3;

// The star; with `outer`, every third leaf's join is non-inner.
Query Star(int n, bool outer) {
  std::vector<Relation> rels;
  for (int i = 0; i < n; ++i) {
    rels.push_back({"r" + std::to_string(i), i == 0 ? 1e7 : 1e3 * (1 + (i * 37) % 97), 100});
  }
  std::vector<Predicate> preds;
  std::vector<JoinOp> ops;
  static constexpr JoinType kTypes[] = {JoinType::kLeft, JoinType::kSemi, JoinType::kAnti};
  RelSet built = 1;  // the original tree, left-deep from the hub
  for (int i = 1; i < n; ++i) {
    const RelSet leaf = RelSet{1} << i;
    const double sel = 1.0 / rels[i].rows;
    if (outer && i % 3 == 0) {
      ops.push_back({kTypes[(i / 3) % 3], built, leaf, 1 | leaf, sel});
    } else {
      preds.push_back({1 | leaf, sel});
    }
    built |= leaf;
  }
  auto q = Query::Create(std::move(rels), std::move(preds));
  if (!q.ok()) std::abort();
  auto with = q->WithJoins(std::move(ops));
  if (!with.ok()) {
    std::fprintf(stderr, "%s\n", std::string(with.status().message()).c_str());
    std::abort();
  }
  return *with;
}

struct Run {
  double seconds = 1e300;
  uint64_t splits = 0;
  double cost = 0;
};

Run Solve(const Query& q, PlanShape shape, uint32_t p) {
  const SearchOptions options{shape, false, CostModelKind::kCout};
  Run best;
  for (int r = 0; r < kRepeats; ++r) {
    double slowest = 0, cost = 1e300;
    uint64_t splits = 0;
    for (uint32_t i = 0; i < p; ++i) {
      SearchControl control;
      const auto start = std::chrono::steady_clock::now();
      auto result = SolveSlice(q, options, SliceSpec{i, p}, control);
      const double s =
          std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
      if (!result.ok()) std::abort();
      slowest = std::max(slowest, s);
      splits = std::max(splits, result->stats.splits);
      if (result->plan) cost = std::min(cost, result->plan->root().cost);
    }
    if (slowest < best.seconds) best = {slowest, splits, cost};
  }
  return best;
}

}  // namespace
}  // namespace sliceplan

int main(int argc, char** argv) {
  using namespace sliceplan;
  std::vector<int> sizes;
  for (int i = 1; i < argc; ++i) sizes.push_back(std::atoi(argv[i]));
  if (sizes.empty()) sizes = {16, 18, 20};
  std::printf("%-4s %-9s %3s  %10s %12s  %10s %12s  %6s\n", "n", "shape", "P", "inner s",
              "inner splits", "joins s", "joins splits", "ratio");
  for (int n : sizes) {
    const Query inner = Star(n, false), outer = Star(n, true);
    for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
      for (uint32_t p : {1u, 4u}) {
        const Run a = Solve(inner, shape, p), b = Solve(outer, shape, p);
        std::printf("%-4d %-9s %3u  %10.4f %12llu  %10.4f %12llu  %6.2f\n", n,
                    shape == PlanShape::kBushy ? "bushy" : "left-deep", p, a.seconds,
                    static_cast<unsigned long long>(a.splits), b.seconds,
                    static_cast<unsigned long long>(b.splits), b.seconds / a.seconds);
      }
    }
  }
}
