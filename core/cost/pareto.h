// Dominance between plans of the cluster model (docs/cost-models.md).
//
// Inside the search, plans of one relation set are compared only at equal
// completeness (equal rows), on latency_s and node_seconds: p alpha-covers
// q when each selected metric of p is at most alpha times q's. Across
// levels nothing is pruned, since a less complete sub-plan makes every
// stage above it faster. The final set for all relations, and the merge
// of slices, use exact dominance on every selected objective
// (completeness maximised). Pure functions; thread-safe.
#ifndef SLICEPLAN_CORE_COST_PARETO_H_
#define SLICEPLAN_CORE_COST_PARETO_H_

#include <cstdint>
#include <span>
#include <string>
#include <vector>

#include "absl/status/statusor.h"
#include "core/cost/cluster_model.h"

namespace sliceplan {

// A subset of the three metrics.
struct Objectives {
  static constexpr uint8_t kLatency = 1, kNodeSeconds = 2, kCompleteness = 4;
  uint8_t mask = kLatency | kNodeSeconds | kCompleteness;
  bool has(uint8_t o) const { return (mask & o) != 0; }
};

// "latency_s,node_seconds" -> Objectives. Errors (INVALID_ARGUMENT,
// "objectives: ..."): empty, an unknown or a repeated name.
absl::StatusOr<Objectives> ParseObjectives(const std::string& text);
std::string ObjectivesString(Objectives o);

// Within one completeness level: p alpha-covers q on the selected ones of
// latency_s and node_seconds (with none selected, any plan covers any).
inline bool CoversInLevel(const ClusterCosts& p, const ClusterCosts& q, Objectives o,
                          double alpha) {
  return (!o.has(Objectives::kLatency) || p.latency_s <= alpha * q.latency_s) &&
         (!o.has(Objectives::kNodeSeconds) || p.node_seconds <= alpha * q.node_seconds);
}

// Relative difference below which two completeness values are equal (they
// are products of the same rates in different orders).
inline constexpr double kCompletenessTolerance = 1e-12;

// p is at least as good as q on every selected objective.
bool DominatesOrEquals(const ClusterCosts& p, const ClusterCosts& q, Objectives o);

// The indices of the non-dominated plans (of equal cost vectors, the first
// only), ordered by increasing latency_s, then node_seconds, then
// decreasing completeness.
std::vector<size_t> FrontierIndices(std::span<const ClusterCosts> plans, Objectives o);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_COST_PARETO_H_
