#include "core/constraint_choice.h"

#include <algorithm>
#include <limits>
#include <map>
#include <queue>

namespace sliceplan {
namespace {

using Adjacency = std::vector<RelSet>;

// Two relations are adjacent when some predicate names both.
Adjacency BuildAdjacency(const Query& query) {
  Adjacency adj(query.size(), 0);
  for (const Predicate& p : query.predicates()) {
    ForEachMember(p.relations, [&](RelationId r) {
      adj[r.value] |= p.relations & ~Singleton(r);
    });
  }
  return adj;
}

std::vector<int> Distances(const Adjacency& adj, int from) {
  std::vector<int> dist(adj.size(), std::numeric_limits<int>::max());
  std::queue<int> todo;
  dist[from] = 0;
  todo.push(from);
  while (!todo.empty()) {
    const int v = todo.front();
    todo.pop();
    ForEachMember(adj[v], [&](RelationId w) {
      if (dist[w.value] == std::numeric_limits<int>::max()) {
        dist[w.value] = dist[v] + 1;
        todo.push(w.value);
      }
    });
  }
  return dist;
}

std::vector<int> Refine(const Adjacency& adj, const std::vector<int>& colour) {
  std::map<std::vector<int>, int> rank;
  std::vector<std::vector<int>> signature(adj.size());
  for (size_t v = 0; v < adj.size(); ++v) {
    signature[v].push_back(colour[v]);
    std::vector<int> around;
    ForEachMember(adj[v], [&](RelationId w) { around.push_back(colour[w.value]); });
    std::sort(around.begin(), around.end());
    signature[v].insert(signature[v].end(), around.begin(), around.end());
    rank.emplace(signature[v], 0);
  }
  int next = 0;
  for (auto& [sig, r] : rank) r = next++;
  std::vector<int> out(adj.size());
  for (size_t v = 0; v < adj.size(); ++v) out[v] = rank[signature[v]];
  return out;
}

// Relations grouped by colour, each group in id order, groups by colour.
std::vector<std::vector<int>> ColourClasses(const std::vector<int>& colour) {
  const int classes = *std::max_element(colour.begin(), colour.end()) + 1;
  std::vector<std::vector<int>> out(classes);
  for (size_t v = 0; v < colour.size(); ++v) {
    out[colour[v]].push_back(static_cast<int>(v));
  }
  return out;
}

RelationId Id(int v) { return RelationId{static_cast<uint8_t>(v)}; }

// Pairs inside each colour class first, then the leftovers in colour order.
std::vector<ConstraintRelations> ChoosePairs(const std::vector<int>& colour,
                                             int k) {
  std::vector<ConstraintRelations> out;
  std::vector<int> leftover;
  for (const std::vector<int>& cls : ColourClasses(colour)) {
    size_t i = 0;
    for (; i + 1 < cls.size(); i += 2) {
      out.push_back({{Id(cls[i]), Id(cls[i + 1]), Id(0)}, 2});
    }
    if (i < cls.size()) leftover.push_back(cls[i]);
  }
  for (size_t i = 0; i + 1 < leftover.size(); i += 2) {
    out.push_back({{Id(leftover[i]), Id(leftover[i + 1]), Id(0)}, 2});
  }
  out.resize(k);
  return out;
}

// Greedy: a same-colour pair {t, u} and the nearest unused anchor r that is
// as far from t as from u; without such a pair, the lowest unused ids.
std::vector<ConstraintRelations> ChooseTriples(const Query& query,
                                               const Adjacency& adj,
                                               const std::vector<int>& colour,
                                               int k) {
  const int n = query.size();
  std::vector<std::vector<int>> dist;
  for (int v = 0; v < n; ++v) dist.push_back(Distances(adj, v));
  RelSet used = 0;
  std::vector<ConstraintRelations> out;
  const auto free = [&](int v) { return !Contains(used, Id(v)); };
  while (static_cast<int>(out.size()) < k) {
    int best_t = -1, best_u = -1, best_r = -1;
    for (int t = 0; t < n && best_r < 0; ++t) {
      for (int u = t + 1; u < n && best_r < 0; ++u) {
        if (!free(t) || !free(u) || colour[t] != colour[u]) continue;
        for (int r = 0; r < n; ++r) {
          if (!free(r) || r == t || r == u || dist[r][t] != dist[r][u]) continue;
          if (best_r < 0 || dist[r][t] < dist[best_r][t]) best_r = r;
        }
        if (best_r >= 0) best_t = t, best_u = u;
      }
    }
    if (best_r < 0) {  // no symmetric triple left: take the lowest ids
      std::vector<int> pick;
      for (int v = 0; v < n && pick.size() < 3; ++v) {
        if (free(v)) pick.push_back(v);
      }
      best_r = pick[0], best_t = pick[1], best_u = pick[2];
    }
    out.push_back({{Id(best_r), Id(best_t), Id(best_u)}, 3});
    used |= Singleton(Id(best_r)) | Singleton(Id(best_t)) | Singleton(Id(best_u));
  }
  return out;
}

}  // namespace

std::vector<int> RefinedColours(const Query& query) {
  const Adjacency adj = BuildAdjacency(query);
  std::vector<int> colour(adj.size());
  for (size_t v = 0; v < adj.size(); ++v) colour[v] = Size(adj[v]);
  colour = Refine(adj, colour);
  // Colour refinement stabilises within n rounds; stop at the fixpoint.
  for (size_t round = 0; round < adj.size(); ++round) {
    // Refinement only splits classes, so an equal class count is the fixpoint.
    std::vector<int> next = Refine(adj, colour);
    const bool stable = *std::max_element(next.begin(), next.end()) ==
                        *std::max_element(colour.begin(), colour.end());
    colour = std::move(next);
    if (stable) break;
  }
  return colour;
}

std::vector<ConstraintRelations> ChooseConstraintRelations(const Query& query,
                                                           PlanShape shape,
                                                           int k) {
  if (k == 0) return {};
  const std::vector<int> colour = RefinedColours(query);
  if (shape == PlanShape::kLeftDeep) return ChoosePairs(colour, k);
  return ChooseTriples(query, BuildAdjacency(query), colour, k);
}

}  // namespace sliceplan
