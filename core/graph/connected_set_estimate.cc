#include "core/graph/connected_set_estimate.h"

#include <bit>
#include <cmath>
#include <random>
#include <utility>

#include "core/graph/connected_sets.h"
#include "core/graph/join_graph.h"

namespace sliceplan {
namespace {

// The members of `mask` picked by the bits of `index`: its i-th lowest
// member is taken when bit i of `index` is set (a software PDEP).
RelSet Deposit(uint64_t index, RelSet mask) {
  RelSet out = 0;
  for (; mask != 0 && index != 0; mask &= mask - 1, index >>= 1) {
    if (index & 1) out |= LowestBit(mask);
  }
  return out;
}

// Neighbourhoods up to this wide are sampled with a one-step look-ahead.
constexpr int kLookAheadWidth = 10;

// Picks a child of node (s, x) with neighbourhood nb: the subset N' of nb
// to add. Returns it with 1 / its probability. Narrow neighbourhoods look
// one step ahead: each child is weighted by 2^(its own neighbourhood's
// width), a proxy for its subtree's size, which tames the heavy tail of
// uniform choice where one child's subtree dwarfs the others' (a cycle's
// "grow both ends" child). Wide ones are sampled uniformly.
std::pair<RelSet, double> PickChild(const JoinGraph& graph, RelSet s, RelSet x, RelSet nb,
                                    std::mt19937_64& rng) {
  const int width = std::popcount(nb);
  const uint64_t top = width >= 64 ? ~uint64_t{0} : (uint64_t{1} << width) - 1;
  if (width > kLookAheadWidth) {
    const uint64_t index = std::uniform_int_distribution<uint64_t>(1, top)(rng);
    return {Deposit(index, nb), static_cast<double>(top)};
  }
  double weights[uint64_t{1} << kLookAheadWidth];
  double total = 0;
  const RelSet x2 = x | nb;
  for (uint64_t i = 1; i <= top; ++i) {
    const RelSet child = s | Deposit(i, nb);
    weights[i - 1] = std::ldexp(1.0, std::popcount(graph.Around(child) & ~x2));
    total += weights[i - 1];
  }
  double u = std::uniform_real_distribution<double>(0, total)(rng);
  uint64_t i = 1;
  for (; i < top && u >= weights[i - 1]; ++i) u -= weights[i - 1];
  return {Deposit(i, nb), total / weights[i - 1]};
}

// One probe of the subtree rooted at {v}: Knuth's path sum, each level's
// weight the inverse of the probability of the path so far.
double ProbeSubtree(const JoinGraph& graph, int v, std::mt19937_64& rng) {
  RelSet s = RelSet{1} << v;
  RelSet x = FullSet(v + 1);
  double weight = 1, total = 1;
  for (;;) {
    const RelSet nb = graph.Around(s) & ~x;
    if (nb == 0) return total;
    const auto [added, inverse_probability] = PickChild(graph, s, x, nb, rng);
    weight *= inverse_probability;
    total += weight;
    s |= added;
    x |= nb;
  }
}

}  // namespace

ConnectedSetCount EstimateConnectedSets(const Query& query, uint64_t exact_cap,
                                        int probes_per_relation, uint64_t seed) {
  const uint64_t counted = CountConnectedSets(query, exact_cap);
  if (counted < exact_cap) return {static_cast<double>(counted), true};
  const JoinGraph graph(query);
  std::mt19937_64 rng(seed);
  double sets = 0;
  for (int v = 0; v < query.size(); ++v) {
    double sum = 0;
    for (int i = 0; i < probes_per_relation; ++i) sum += ProbeSubtree(graph, v, rng);
    sets += sum / probes_per_relation;
  }
  return {sets, false};
}

}  // namespace sliceplan
