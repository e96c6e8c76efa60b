// The capacity model against measured slice times: for n = 14..20 and
// P = 1..16, both plan shapes, cross products allowed, the forecast
// slowest-slice seconds (core/capacity/capacity_model.h, with the rate measured by
// core/capacity/rate_calibration.h once per shape) over the measured slowest slice
// (every slice solved once, one at a time, on one thread). Figures in
// docs/benchmarks.md.
#include <algorithm>
#include <bit>
#include <chrono>
#include <cstdio>

#include "core/capacity/capacity_model.h"
#include "core/capacity/rate_calibration.h"
#include "core/slice_solver.h"
#include "tests/support/test_queries.h"

namespace {

using namespace sliceplan;
using Clock = std::chrono::steady_clock;

double SlowestSlice(const Query& q, const SearchOptions& options, uint32_t p) {
  double slowest = 0;
  for (uint32_t i = 0; i < p; ++i) {
    SearchControl control;
    const auto start = Clock::now();
    auto r = SolveSlice(q, options, {i, p}, control);
    const double s = std::chrono::duration<double>(Clock::now() - start).count();
    if (!r.ok()) {
      std::fprintf(stderr, "%s\n", r.status().ToString().c_str());
      return -1;
    }
    slowest = std::max(slowest, s);
  }
  return slowest;
}

}  // namespace

// Without cross products: the connected rate measured on each query's own
// part (three calibrations, their spread shown), the forecast of the
// unsliced search and of P = 4 over the measured slowest slice.
void ConnectedRows() {
  std::printf(
      "\n| graph | n | shape | us per set (3 calibrations) | P=1 forecast/measured | P=4 |\n"
      "|---|---|---|---|---|---|\n");
  for (const auto graph : {testing::GraphShape::kRandom, testing::GraphShape::kStar}) {
    for (int n : {18, 20, 22, 24}) {
      for (const PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
        SearchOptions options;
        options.shape = shape;
        options.cross_products = false;
        const Query q = testing::MakeQuery(graph, n, 1);
        double lo = 1, hi = 0;
        MachineRates rates;
        for (int i = 0; i < 3; ++i) {
          rates = *CalibrateRates(q, options);
          lo = std::min(lo, rates.connected_set_seconds);
          hi = std::max(hi, rates.connected_set_seconds);
        }
        rates.slice_overhead_seconds = 0;
        std::printf("| %s | %d | %s | %.3f-%.3f |", testing::ShapeName(graph).c_str(), n,
                    shape == PlanShape::kBushy ? "bushy" : "left-deep", lo * 1e6, hi * 1e6);
        for (uint32_t p : {1u, 4u}) {
          const ExactForecast f = ForecastExact(q, options, static_cast<int>(p), rates, p);
          std::printf(" %.2f |", f.seconds / SlowestSlice(q, options, p));
        }
        std::printf("\n");
        std::fflush(stdout);
      }
    }
  }
}

int main(int argc, char**) {
  if (argc > 1) {
    ConnectedRows();
    return 0;
  }
  std::printf("| shape | n | P=1 | P=2 | P=4 | P=8 | P=16 |\n|---|---|---|---|---|---|---|\n");
  for (const PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
    SearchOptions options;
    options.shape = shape;
    const Query probe = testing::MakeQuery(testing::GraphShape::kRandom, 16, 1);
    MachineRates rates = *CalibrateRates(probe, options);
    rates.slice_overhead_seconds = 0;
    for (int n = 14; n <= 20; n += 2) {
      const Query q = testing::MakeQuery(testing::GraphShape::kRandom, n, 7);
      std::printf("| %s | %d |", shape == PlanShape::kBushy ? "bushy" : "left-deep", n);
      for (uint32_t p = 1; p <= 16; p *= 2) {
        const ExactForecast f = ForecastExact(q, options, static_cast<int>(p), rates, p);
        const double measured = SlowestSlice(q, options, p);
        std::printf(" %.2f |", f.seconds / measured);
      }
      std::printf("\n");
      std::fflush(stdout);
    }
  }
  return 0;
}
