// What the cluster model's search is asked for: the model's parameters,
// the metrics it trades, the approximation factor and the rule that names
// the answer among the Pareto set. Plain values, copyable.
#ifndef SLICEPLAN_CORE_COST_CLUSTER_CONFIG_H_
#define SLICEPLAN_CORE_COST_CLUSTER_CONFIG_H_

#include "core/cost/cluster_model.h"
#include "core/cost/pareto.h"
#include "core/cost/plan_choice.h"

namespace sliceplan {

struct ClusterSearchConfig {
  ClusterParams params;
  Objectives objectives;
  double alpha = 1.0;  // >= 1; 1 is exact
  ChoiceRule choice;   // which frontier plan the answer names
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_COST_CLUSTER_CONFIG_H_
