#include "tests/support/enumerator_runs.h"

#include <algorithm>
#include <cstdio>
#include <cstdlib>

#include "core/cost/count_policy.h"
#include "core/cost/cout_policy.h"
#include "core/slice_search.h"
#include "core/slicing/slice_constraints.h"

namespace sliceplan::testing {
namespace {

[[noreturn]] void Die(const absl::Status& status) {
  std::fprintf(stderr, "enumerator run failed: %s\n", status.ToString().c_str());
  std::abort();
}

// Runs the search in place (a policy keeps references into its search)
// and hands it to `read`.
template <class Policy, class Read>
void Search(const Query& query, const SearchOptions& options, SliceSpec slice,
            std::optional<ConnectedMethod> method, Read read) {
  auto constraints =
      SliceConstraints::ForSlice(query, options.shape, slice, options.cross_products);
  if (!constraints.ok()) Die(constraints.status());
  SliceSearch<Policy> search(query, options, *std::move(constraints));
  if (method) search.want_connected_method(*method);
  if (absl::Status s = search.Run(SearchControl()); !s.ok()) Die(s);
  read(search);
}

}  // namespace

EnumeratorRun RunEnumerator(const Query& query, PlanShape shape, bool cross_products,
                            SliceSpec slice, std::optional<ConnectedMethod> method) {
  SearchOptions options;
  options.shape = shape;
  options.cross_products = cross_products;
  EnumeratorRun run;
  Search<CoutPolicy>(query, options, slice, method, [&](const SliceSearch<CoutPolicy>& costed) {
    run.stats = costed.stats();
    run.method = costed.connected_method();
    if (const auto root = costed.RootSlot()) run.cost = costed.policy().Cost(*root);
  });
  Search<CountPolicy>(query, options, slice, method, [&](const SliceSearch<CountPolicy>& counted) {
    if (const auto root = counted.RootSlot()) run.plans = counted.policy().Count(*root);
  });
  return run;
}

SlicedRun RunAllSlices(const Query& query, PlanShape shape, bool cross_products, uint32_t p,
                       std::optional<ConnectedMethod> method) {
  SlicedRun out;
  for (uint32_t i = 0; i < p; ++i) {
    const EnumeratorRun run = RunEnumerator(query, shape, cross_products, {i, p}, method);
    out.plans += run.plans;
    if (run.cost) out.cost = std::min(out.cost.value_or(*run.cost), *run.cost);
  }
  return out;
}

}  // namespace sliceplan::testing
