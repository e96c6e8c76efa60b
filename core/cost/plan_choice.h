// Choosing one plan from a Pareto set: optional bounds on the metrics
// (latency_s <= 60, completeness >= 0.99) and a preference (minimise one
// metric, or a weighted sum of latency_s, node_seconds and 1 -
// completeness). The frontier itself is always returned as well. Pure
// functions; thread-safe.
#ifndef SLICEPLAN_CORE_COST_PLAN_CHOICE_H_
#define SLICEPLAN_CORE_COST_PLAN_CHOICE_H_

#include <optional>
#include <string>
#include <vector>

#include "absl/status/statusor.h"
#include "core/cost/cluster_model.h"

namespace sliceplan {

enum class Metric : uint8_t { kLatency, kNodeSeconds, kCompleteness };
std::string MetricLabel(Metric m);  // "latency_s", "node_seconds", "completeness"
double MetricValue(const ClusterCosts& c, Metric m);

struct Bound {
  Metric metric = Metric::kLatency;
  bool at_most = true;  // <= (else >=)
  double value = 0;
};

struct Preference {
  // Weights of latency_s, node_seconds and (1 - completeness); minimising
  // one metric is a single weight of 1 (completeness: maximised).
  double latency = 1, node_seconds = 0, incompleteness = 0;
  // The best plan on `m` alone (completeness: the most complete).
  static Preference Best(Metric m) {
    return {m == Metric::kLatency ? 1.0 : 0.0, m == Metric::kNodeSeconds ? 1.0 : 0.0,
            m == Metric::kCompleteness ? 1.0 : 0.0};
  }
  double Score(const ClusterCosts& c) const {
    return latency * c.latency_s + node_seconds * c.node_seconds +
           incompleteness * (1 - c.completeness);
  }
};

struct ChoiceRule {
  std::vector<Bound> bounds;
  Preference prefer;
};

// "latency_s<=60", "completeness>=0.99". Errors (INVALID_ARGUMENT, "bound:
// ..."): an unknown metric, an operator other than <= or >=, a bad number.
absl::StatusOr<Bound> ParseBound(const std::string& text);
// "latency_s" / "node_seconds" / "completeness", or
// "weights:latency_s=1,node_seconds=0.01,completeness=100". Errors
// (INVALID_ARGUMENT, "prefer: ...").
absl::StatusOr<Preference> ParsePreference(const std::string& text);

// The index of the plan meeting every bound with the least score (ties:
// the earliest); none when no plan meets the bounds.
std::optional<size_t> ChoosePlan(const std::vector<ClusterCosts>& frontier, const ChoiceRule& rule);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_COST_PLAN_CHOICE_H_
