// The cluster model's physical choice per join and its three metrics, as
// plans carry them (plan.h) without the model's formulas
// (cluster_model.h). Plain values.
#ifndef SLICEPLAN_CORE_MODEL_CLUSTER_COSTS_H_
#define SLICEPLAN_CORE_MODEL_CLUSTER_COSTS_H_

#include <cstdint>
#include <string>

namespace sliceplan {

enum class JoinStrategy : uint8_t { kShuffle, kBroadcastRight, kBroadcastLeft };
inline constexpr JoinStrategy kAllStrategies[] = {
    JoinStrategy::kShuffle, JoinStrategy::kBroadcastRight, JoinStrategy::kBroadcastLeft};
std::string StrategyName(JoinStrategy s);  // "shuffle", "broadcast-right", ...

// The three metrics of a (sub)plan.
struct ClusterCosts {
  double latency_s = 0;
  double node_seconds = 0;
  double completeness = 1;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MODEL_CLUSTER_COSTS_H_
