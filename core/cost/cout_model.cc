#include "core/cost/cout_model.h"

namespace sliceplan {

double CostWithCout(Plan& plan) {
  for (PlanNode& node : plan.nodes) {  // children come first
    node.cost = node.is_leaf() ? 0.0
                               : CoutJoin(node.cardinality, plan.nodes[node.left].cost,
                                          plan.nodes[node.right].cost);
  }
  return plan.root().cost;
}

}  // namespace sliceplan
