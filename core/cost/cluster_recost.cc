#include "core/cost/cluster_recost.h"

#include <algorithm>

#include "absl/strings/str_cat.h"
#include "core/model/value_range.h"

namespace sliceplan {

absl::StatusOr<std::vector<ClusterCosts>> RecostClusterPlan(const Query& query,
                                                            const Cardinality& card,
                                                            const ClusterParams& params,
                                                            const Plan& plan) {
  const auto offered = [](const auto& list, auto v) {
    return std::find(list.begin(), list.end(), v) != list.end();
  };
  std::vector<ClusterCosts> costs(plan.nodes.size());
  std::vector<double> rows(plan.nodes.size()), width(plan.nodes.size());
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    const PlanNode& node = plan.nodes[i];
    ForEachMember(node.relations, [&](RelationId r) { width[i] += query.relation(r).row_bytes; });
    if (node.left < 0) {
      if (!offered(params.sample_rates, node.sample_rate)) {
        return absl::InvalidArgumentError(
            absl::StrCat("node ", i, ": sample rate ", node.sample_rate, " is not offered"));
      }
      const double base = query.relation(Lowest(node.relations)).rows;
      rows[i] = IsSaturated(base) ? kValueCeiling : base * node.sample_rate;
      costs[i] = {0, 0, node.sample_rate};
      continue;
    }
    if (!offered(params.node_counts, node.nodes)) {
      return absl::InvalidArgumentError(
          absl::StrCat("node ", i, ": ", node.nodes, " nodes is not a count offered"));
    }
    const auto l = static_cast<size_t>(node.left), r = static_cast<size_t>(node.right);
    const double set_card = card.Of(node.relations);
    rows[i] = IsSaturated(set_card) ? kValueCeiling
                                    : set_card * (costs[l].completeness * costs[r].completeness);
    const bool left_leaf = plan.nodes[l].left < 0, right_leaf = plan.nodes[r].left < 0;
    const double t = StageSeconds(params, node.strategy, node.nodes, {rows[l], width[l], left_leaf},
                                  {rows[r], width[r], right_leaf}, rows[i]);
    costs[i] = JoinCosts(costs[l], costs[r], node.nodes, t);
  }
  return costs;
}

}  // namespace sliceplan
