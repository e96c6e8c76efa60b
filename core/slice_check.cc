#include "core/slice_check.h"

#include <cmath>
#include <optional>
#include <string>

#include "absl/strings/str_cat.h"
#include "core/cost/cluster_recost.h"
#include "core/cost/cout_model.h"
#include "core/graph/join_conflicts.h"
#include "core/model/cardinality.h"
#include "core/model/status_macros.h"
#include "core/slicing/constraint_choice.h"
#include "core/slicing/slice_constraints.h"

namespace sliceplan {
namespace {

absl::Status Fault(const std::string& what) {
  return absl::DataLossError(absl::StrCat("the slice's answer failed the check: ", what));
}

bool Near(double got, double want) {
  if (got == want) return true;  // saturated values included
  return std::fabs(got - want) <= kCheckTolerance * std::fmax(std::fabs(got), std::fabs(want));
}

// The tree's shape: leaves name each relation once, a join's set is the
// disjoint union of its children's, children come first, the root is last
// and holds every relation.
absl::Status CheckTree(const Query& query, const Plan& plan) {
  if (plan.nodes.empty()) return Fault("a plan with no nodes");
  RelSet leaves = 0;
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    const PlanNode& node = plan.nodes[i];
    if (node.left < 0 || node.right < 0) {
      if (node.left >= 0 || node.right >= 0 || Size(node.relations) != 1 ||
          (node.relations & ~query.all()) != 0 || (leaves & node.relations) != 0) {
        return Fault(absl::StrCat("node ", i, " is no leaf of a relation named once"));
      }
      leaves |= node.relations;
      continue;
    }
    if (static_cast<size_t>(node.left) >= i || static_cast<size_t>(node.right) >= i) {
      return Fault(absl::StrCat("node ", i, " has a child that does not come before it"));
    }
    const RelSet l = plan.nodes[node.left].relations, r = plan.nodes[node.right].relations;
    if ((l & r) != 0 || (l | r) != node.relations) {
      return Fault(absl::StrCat("node ", i, " is not the disjoint union of its children"));
    }
  }
  if (leaves != query.all() || plan.root().relations != query.all()) {
    return Fault("the plan does not join every relation exactly once");
  }
  return absl::OkStatus();
}

// Shape, cross products and the slice's constraints.
absl::Status CheckSpace(const Query& query, const SearchOptions& options,
                        const SliceConstraints& constraints, const Cardinality& card,
                        const JoinConflicts* conflicts, const Plan& plan) {
  if (options.shape == PlanShape::kLeftDeep && !IsLeftDeep(plan)) {
    return Fault("a bushy plan where left-deep plans were asked for");
  }
  // A bushy plan lies in the slice when every node set is admitted; a
  // left-deep one when every prefix is (its right operands are single
  // relations, no prefix except the first).
  const bool left_deep = options.shape == PlanShape::kLeftDeep;
  size_t first = plan.nodes.size() - 1;  // the leftmost leaf: the first prefix
  while (plan.nodes[first].left >= 0) first = static_cast<size_t>(plan.nodes[first].left);
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    const PlanNode& node = plan.nodes[i];
    const bool prefix_leaf = left_deep && node.left < 0 && i == first;
    if ((!left_deep || node.left >= 0 || prefix_leaf) && !constraints.Admissible(node.relations)) {
      return Fault(absl::StrCat("node ", i, " lies outside the slice"));
    }
    if (node.left < 0) continue;
    const RelSet l = plan.nodes[node.left].relations, r = plan.nodes[node.right].relations;
    if (conflicts != nullptr) {
      const JoinFit fit = conflicts->Fit(l, r, options.cross_products);
      if (!fit.forward || fit.type != node.type) {
        return Fault(absl::StrCat("node ", i, " is no ", JoinTypeName(node.type),
                                  " join the original tree allows there"));
      }
      continue;
    }
    if (node.type != JoinType::kInner) {
      return Fault(absl::StrCat("node ", i, " is a ", JoinTypeName(node.type),
                                " join; the query has inner joins only"));
    }
    if (!options.cross_products && !card.Connects(l, r)) {
      return Fault(absl::StrCat("node ", i, " is a cross product, and they were excluded"));
    }
  }
  (void)query;
  return absl::OkStatus();
}

// Every node's cardinality and C_out recomputed.
absl::Status CheckCout(const Cardinality& card, const Plan& plan) {
  std::vector<double> cost(plan.nodes.size(), 0);
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    const PlanNode& node = plan.nodes[i];
    const double rows = card.Of(node.relations);
    if (node.left >= 0) cost[i] = CoutJoin(rows, cost[node.left], cost[node.right]);
    if (!Near(node.cardinality, rows) || !Near(node.cost, cost[i])) {
      return Fault(absl::StrCat("node ", i, " says cardinality ", node.cardinality, " and cost ",
                                node.cost, "; the query gives ", rows, " and ", cost[i]));
    }
  }
  return absl::OkStatus();
}

// Every node's three cluster metrics recomputed from its physical choices.
absl::Status CheckCluster(const Query& query, const Cardinality& card, const ClusterParams& params,
                          const Plan& plan) {
  auto costs = RecostClusterPlan(query, card, params, plan);
  if (!costs.ok()) return Fault(std::string(costs.status().message()));
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    const ClusterCosts& sent = plan.nodes[i].metrics;
    const ClusterCosts& want = (*costs)[i];
    if (!Near(sent.latency_s, want.latency_s) || !Near(sent.node_seconds, want.node_seconds) ||
        !Near(sent.completeness, want.completeness)) {
      return Fault(absl::StrCat("node ", i, " says latency_s ", sent.latency_s, ", node_seconds ",
                                sent.node_seconds, ", completeness ", sent.completeness,
                                "; its physical choices give ", want.latency_s, ", ",
                                want.node_seconds, ", ", want.completeness));
    }
  }
  return absl::OkStatus();
}

}  // namespace

absl::Status CheckSliceResult(const Query& query, const SearchOptions& options,
                              const SliceResult& result) {
  if (!ValidateSlice(result.slice, query.size(), options.shape).ok()) {
    return Fault("an answer for no slice of this query");
  }
  return CheckSliceResult(
      query, options, result,
      ChooseConstraintRelations(query, options.shape, result.slice.bits(), options.cross_products));
}

absl::Status CheckSliceResult(const Query& query, const SearchOptions& options,
                              const SliceResult& result,
                              const std::vector<ConstraintRelations>& chosen) {
  if (!result.plan) {
    // With non-inner joins a slice (or the left-deep space) may hold no
    // valid plan even with cross products.
    if (options.cross_products && !query.has_joins()) {
      return Fault("no plan, though every slice of the space with cross products holds one");
    }
    return absl::OkStatus();
  }
  if (!ValidateSlice(result.slice, query.size(), options.shape).ok() ||
      static_cast<int>(chosen.size()) != result.slice.bits()) {
    return Fault("an answer for no slice of this query and slice count");
  }
  const SliceConstraints constraints =
      SliceConstraints::FromRelations(options.shape, result.slice, chosen);
  const Cardinality card(query);
  std::optional<JoinConflicts> conflicts;
  if (query.has_joins()) conflicts.emplace(query);
  const auto check = [&](const Plan& plan) -> absl::Status {
    RETURN_IF_ERROR(CheckTree(query, plan));
    RETURN_IF_ERROR(
        CheckSpace(query, options, constraints, card, conflicts ? &*conflicts : nullptr, plan));
    if (options.cost == CostModelKind::kCout) RETURN_IF_ERROR(CheckCout(card, plan));
    if (options.cost == CostModelKind::kCluster) {
      RETURN_IF_ERROR(CheckCluster(query, card, options.cluster.params, plan));
    }
    return absl::OkStatus();
  };
  RETURN_IF_ERROR(check(*result.plan));
  for (const Plan& plan : result.frontier) RETURN_IF_ERROR(check(plan));
  return absl::OkStatus();
}

}  // namespace sliceplan
