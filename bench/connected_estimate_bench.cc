// Accuracy and cost of the connected-set estimate (core/graph/connected_set_estimate.h)
// against the exact count, on random graphs, cycles and grids of growing
// size: the estimate with 100, 400 and 1,600 probes per start relation,
// each over the exact count, and the time of each. Figures in
// docs/benchmarks.md.
#include <chrono>
#include <cstdio>

#include "core/graph/connected_set_estimate.h"
#include "core/graph/connected_sets.h"
#include "tests/support/test_queries.h"

namespace {

using sliceplan::ConnectedSetCount;
using sliceplan::CountConnectedSets;
using sliceplan::EstimateConnectedSets;
using sliceplan::Query;
using sliceplan::testing::GraphShape;
using sliceplan::testing::MakeQuery;
using Clock = std::chrono::steady_clock;

double Seconds(Clock::time_point a) {
  return std::chrono::duration<double>(Clock::now() - a).count();
}

void Row(const char* name, const Query& q) {
  auto start = Clock::now();
  const double exact = static_cast<double>(CountConnectedSets(q, ~uint64_t{0}));
  const double count_seconds = Seconds(start);
  std::printf("| %s | %d | %.4g | %.3f |", name, q.size(), exact, count_seconds);
  for (int probes : {100, 400, 1600}) {
    start = Clock::now();
    const ConnectedSetCount c = EstimateConnectedSets(q, 1, probes);
    std::printf(" %.3f (%.3f s) |", c.sets / exact, Seconds(start));
  }
  std::printf("\n");
}

}  // namespace

int main() {
  std::printf("| graph | n | connected sets | count s | 100 probes | 400 probes | 1600 |\n");
  std::printf("|---|---|---|---|---|---|---|\n");
  for (int n : {24, 28, 32}) {
    for (uint64_t seed : {1, 2, 3}) {
      char name[32];
      std::snprintf(name, sizeof name, "random s%d", static_cast<int>(seed));
      Row(name, MakeQuery(GraphShape::kRandom, n, seed));
    }
  }
  for (int n : {20, 40, 64}) Row("cycle", MakeQuery(GraphShape::kCycle, n, 1));
  Row("hyper", MakeQuery(GraphShape::kHyper, 26, 1));
  return 0;
}
