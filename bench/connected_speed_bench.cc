// The connected-only search (no cross products) beside the dense kernel
// (cross products) on the same query, in one run: seconds, pairs and ns per
// pair of each, and their ratios. Targets (docs/benchmarks.md): the clique
// without cross products at most 2x the time with them; other shapes at most
// 4x the dense kernel's ns per pair. The `dphyp` and `walk` columns are
// the ns per pair of DPhyp and of the set ccp walk, each made to run
// over a direct memo (up to 24 relations; no counting or sampling to
// choose). Not a test: run by hand.
//
//   build/bench/connected_speed_bench [--connected-only] [SHAPE:N ...]
//   (default clique:16 star:20 cycle:20 random:20 random:24 chain:40; the
//   dense kernel runs up to 20 relations)
#include <cstdio>
#include <cstdlib>
#include <optional>
#include <string>
#include <vector>

#include "absl/strings/numbers.h"
#include "absl/strings/str_split.h"
#include "core/slice_search.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

struct Run {
  double seconds = 0;
  uint64_t pairs = 0;
};

// Best of five runs, the least disturbed by the other core's load. With
// `method`, the connected-only search is made to take it.
Run Best(const Query& q, bool cross_products, std::optional<ConnectedMethod> method = {}) {
  Run best;
  for (int rep = 0; rep < 5; ++rep) {
    auto constraints = SliceConstraints::ForSlice(q, PlanShape::kBushy, {0, 1}, cross_products);
    if (!constraints.ok()) {
      std::fprintf(stderr, "%s\n", std::string(constraints.status().message()).c_str());
      std::exit(1);
    }
    SliceSearch<CoutPolicy> search(q, {PlanShape::kBushy, cross_products, CostModelKind::kCout},
                                   *std::move(constraints));
    if (method) search.want_connected_method(*method);
    SearchControl control;
    const absl::Status status = search.Run(control);
    if (!status.ok()) {
      std::fprintf(stderr, "%s\n", std::string(status.message()).c_str());
      std::exit(1);
    }
    const SearchStats& stats = search.stats();
    if (rep == 0 || stats.seconds < best.seconds) best = {stats.seconds, stats.splits};
  }
  return best;
}

// Set by --connected-only (profiling the connected search alone).
bool connected_only = false;

void Compare(GraphShape shape, int n) {
  const Query q = testing::MakeQuery(shape, n, 1);
  const Run connected = Best(q, false);
  // DPhyp and the set ccp walk over a direct memo where it fits (ns
  // per pair; forced, so without the choice's counting and sampling).
  const auto forced = [&](ConnectedMethod method) {
    return n <= 26 ? 1e9 * Best(q, false, method).seconds / static_cast<double>(connected.pairs)
                   : 0.0;
  };
  const double dphyp = forced(ConnectedMethod::kPushDirect);
  const double walked = forced(ConnectedMethod::kPullSetCcps);
  // 3^21 splits take about 10 s of dense kernel.
  const bool dense_fits = n <= 20 && !connected_only;
  const Run dense = dense_fits ? Best(q, true) : Run{};
  const auto ns = [](const Run& r) { return 1e9 * r.seconds / static_cast<double>(r.pairs); };
  std::printf("%-7s %3d | %11llu %8.3f %7.2f %7.2f %7.2f | ", testing::ShapeName(shape).c_str(), n,
              static_cast<unsigned long long>(connected.pairs), connected.seconds, ns(connected),
              dphyp, walked);
  if (!dense_fits) {
    std::printf("(dense kernel not run)\n");
    return;
  }
  std::printf("%11llu %8.3f %7.2f | %6.2f %6.2f\n", static_cast<unsigned long long>(dense.pairs),
              dense.seconds, ns(dense), connected.seconds / dense.seconds,
              ns(connected) / ns(dense));
}

}  // namespace
}  // namespace sliceplan

int main(int argc, char** argv) {
  std::vector<std::string> specs(argv + 1, argv + argc);
  if (!specs.empty() && specs[0] == "--connected-only") {
    sliceplan::connected_only = true;
    specs.erase(specs.begin());
  }
  if (specs.empty()) {
    specs = {"clique:16", "star:20", "cycle:20", "random:20", "random:24", "chain:40"};
  }
  std::printf("%-7s %3s | %11s %8s %7s %7s %7s | %11s %8s %7s | %6s %6s\n", "shape", "n",
              "conn_pairs", "conn_s", "ns/pair", "dphyp", "walk", "dense_pairs", "dense_s",
              "ns/pair", "time_x", "ns_x");
  for (const std::string& spec : specs) {
    const std::vector<std::string> parts = absl::StrSplit(spec, ':');
    sliceplan::testing::GraphShape shape;
    int n = 0;
    if (parts.size() != 2 || !sliceplan::testing::ShapeFromName(parts[0], shape) ||
        !absl::SimpleAtoi(parts[1], &n) || n < 2 || n > 64) {
      std::fprintf(stderr,
                   "bad spec %s: want SHAPE:N (chain, cycle, star, clique, random, hyper)\n",
                   spec.c_str());
      return 2;
    }
    sliceplan::Compare(shape, n);
  }
  return 0;
}
