#include "core/model/plan.h"

namespace sliceplan {
namespace {

int Build(RelSet set, absl::FunctionRef<RelSet(RelSet)> left_of, const Cardinality& card,
          Plan& plan) {
  PlanNode node;
  node.relations = set;
  node.cardinality = card.Of(set);
  if (Size(set) > 1) {
    const RelSet left = left_of(set);
    node.left = Build(left, left_of, card, plan);
    node.right = Build(set & ~left, left_of, card, plan);
  }
  plan.nodes.push_back(node);
  return static_cast<int>(plan.nodes.size()) - 1;
}

void AppendTree(const Plan& plan, int i, const Query& query, std::string& out) {
  const PlanNode& node = plan.nodes[i];
  if (node.is_leaf()) {
    out += query.relation(Lowest(node.relations)).name;
    return;
  }
  out += '(';
  AppendTree(plan, node.left, query, out);
  out += ' ';
  if (node.type != JoinType::kInner) {
    out += JoinTypeKeyword(node.type);
    out += ' ';
  }
  AppendTree(plan, node.right, query, out);
  out += ')';
}

}  // namespace

Plan BuildPlan(RelSet root, absl::FunctionRef<RelSet(RelSet)> left_of, const Cardinality& card) {
  Plan plan;
  Build(root, left_of, card, plan);
  return plan;
}

void RenumberPlan(Plan& plan, std::span<const RelationId> perm) {
  for (PlanNode& node : plan.nodes) {
    node.relations = PermuteSet(node.relations, perm);
  }
}

std::string TreeString(const Plan& plan, const Query& query) {
  std::string out;
  AppendTree(plan, static_cast<int>(plan.nodes.size()) - 1, query, out);
  return out;
}

bool IsLeftDeep(const Plan& plan) {
  for (const PlanNode& node : plan.nodes) {
    if (!node.is_leaf() && !plan.nodes[node.right].is_leaf()) return false;
  }
  return true;
}

}  // namespace sliceplan
