#include "tests/support/reference_search.h"

#include <algorithm>
#include <limits>
#include <map>
#include <numeric>

namespace sliceplan::testing {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();

bool Has(RelSet s, int i) { return (s >> i) & 1; }

// Every tree's cout over `s`, listed, for the trees allowed.
class TreeCosts {
 public:
  TreeCosts(const Query& q, bool cross) : q_(q), cross_(cross) {}

  const std::vector<double>& Of(RelSet s) {
    auto it = memo_.find(s);
    if (it != memo_.end()) return it->second;
    std::vector<double> all;
    if ((s & (s - 1)) == 0) {
      all.push_back(0.0);
    } else {
      const RelSet first = s & (~s + 1);
      const double card = RefCard(q_, s);
      for (RelSet l = (s - 1) & s; l != 0; l = (l - 1) & s) {
        if ((l & first) == 0) continue;  // each unordered split once
        const RelSet r = s & ~l;
        if (!cross_ && !RefJoinable(q_, l, r)) continue;
        const std::vector<double>& left = Of(l);  // std::map: stable refs
        const std::vector<double>& right = Of(r);
        for (double a : left)
          for (double b : right) all.push_back(card + a + b);
      }
    }
    return memo_.emplace(s, std::move(all)).first->second;
  }

 private:
  const Query& q_;
  bool cross_;
  std::map<RelSet, std::vector<double>> memo_;
};

void Trees(RelSet s, std::map<RelSet, std::vector<std::vector<RelSet>>>& memo) {
  if (memo.count(s)) return;
  std::vector<std::vector<RelSet>> out;
  if ((s & (s - 1)) == 0) {
    out.push_back({s});
  } else {
    const RelSet first = s & (~s + 1);
    for (RelSet l = (s - 1) & s; l != 0; l = (l - 1) & s) {
      if ((l & first) == 0) continue;
      const RelSet r = s & ~l;
      Trees(l, memo);
      Trees(r, memo);
      for (const auto& a : memo[l]) {
        for (const auto& b : memo[r]) {
          std::vector<RelSet> nodes = a;
          nodes.insert(nodes.end(), b.begin(), b.end());
          nodes.push_back(s);
          out.push_back(std::move(nodes));
        }
      }
    }
  }
  memo[s] = std::move(out);
}

}  // namespace

double RefCard(const Query& query, RelSet x) {
  double card = 1;
  for (int i = 0; i < query.size(); ++i) {
    if (Has(x, i)) card *= query.relations()[i].rows;
  }
  for (const Predicate& p : query.predicates()) {
    if ((p.relations | x) == x) card *= p.selectivity;
  }
  return card;
}

bool RefJoinable(const Query& query, RelSet left, RelSet right) {
  for (const Predicate& p : query.predicates()) {
    if ((p.relations | left | right) == (left | right) && (p.relations & left) &&
        (p.relations & right)) {
      return true;
    }
  }
  return false;
}

double RefBestBushy(const Query& query, bool cross_products) {
  TreeCosts costs(query, cross_products);
  const std::vector<double>& all = costs.Of(query.all());
  return all.empty() ? kInf : *std::min_element(all.begin(), all.end());
}

double RefBestLeftDeep(const Query& query, bool cross_products) {
  std::vector<int> order(query.size());
  std::iota(order.begin(), order.end(), 0);
  double best = kInf;
  do {
    RelSet prefix = RelSet{1} << order[0];
    double cost = 0;
    bool ok = true;
    for (size_t i = 1; i < order.size() && ok; ++i) {
      const RelSet next = RelSet{1} << order[i];
      ok = cross_products || RefJoinable(query, prefix, next);
      prefix |= next;
      cost += RefCard(query, prefix);
    }
    if (ok) best = std::min(best, cost);
  } while (std::next_permutation(order.begin(), order.end()));
  return best;
}

void ForEachBushyTree(const Query& query,
                      const std::function<void(const std::vector<RelSet>&)>& fn) {
  std::map<RelSet, std::vector<std::vector<RelSet>>> memo;
  Trees(query.all(), memo);
  for (const auto& tree : memo[query.all()]) fn(tree);
}

double RefCoutOf(const Query& query, const Plan& plan) {
  double total = 0;
  for (const PlanNode& node : plan.nodes) {
    if (!node.is_leaf()) total += RefCard(query, node.relations);
  }
  return total;
}

bool RefFreeOfCrossProducts(const Query& query, const Plan& plan) {
  for (const PlanNode& node : plan.nodes) {
    if (node.is_leaf()) continue;
    if (!RefJoinable(query, plan.nodes[node.left].relations, plan.nodes[node.right].relations)) {
      return false;
    }
  }
  return true;
}

bool RefCoversQuery(const Query& query, const Plan& plan) {
  RelSet leaves = 0;
  int count = 0;
  for (const PlanNode& node : plan.nodes) {
    if (!node.is_leaf()) {
      const RelSet l = plan.nodes[node.left].relations;
      const RelSet r = plan.nodes[node.right].relations;
      if ((l & r) != 0 || (l | r) != node.relations) return false;
      continue;
    }
    if ((node.relations & (node.relations - 1)) != 0) return false;
    leaves |= node.relations;
    ++count;
  }
  return leaves == query.all() && count == query.size() && plan.root().relations == query.all();
}

}  // namespace sliceplan::testing
