// A plan node's figures on the wire, shared by the exact engine's Plan
// (wire/service_proto.h) and the plan of any size (wire/tier_proto.h): the
// operator (a cluster join's strategy), the cardinality, the cost map
// ({"cout": C} or the cluster model's three metrics), a cluster leaf's
// sample rate and a cluster join's node count. `Node` is PlanNode or
// WideNode, which name these fields alike. Replies are validated like
// requests: every error is INVALID_ARGUMENT naming the node (`at`).
#ifndef SLICEPLAN_WIRE_NODE_FIGURES_H_
#define SLICEPLAN_WIRE_NODE_FIGURES_H_

#include <string>

#include "absl/status/status.h"
#include "absl/strings/str_cat.h"
#include "core/model/cluster_costs.h"
#include "core/model/value_range.h"
#include "core/search_options.h"
#include "sliceplan.pb.h"

namespace sliceplan::wire_node {

template <typename Node>
v1::Operator OperatorOf(const Node& node, CostModelKind model) {
  if (node.is_leaf()) return v1::OPERATOR_SCAN;
  if (model != CostModelKind::kCluster) return v1::OPERATOR_JOIN;
  switch (node.strategy) {
    case JoinStrategy::kShuffle:
      return v1::OPERATOR_SHUFFLE;
    case JoinStrategy::kBroadcastRight:
      return v1::OPERATOR_BROADCAST_RIGHT;
    case JoinStrategy::kBroadcastLeft:
      return v1::OPERATOR_BROADCAST_LEFT;
  }
  return v1::OPERATOR_UNSPECIFIED;
}

// Everything of the node but its relation or children (the caller's).
template <typename Node>
void WriteFigures(const Node& node, CostModelKind model, v1::PlanNode& out) {
  const bool cluster = model == CostModelKind::kCluster;
  out.set_op(OperatorOf(node, model));
  if (cluster && node.is_leaf()) out.set_sample_rate(node.sample_rate);
  if (cluster && !node.is_leaf()) out.set_nodes(static_cast<uint32_t>(node.nodes));
  out.set_cardinality(node.cardinality);
  (*out.mutable_costs())[MetricName(model)] = node.cost;
  if (cluster) {
    (*out.mutable_costs())["node_seconds"] = node.metrics.node_seconds;
    (*out.mutable_costs())["completeness"] = node.metrics.completeness;
  }
}

// Sets node.strategy from the node's operator; an error when the operator
// does not fit the node (a scan for leaves, a join of the model).
template <typename Node>
absl::Status ReadOperator(const v1::PlanNode& in, const std::string& at, CostModelKind model,
                          Node& node) {
  if (in.kind_case() == v1::PlanNode::kJoin) {
    for (JoinStrategy st : kAllStrategies) {
      node.strategy = st;
      if (in.op() == OperatorOf(node, model)) return absl::OkStatus();
    }
  } else if (in.op() == v1::OPERATOR_SCAN) {
    return absl::OkStatus();
  }
  return absl::InvalidArgumentError(
      absl::StrCat(at, ".op: ", v1::Operator_Name(in.op()), " is not an operator of ",
                   in.kind_case() == v1::PlanNode::kJoin ? "a join" : "a leaf"));
}

// The cluster model's figures of a node besides its latency: node-seconds,
// completeness, a leaf's sample rate, a join's node count; an error when
// the costs lack node_seconds or completeness.
template <typename Node>
absl::Status ReadClusterFigures(const v1::PlanNode& in, const std::string& at, Node& node) {
  const auto ns = in.costs().find("node_seconds");
  const auto comp = in.costs().find("completeness");
  if (ns == in.costs().end() || comp == in.costs().end()) {
    return absl::InvalidArgumentError(
        absl::StrCat(at, ".costs: needs node_seconds and completeness"));
  }
  node.metrics.node_seconds = ns->second;
  node.metrics.completeness = comp->second;
  node.sample_rate = in.kind_case() == v1::PlanNode::kRelation ? in.sample_rate() : 1;
  node.nodes = static_cast<int>(in.nodes());
  return absl::OkStatus();
}

// The model's own cost entry into node.cost (and the cluster model's
// latency); an error when the entry is missing.
template <typename Node>
absl::Status ReadModelCost(const v1::PlanNode& in, const std::string& at, CostModelKind model,
                           Node& node) {
  const auto cost = in.costs().find(MetricName(model));
  if (cost == in.costs().end()) {
    return absl::InvalidArgumentError(
        absl::StrCat(at, ".costs: no \"", MetricName(model), "\" entry"));
  }
  node.cost = cost->second;
  if (model == CostModelKind::kCluster) node.metrics.latency_s = cost->second;
  return absl::OkStatus();
}

// A worker or coordinator that sends NaN or a negative cost must not
// decide anything: an error unless the cost, cardinality and node-seconds
// lie in [0, kValueCeiling] and the completeness in (0, 1].
template <typename Node>
absl::Status CheckFigures(const Node& node, const std::string& at) {
  for (const double v : {node.cost, node.cardinality, node.metrics.node_seconds}) {
    if (!(v >= 0 && v <= kValueCeiling)) {
      return absl::InvalidArgumentError(
          absl::StrCat(at, ": a cost or cardinality is not a number in [0, 1e300], got ", v));
    }
  }
  if (!(node.metrics.completeness > 0 && node.metrics.completeness <= 1)) {
    return absl::InvalidArgumentError(absl::StrCat(
        at, ".costs: completeness must lie in (0, 1], got ", node.metrics.completeness));
  }
  return absl::OkStatus();
}

// Every figure of node `in` after its relation or children are read:
// cardinality, the cluster figures, operator, cost, then the range check.
template <typename Node>
absl::Status ReadFigures(const v1::PlanNode& in, const std::string& at, CostModelKind model,
                         Node& node) {
  node.cardinality = in.cardinality();
  if (model == CostModelKind::kCluster) {
    if (auto s = ReadClusterFigures(in, at, node); !s.ok()) return s;
  }
  if (auto s = ReadOperator(in, at, model, node); !s.ok()) return s;
  if (auto s = ReadModelCost(in, at, model, node); !s.ok()) return s;
  return CheckFigures(node, at);
}

}  // namespace sliceplan::wire_node

#endif  // SLICEPLAN_WIRE_NODE_FIGURES_H_
