#include "tiers/wide_plan.h"

#include <utility>

#include "absl/strings/str_cat.h"
#include "core/cost/cout_model.h"
#include "core/model/cardinality.h"
#include "tiers/join_forest.h"

namespace sliceplan {

int32_t AddLeaf(WidePlan& plan, int32_t relation) {
  plan.nodes.push_back({relation, -1, -1, 0, 0});
  return static_cast<int32_t>(plan.nodes.size()) - 1;
}

int32_t AddJoin(WidePlan& plan, int32_t left, int32_t right) {
  plan.nodes.push_back({-1, left, right, 0, 0});
  return static_cast<int32_t>(plan.nodes.size()) - 1;
}

absl::Status CheckWidePlan(const WidePlan& plan, int n, bool left_deep) {
  if (plan.nodes.size() != static_cast<size_t>(2 * n - 1)) {
    return absl::InternalError(
        absl::StrCat("plan has ", plan.nodes.size(), " nodes; ", n, " relations need ", 2 * n - 1));
  }
  std::vector<uint8_t> seen(n, 0);
  std::vector<uint8_t> used(plan.nodes.size(), 0);
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    const WideNode& node = plan.nodes[i];
    if (node.is_leaf()) {
      if (node.right >= 0 || node.relation < 0 || node.relation >= n || seen[node.relation]) {
        return absl::InternalError(absl::StrCat("plan node ", i, ": bad or repeated leaf"));
      }
      seen[node.relation] = 1;
      continue;
    }
    for (const int32_t child : {node.left, node.right}) {
      if (child < 0 || static_cast<size_t>(child) >= i || used[child]) {
        return absl::InternalError(absl::StrCat("plan node ", i, ": bad child ", child));
      }
      used[child] = 1;
    }
    if (left_deep && !plan.nodes[node.right].is_leaf()) {
      return absl::InternalError(absl::StrCat("plan node ", i, ": not left-deep"));
    }
  }
  return absl::OkStatus();
}

namespace {

// CostWidePlan on the engine's listed estimates: each node's set as a
// mask (listed estimates come with 64 relations at most) and its
// cardinality by the exact engine's rule (core/model/cardinality.h).
double CostWithListed(WidePlan& plan, const WideQuery& query) {
  const Query exact = *ToExactQuery(query);
  const Cardinality card(exact);
  const std::vector<RelSet> sets = WideNodeSets(plan);
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    WideNode& node = plan.nodes[i];
    node.cardinality = card.Of(sets[i]);
    node.cost = node.is_leaf() ? 0
                               : CoutJoin(node.cardinality, plan.nodes[node.left].cost,
                                          plan.nodes[node.right].cost);
  }
  return plan.cost();
}

}  // namespace

std::vector<RelSet> WideNodeSets(const WidePlan& plan) {
  std::vector<RelSet> sets(plan.nodes.size());
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    const WideNode& node = plan.nodes[i];
    sets[i] = node.is_leaf() ? Singleton(RelationId{static_cast<uint8_t>(node.relation)})
                             : sets[node.left] | sets[node.right];
  }
  return sets;
}

double CostWidePlan(WidePlan& plan, const WideQuery& query) {
  if (query.listed() != nullptr || !query.joins().empty()) return CostWithListed(plan, query);
  JoinForest forest(query);
  std::vector<int32_t> component(plan.nodes.size());
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    WideNode& node = plan.nodes[i];
    if (node.is_leaf()) {
      component[i] = node.relation;
      node.cardinality = query.relation(node.relation).rows;
      node.cost = 0;
      continue;
    }
    component[i] = forest.Merge(component[node.left], component[node.right]);
    node.cardinality = forest.Card(component[i]);
    node.cost = CoutJoin(node.cardinality, plan.nodes[node.left].cost, plan.nodes[node.right].cost);
  }
  return plan.cost();
}

bool HasCrossProduct(const WidePlan& plan, const WideQuery& query) {
  // A join connects its inputs when some predicate lies within their union
  // and names relations of both (Cardinality::Connects).
  JoinForest forest(query);
  std::vector<int32_t> component(plan.nodes.size());
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    const WideNode& node = plan.nodes[i];
    if (node.is_leaf()) {
      component[i] = node.relation;
      continue;
    }
    const int32_t a = component[node.left];
    const int32_t b = component[node.right];
    if (node.type != JoinType::kInner) {  // its own predicate joins it
      component[i] = forest.Merge(a, b);
      continue;
    }
    const int32_t small = forest.Members(a) <= forest.Members(b) ? node.left : node.right;
    const int32_t other = small == node.left ? b : a;
    // Some relation of the smaller input has a predicate into the other.
    bool connected = false;
    std::vector<int32_t> stack{small};
    while (!stack.empty() && !connected) {
      const WideNode& n = plan.nodes[stack.back()];
      stack.pop_back();
      if (!n.is_leaf()) {
        stack.push_back(n.left);
        stack.push_back(n.right);
        continue;
      }
      for (const int32_t p : query.incident(n.relation)) {
        bool inside = true, reaches = false;
        for (const int32_t r : query.predicates()[p].relations) {
          const int32_t c = forest.Find(r);
          reaches |= c == other;
          inside &= c == other || c == component[small];
        }
        connected |= inside && reaches;
      }
    }
    if (!connected) return true;
    component[i] = forest.Merge(a, b);
  }
  return false;
}

std::string WideTreeString(const WidePlan& plan, const WideQuery& query) {
  return WriteTree(
      plan,
      [&](const WideNode& leaf, std::string& out) { out += query.relation(leaf.relation).name; },
      [](const WideNode& join, std::string& out) {
        out += ' ';
        if (join.type != JoinType::kInner) absl::StrAppend(&out, JoinTypeKeyword(join.type), " ");
      });
}

std::string WriteTree(const WidePlan& plan,
                      absl::FunctionRef<void(const WideNode&, std::string&)> leaf,
                      absl::FunctionRef<void(const WideNode&, std::string&)> between) {
  std::string out;
  // (node, state): 0 = not yet opened, 1 = between children, 2 = after.
  std::vector<std::pair<int32_t, int>> stack{{static_cast<int32_t>(plan.nodes.size()) - 1, 0}};
  while (!stack.empty()) {
    auto& [i, state] = stack.back();
    const WideNode& node = plan.nodes[i];
    if (node.is_leaf()) {
      leaf(node, out);
      stack.pop_back();
      continue;
    }
    if (state == 0) {
      out += '(';
      state = 1;
      stack.push_back({node.left, 0});
    } else if (state == 1) {
      between(node, out);
      state = 2;
      stack.push_back({node.right, 0});
    } else {
      out += ')';
      stack.pop_back();
    }
  }
  return out;
}

namespace {

// The figures PlanNode and WideNode name alike: children, cardinality,
// cost, join type, the cluster model's choices and metrics.
template <typename From, typename To>
void CopyFigures(const From& from, To& to) {
  to.left = from.left;
  to.right = from.right;
  to.cardinality = from.cardinality;
  to.cost = from.cost;
  to.type = from.type;
  to.strategy = from.strategy;
  to.nodes = from.nodes;
  to.sample_rate = from.sample_rate;
  to.metrics = from.metrics;
}

}  // namespace

WidePlan FromExactPlan(const Plan& plan) {
  WidePlan out;
  out.nodes.reserve(plan.nodes.size());
  for (const PlanNode& n : plan.nodes) {
    WideNode w;
    if (n.is_leaf()) w.relation = Lowest(n.relations).value;
    CopyFigures(n, w);
    out.nodes.push_back(w);
  }
  return out;
}

Plan ToExactPlan(const WidePlan& plan) {
  const std::vector<RelSet> sets = WideNodeSets(plan);
  Plan out;
  out.nodes.reserve(plan.nodes.size());
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    PlanNode n;
    n.relations = sets[i];
    CopyFigures(plan.nodes[i], n);
    out.nodes.push_back(n);
  }
  return out;
}

}  // namespace sliceplan
