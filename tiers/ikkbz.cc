#include "tiers/ikkbz.h"

#include <algorithm>
#include <numeric>
#include <utility>

#include "core/cost/cout_model.h"
#include "core/model/value_range.h"

namespace sliceplan {
namespace {

// A run of relations that IKKBZ keeps together, with its T and C.
struct Module {
  double t;
  double c;
  std::vector<int32_t> relations;
  double rank() const { return (t - 1) / c; }
};

// Chains are stored reversed: the back is the first module of the
// sequence, so ranks descend from the front of the vector to its back.
using Chain = std::vector<Module>;

Chain MergeChains(Chain a, Chain b) {
  if (a.empty()) return b;
  if (b.empty()) return a;
  Chain out;
  out.reserve(a.size() + b.size());
  std::merge(std::make_move_iterator(a.begin()), std::make_move_iterator(a.end()),
             std::make_move_iterator(b.begin()), std::make_move_iterator(b.end()),
             std::back_inserter(out),
             [](const Module& x, const Module& y) { return x.rank() > y.rank(); });
  return out;
}

// Puts `head` in front of `chain` and fuses it with its successors while
// its rank is higher than theirs.
void Prepend(Chain& chain, Module head) {
  while (!chain.empty() && head.rank() > chain.back().rank()) {
    Module& next = chain.back();
    head.c = Saturate(head.c + head.t * next.c);
    head.t = Saturate(head.t * next.t);
    head.relations.insert(head.relations.end(), next.relations.begin(), next.relations.end());
    chain.pop_back();
  }
  chain.push_back(std::move(head));
}

int32_t FindRoot(std::vector<int32_t>& parent, int32_t r) {
  while (parent[r] != r) r = parent[r] = parent[parent[r]];
  return r;
}

}  // namespace

std::vector<TreeEdge> SpanningTree(const WideQuery& query) {
  // Binary predicates first: an edge taken from a hyperedge joins its two
  // relations only together with the rest of the hyperedge, so it is used
  // only where no binary predicate connects.
  std::vector<TreeEdge> edges, from_hyperedges;
  for (const WidePredicate& p : query.predicates()) {
    for (size_t i = 1; i < p.relations.size(); ++i) {
      (p.relations.size() == 2 ? edges : from_hyperedges)
          .push_back({p.relations[0], p.relations[i], p.selectivity});
    }
  }
  const auto by_selectivity = [](const TreeEdge& x, const TreeEdge& y) {
    return x.selectivity < y.selectivity;
  };
  std::stable_sort(edges.begin(), edges.end(), by_selectivity);
  std::stable_sort(from_hyperedges.begin(), from_hyperedges.end(), by_selectivity);
  edges.insert(edges.end(), from_hyperedges.begin(), from_hyperedges.end());
  std::vector<int32_t> parent(query.size());
  std::iota(parent.begin(), parent.end(), 0);
  std::vector<TreeEdge> tree;
  for (const TreeEdge& e : edges) {
    const int32_t a = FindRoot(parent, e.a), b = FindRoot(parent, e.b);
    if (a == b) continue;
    parent[a] = b;
    tree.push_back(e);
  }
  // Disconnected parts: tied by cross products (selectivity 1).
  int32_t last = -1;
  for (int32_t r = 0; r < query.size(); ++r) {
    if (FindRoot(parent, r) != r) continue;
    if (last >= 0) {
      tree.push_back({last, r, 1.0});
      parent[FindRoot(parent, last)] = r;
    }
    last = r;
  }
  return tree;
}

std::vector<int32_t> IkkbzOrderFrom(const WideQuery& query, const std::vector<TreeEdge>& tree,
                                    int32_t root) {
  const int n = query.size();
  std::vector<std::vector<std::pair<int32_t, double>>> adjacent(n);
  for (const TreeEdge& e : tree) {
    adjacent[e.a].push_back({e.b, e.selectivity});
    adjacent[e.b].push_back({e.a, e.selectivity});
  }
  // Breadth-first from the root: parents come before children.
  std::vector<int32_t> order{root}, parent(n, -1);
  std::vector<double> up_selectivity(n, 1);
  parent[root] = root;
  for (size_t i = 0; i < order.size(); ++i) {
    for (const auto& [x, sel] : adjacent[order[i]]) {
      if (parent[x] >= 0) continue;
      parent[x] = order[i];
      up_selectivity[x] = sel;
      order.push_back(x);
    }
  }
  std::vector<Chain> chain(n);
  for (size_t i = order.size(); i-- > 1;) {
    const int32_t v = order[i];
    const double t = Saturate(up_selectivity[v] * query.relation(v).rows);
    Prepend(chain[v], Module{t, t, {v}});
    chain[parent[v]] = MergeChains(std::move(chain[parent[v]]), std::move(chain[v]));
  }
  std::vector<int32_t> out{root};
  out.reserve(n);
  for (auto it = chain[root].rbegin(); it != chain[root].rend(); ++it) {
    out.insert(out.end(), it->relations.begin(), it->relations.end());
  }
  return out;
}

double LeftDeepCout(const WideQuery& query, const std::vector<int32_t>& order) {
  const int n = query.size();
  std::vector<int32_t> position(n);
  for (int i = 0; i < n; ++i) position[order[i]] = i;
  // Each predicate applies at the position of its last relation.
  std::vector<double> factor(n, 1);
  for (const WidePredicate& p : query.predicates()) {
    int32_t last = 0;
    for (const int32_t r : p.relations) last = std::max(last, position[r]);
    factor[last] *= p.selectivity;
  }
  double card = query.relation(order[0]).rows * factor[0];
  double cost = 0;
  for (int i = 1; i < n; ++i) {
    card = Saturate(card * query.relation(order[i]).rows * factor[i]);
    cost = CoutJoin(card, cost, 0);
  }
  return cost;
}

std::vector<int32_t> IkkbzOrder(const WideQuery& query, int max_roots) {
  const std::vector<TreeEdge> tree = SpanningTree(query);
  std::vector<int32_t> roots(query.size());
  std::iota(roots.begin(), roots.end(), 0);
  if (query.size() > max_roots) {
    std::partial_sort(
        roots.begin(), roots.begin() + max_roots, roots.end(),
        [&](int32_t x, int32_t y) { return query.relation(x).rows < query.relation(y).rows; });
    roots.resize(max_roots);
  }
  std::vector<int32_t> best;
  double best_cost = 0;
  for (const int32_t root : roots) {
    std::vector<int32_t> order = IkkbzOrderFrom(query, tree, root);
    const double cost = LeftDeepCout(query, order);
    if (best.empty() || cost < best_cost) {
      best_cost = cost;
      best = std::move(order);
    }
  }
  return best;
}

}  // namespace sliceplan
