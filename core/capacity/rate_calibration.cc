#include "core/capacity/rate_calibration.h"

#include <algorithm>
#include <chrono>
#include <vector>

#include "core/graph/connected_sets.h"
#include "core/graph/join_graph.h"
#include "core/model/status_macros.h"
#include "core/slice_solver.h"
#include "core/slicing/search_estimate.h"

namespace sliceplan {
namespace {

using Clock = std::chrono::steady_clock;

constexpr double kDenseCalibrationSplits = 2e7;
constexpr uint64_t kConnectedCalibrationSets = 20000;
// Runs of the dense calibration, the best kept: its runs take milliseconds,
// and the first few on an idle core run slow (best of 3 varied by 1.7x
// between invocations, best of 7 by 2%, docs/benchmarks.md).
constexpr int kDenseRuns = 7;

// Seconds of one unsliced search (best of `runs`).
absl::StatusOr<double> TimeSearch(const Query& query, const SearchOptions& options, int runs) {
  double best = 0;
  for (int i = 0; i < runs; ++i) {
    SearchControl control;
    const auto start = Clock::now();
    RETURN_IF_ERROR(SolveSlice(query, options, {0, 1}, control).status());
    const double seconds = std::chrono::duration<double>(Clock::now() - start).count();
    best = i == 0 ? seconds : std::min(best, seconds);
  }
  return best;
}

// A chain of n relations of 1,000 rows joined at selectivity 1e-3.
Query SyntheticChain(int n) {
  std::vector<Relation> relations;
  std::vector<Predicate> predicates;
  for (int i = 0; i < n; ++i) {
    relations.push_back({"c" + std::to_string(i), 1000, kDefaultRowBytes});
    if (i > 0) predicates.push_back({(RelSet{3} << (i - 1)), 1e-3});
  }
  return *Query::Create(std::move(relations), std::move(predicates));
}

absl::StatusOr<double> DenseRate(const SearchOptions& options) {
  int n = 4;
  while (n < 24 && DenseSplits(n + 1, options.shape, 0, true) <= kDenseCalibrationSplits) ++n;
  SearchOptions dense = options;
  dense.cross_products = true;
  dense.cost = CostModelKind::kCout;
  ASSIGN_OR_RETURN(const double seconds, TimeSearch(SyntheticChain(n), dense, kDenseRuns));
  return seconds / DenseSplits(n, options.shape, 0, true);
}

absl::StatusOr<double> ConnectedRate(const Query& query, const SearchOptions& options) {
  const Query part = ConnectedPart(query, kConnectedCalibrationSets);
  const uint64_t sets = CountConnectedSets(part, ~uint64_t{0});
  SearchOptions connected = options;
  connected.cross_products = false;
  connected.cost = CostModelKind::kCout;
  ASSIGN_OR_RETURN(const double seconds, TimeSearch(part, connected, 1));
  return seconds / static_cast<double>(std::max<uint64_t>(1, sets));
}

}  // namespace

Query ConnectedPart(const Query& query, uint64_t min_sets) {
  const JoinGraph graph(query);
  RelSet taken = 1;
  auto restricted = [&query](RelSet keep) {
    std::vector<Relation> relations;
    std::vector<RelationId> position(query.size());
    ForEachMember(keep, [&](RelationId r) {
      position[r.value] = RelationId{static_cast<uint8_t>(relations.size())};
      relations.push_back(query.relation(r));
    });
    std::vector<Predicate> predicates;
    for (const Predicate& p : query.predicates()) {
      if (!IsSubset(p.relations, keep)) continue;
      RelSet mapped = 0;
      ForEachMember(p.relations, [&](RelationId r) { mapped |= Singleton(position[r.value]); });
      predicates.push_back({mapped, p.selectivity});
    }
    return *Query::Create(std::move(relations), std::move(predicates));
  };
  // Grow one relation at a time, the lowest-numbered neighbour first.
  while (taken != query.all()) {
    const RelSet around = graph.Around(taken);
    if (around == 0) break;
    taken |= LowestBit(around);
    if (CountConnectedSets(restricted(taken), min_sets) >= min_sets) break;
  }
  return restricted(taken);
}

absl::StatusOr<MachineRates> CalibrateRates(const Query& query, const SearchOptions& options) {
  MachineRates rates;
  if (options.cross_products) {
    ASSIGN_OR_RETURN(rates.dense_split_seconds, DenseRate(options));
  } else {
    // A part cut through a hyperedge may be disconnected: the default
    // rate stands then.
    if (auto rate = ConnectedRate(query, options); rate.ok()) rates.connected_set_seconds = *rate;
  }
  return rates;
}

}  // namespace sliceplan
