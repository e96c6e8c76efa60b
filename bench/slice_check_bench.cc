// What the coordinator's check of one slice answer costs (core/slice_check.h):
// the cout model at 20 relations (with and without cross products, 8
// slices, the constraint relations chosen once as the scheduler does) and
// the cluster model's frontier at 10 relations (every node's three
// metrics recomputed from its physical choices), mean of repeated checks.
// Not a test; run by hand:  build/bench/slice_check_bench
#include <chrono>
#include <cstdio>

#include "core/slice_check.h"
#include "core/slicing/constraint_choice.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

// Mean seconds per check of `result`, over `repeats` checks.
double TimeCheck(const Query& q, const SearchOptions& options, const SliceResult& result,
                 const std::vector<ConstraintRelations>& chosen, int repeats) {
  const auto start = std::chrono::steady_clock::now();
  int ok = 0;
  for (int i = 0; i < repeats; ++i) ok += CheckSliceResult(q, options, result, chosen).ok();
  const double s = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  if (ok != repeats) std::fprintf(stderr, "a true answer failed its check\n");
  return s / repeats;
}

}  // namespace
}  // namespace sliceplan

int main() {
  using namespace sliceplan;
  const Query cout_query = testing::MakeQuery(testing::GraphShape::kRandom, 20, 3);
  for (bool cross : {true, false}) {
    SearchOptions options;
    options.cross_products = cross;
    const SliceSpec slice{3, 8};
    SearchControl control;
    auto r = SolveSlice(cout_query, options, slice, control);
    if (!r.ok()) return 1;
    const auto chosen =
        ChooseConstraintRelations(cout_query, options.shape, slice.bits(), options.cross_products);
    std::printf("cout, 20 relations, slice 3 of 8, cross products %s: %.2f us per check\n",
                cross ? "allowed" : "excluded",
                TimeCheck(cout_query, options, *r, chosen, 20000) * 1e6);
  }
  const Query cluster_query = testing::MakeQuery(testing::GraphShape::kRandom, 10, 2);
  SearchOptions options;
  options.cost = CostModelKind::kCluster;
  options.cluster.params.sample_rates = {1.0, 0.1};
  SearchControl control;
  auto r = SolveSlice(cluster_query, options, {0, 1}, control);
  if (!r.ok()) return 1;
  const auto chosen = ChooseConstraintRelations(cluster_query, options.shape, 0, true);
  std::printf(
      "cluster, 10 relations, one slice, a frontier of %zu plans: %.2f us per check "
      "(%.3f us per plan)\n",
      r->frontier.size(), TimeCheck(cluster_query, options, *r, chosen, 2000) * 1e6,
      TimeCheck(cluster_query, options, *r, chosen, 2000) * 1e6 /
          static_cast<double>(r->frontier.size() + 1));
  return 0;
}
