// How far the exact connected-only search reaches (bushy, cout, no cross
// products): for random graphs and stars of growing size, the exact tier on
// two embedded workers (this machine's two cores) under a 10 s deadline;
// the largest size solved in time is the reach. For 64 workers it is
// projected from measured slices: at each size solved, the slowest of the
// 64 slices of P = 64 is measured at that size's neighbour below the reach
// (every slice solved once, one thread), its share of the unsliced time
// taken as the share at larger sizes, and the unsliced time extrapolated
// by the growth per relation measured between the last two sizes solved.
// Not a test; run by hand (minutes):
//
//   build/bench/exact_reach_bench [random|star ...]
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include "core/slice_solver.h"
#include "schedule/embedded_pool.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using Clock = std::chrono::steady_clock;
using testing::GraphShape;

constexpr double kDeadlineSeconds = 10;
constexpr int kWorkers = 2;
constexpr uint32_t kProjectedWorkers = 64;

SearchOptions Connected() {
  SearchOptions options;
  options.cross_products = false;
  return options;
}

// Wall seconds of the exact tier on the embedded pool, or a negative value
// when it did not finish by the deadline (or was refused: printed).
double ExactSeconds(const Query& q) {
  TierRequest request;
  request.tier = SearchTier::kExact;
  request.budget_seconds = kDeadlineSeconds;
  ScheduleOptions schedule;
  schedule.deadline = Clock::now() + std::chrono::duration_cast<Clock::duration>(
                                         std::chrono::duration<double>(kDeadlineSeconds));
  const auto start = Clock::now();
  auto out = RunEmbeddedTiers(WideQuery::FromExact(q), Connected(), request, kWorkers, schedule);
  const double seconds = std::chrono::duration<double>(Clock::now() - start).count();
  if (!out.ok()) {
    std::printf("    (%s)\n", std::string(out.status().message()).c_str());
    return -1;
  }
  return out->proven_optimal ? seconds : -1;
}

// The slowest slice of P over the unsliced search, one thread each.
double SlowestShare(const Query& q, uint32_t p) {
  const auto time = [&](SliceSpec slice) {
    SearchControl control;
    auto r = SolveSlice(q, Connected(), slice, control);
    return r.ok() ? r->stats.seconds : -1.0;
  };
  const double whole = time({0, 1});
  double slowest = 0;
  for (uint32_t i = 0; i < p; ++i) slowest = std::max(slowest, time({i, p}));
  return slowest / whole;
}

void Reach(GraphShape graph) {
  const std::string name = testing::ShapeName(graph);
  std::printf("%s:\n", name.c_str());
  int reach = 0;
  double last = 0, before = 0;
  for (int n = 18; n <= 30; ++n) {
    const double seconds = ExactSeconds(testing::MakeQuery(graph, n, 1));
    std::printf("  n=%d  %s\n", n,
                seconds < 0 ? "not within 10 s" : (std::to_string(seconds) + " s").c_str());
    std::fflush(stdout);
    if (seconds < 0) break;
    reach = n, before = last, last = seconds;
  }
  if (reach == 0 || before <= 0) return;
  const double growth = last / before;
  // The slices' share, measured one size below the reach (its 64 slices
  // run one after another).
  const double share = SlowestShare(testing::MakeQuery(graph, reach - 1, 1), kProjectedWorkers);
  // Unsliced one-thread time at the reach, from the two-worker run (two
  // slices at once): taken as the measured wall time (conservative).
  int projected = reach;
  double t = last;
  while (t * growth * share <= kDeadlineSeconds && projected < 40) {
    t *= growth;
    ++projected;
  }
  std::printf(
      "  reach on %d workers: %d relations (%.2f s); growth per relation %.2fx; slowest of %u "
      "slices %.3f of the unsliced search (at %d); projected reach on %u workers: %d relations\n",
      kWorkers, reach, last, growth, kProjectedWorkers, share, reach - 1, kProjectedWorkers,
      projected);
}

}  // namespace
}  // namespace sliceplan

int main(int argc, char** argv) {
  using namespace sliceplan;
  std::vector<testing::GraphShape> graphs;
  for (int i = 1; i < argc; ++i) {
    graphs.push_back(std::string(argv[i]) == "star" ? GraphShape::kStar : GraphShape::kRandom);
  }
  if (graphs.empty()) graphs = {GraphShape::kRandom, GraphShape::kStar};
  for (GraphShape g : graphs) Reach(g);
  return 0;
}
