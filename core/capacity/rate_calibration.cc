#include "core/capacity/rate_calibration.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <optional>
#include <vector>

#include "absl/base/thread_annotations.h"
#include "absl/synchronization/mutex.h"
#include "core/graph/connected_set_estimate.h"
#include "core/graph/connected_sets.h"
#include "core/graph/join_graph.h"
#include "core/model/status_macros.h"
#include "core/search/connected_strategy.h"
#include "core/slice_search.h"
#include "core/slice_solver.h"
#include "core/slicing/search_estimate.h"

namespace sliceplan {
namespace {

using Clock = std::chrono::steady_clock;

constexpr double kDenseCalibrationSplits = 2e7;
// The connected rate is measured on two parts of the query, and the time
// per set extrapolated to the whole query's set count as a power of the
// set count fitted through the two (a set's pairs grow with the sets
// around it, docs/tiers.md); the exponent is kept within [0, 1].
constexpr uint64_t kConnectedSmallSets = 10000;
constexpr uint64_t kConnectedCalibrationSets = 80000;
constexpr double kMaxRateGrowth = 1;
constexpr int kConnectedRuns = 3;
constexpr uint64_t kBytesPerSet = CoutPolicy::kBytesPerSlot + sizeof(double);
// Runs of the dense calibration, the best kept: its runs take milliseconds,
// and the first few on an idle core run slow (best of 3 varied by 1.7x
// between invocations, best of 7 by 2%, docs/benchmarks.md).
constexpr int kDenseRuns = 7;

// Seconds of one unsliced search (best of `runs`).
absl::StatusOr<double> TimeSearch(const Query& query, const SearchOptions& options, int runs,
                                  const SearchControl& outer) {
  double best = 0;
  for (int i = 0; i < runs; ++i) {
    SearchControl control = outer;
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

absl::StatusOr<double> DenseRate(const SearchOptions& options, const SearchControl& outer) {
  int n = 4;
  while (n < 24 && DenseSplits(n + 1, options.shape, 0, true) <= kDenseCalibrationSplits) ++n;
  SearchOptions dense = options;
  dense.cross_products = true;
  dense.cost = CostModelKind::kCout;
  ASSIGN_OR_RETURN(const double seconds, TimeSearch(SyntheticChain(n), dense, kDenseRuns, outer));
  return seconds / DenseSplits(n, options.shape, 0, true);
}

// Seconds per connected set of the connected-only search of `part`, and
// its connected-set count (best of kConnectedRuns).
struct PartRate {
  double seconds_per_set = 0;
  double sets = 0;
};
absl::StatusOr<PartRate> MeasurePart(const Query& part, const SearchOptions& options,
                                     std::optional<ConnectedMethod> method,
                                     const SearchControl& outer) {
  SearchOptions connected = options;
  connected.cross_products = false;
  connected.cost = CostModelKind::kCout;
  const SliceConstraints whole = SliceConstraints::FromRelations(options.shape, {0, 1}, {});
  double best = 0, sets = 1;
  for (int i = 0; i < kConnectedRuns; ++i) {
    SliceSearch<CoutPolicy> search(part, connected, whole);
    if (method) search.want_connected_method(*method);
    SearchControl control = outer;
    RETURN_IF_ERROR(search.Run(control));
    best = i == 0 ? search.stats().seconds : std::min(best, search.stats().seconds);
    sets = static_cast<double>(std::max<uint64_t>(1, search.stats().memo_entries));
  }
  return PartRate{best / sets, sets};
}

absl::StatusOr<double> ConnectedRate(const Query& query, const SearchOptions& options,
                                     const SearchControl& outer) {
  // The parts run the method the whole query would.
  const JoinGraph graph(query);
  const ConnectedMethod method =
      ChooseConnectedStrategy(query, graph, options.shape, kBytesPerSet, options.memo_limit_bytes)
          .method;
  ASSIGN_OR_RETURN(const PartRate small,
                   MeasurePart(ConnectedPart(query, kConnectedSmallSets), options, method, outer));
  ASSIGN_OR_RETURN(
      const PartRate large,
      MeasurePart(ConnectedPart(query, kConnectedCalibrationSets), options, method, outer));
  const double sets = EstimateConnectedSets(query).sets;
  if (large.sets >= sets || large.sets <= small.sets) return large.seconds_per_set;
  const double growth = std::clamp(
      std::log(large.seconds_per_set / small.seconds_per_set) / std::log(large.sets / small.sets),
      0.0, kMaxRateGrowth);
  return large.seconds_per_set * std::pow(sets / large.sets, growth);
}

}  // namespace

Query QueryPart(const Query& query, RelSet keep) {
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
}

Query ConnectedPart(const Query& query, uint64_t min_sets) {
  const JoinGraph graph(query);
  RelSet taken = 1;
  // Grow one relation at a time, the lowest-numbered neighbour first.
  while (taken != query.all()) {
    const RelSet around = graph.Around(taken);
    if (around == 0) break;
    taken |= LowestBit(around);
    if (CountConnectedSets(QueryPart(query, taken), min_sets) >= min_sets) break;
  }
  return QueryPart(query, taken);
}

absl::StatusOr<MachineRates> CalibrateRates(const Query& query, const SearchOptions& options,
                                            const SearchControl& control) {
  MachineRates rates;
  if (options.cross_products) {
    ASSIGN_OR_RETURN(rates.dense_split_seconds, DenseRate(options, control));
  } else {
    // A part cut through a hyperedge may be disconnected: the default
    // rate stands then.
    auto rate = ConnectedRate(query, options, control);
    if (rate.ok()) {
      rates.connected_set_seconds = *rate;
    } else if (absl::IsCancelled(rate.status()) || absl::IsDeadlineExceeded(rate.status())) {
      return rate.status();
    }
  }
  return rates;
}

absl::StatusOr<MachineRates> CalibrateRatesOnce(const Query& query, const SearchOptions& options,
                                                const SearchControl& control) {
  if (!options.cross_products) return CalibrateRates(query, options, control);
  static absl::Mutex mu(absl::kConstInit);
  static std::optional<double> dense[2] ABSL_GUARDED_BY(mu);
  const int shape = options.shape == PlanShape::kBushy ? 0 : 1;
  absl::MutexLock lock(&mu);  // one calibration at a time: they share the cores
  if (!dense[shape]) {
    ASSIGN_OR_RETURN(const MachineRates measured, CalibrateRates(query, options, control));
    dense[shape] = measured.dense_split_seconds;
  }
  MachineRates rates;
  rates.dense_split_seconds = *dense[shape];
  return rates;
}

}  // namespace sliceplan
