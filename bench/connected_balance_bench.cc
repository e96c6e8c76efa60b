// Slice balance without cross products: for classic join graphs, the
// largest slice's splits over the unsliced splits (the shrink) and over the
// mean slice (the balance), for the project's constraint choice and for a
// naive choice (lowest relation ids). Not a test; see docs/benchmarks.md.
#include <algorithm>
#include <cstdio>
#include <vector>

#include "core/cost/cout_policy.h"
#include "core/slice_search.h"
#include "core/slicing/constraint_choice.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

uint64_t Splits(const Query& q, PlanShape shape, const SliceConstraints& c) {
  SearchOptions options{shape, false, CostModelKind::kCout};
  SliceSearch<CoutPolicy> search(q, options, c);
  SearchControl control;
  if (!search.Run(control).ok()) return 0;
  return search.stats().splits;
}

std::vector<ConstraintRelations> Naive(PlanShape shape, int k) {
  std::vector<ConstraintRelations> out;
  const int w = RelationsPerConstraint(shape);
  for (int j = 0; j < k; ++j) {
    ConstraintRelations r;
    r.size = w;
    for (int d = 0; d < w; ++d) r.ids[d] = RelationId{static_cast<uint8_t>(w * j + d)};
    out.push_back(r);
  }
  return out;
}

void Report(const char* name, const Query& q, PlanShape shape) {
  const SliceConstraints whole = SliceConstraints::FromRelations(shape, {0, 1}, {});
  const double unsliced = static_cast<double>(Splits(q, shape, whole));
  for (int k = 1; k <= 4; ++k) {
    const uint32_t p = 1u << k;
    double ours_max = 0, ours_sum = 0, naive_max = 0, naive_sum = 0;
    const auto chosen = ChooseConstraintRelations(q, shape, k, false);
    const auto naive = Naive(shape, k);
    for (uint32_t i = 0; i < p; ++i) {
      const double a = static_cast<double>(
          Splits(q, shape, SliceConstraints::FromRelations(shape, {i, p}, chosen)));
      const double b = static_cast<double>(
          Splits(q, shape, SliceConstraints::FromRelations(shape, {i, p}, naive)));
      ours_max = std::max(ours_max, a), ours_sum += a;
      naive_max = std::max(naive_max, b), naive_sum += b;
    }
    std::printf(
        "%-10s %-9s P=%-3u ours: max/whole %.3f balance %.3f | naive: max/whole %.3f balance "
        "%.3f\n",
        name, shape == PlanShape::kBushy ? "bushy" : "left-deep", p, ours_max / unsliced,
        ours_max / (ours_sum / p), naive_max / unsliced, naive_max / (naive_sum / p));
  }
}

}  // namespace
}  // namespace sliceplan

int main() {
  using namespace sliceplan;
  const struct {
    const char* name;
    GraphShape shape;
    int n;
  } graphs[] = {{"chain30", GraphShape::kChain, 30},
                {"cycle24", GraphShape::kCycle, 24},
                {"star16", GraphShape::kStar, 16},
                {"clique14", GraphShape::kClique, 14},
                {"random22", GraphShape::kRandom, 22}};
  for (const auto& g : graphs) {
    const Query q = testing::MakeQuery(g.shape, g.n, 1);
    Report(g.name, q, PlanShape::kBushy);
    Report(g.name, q, PlanShape::kLeftDeep);
  }
  return 0;
}
