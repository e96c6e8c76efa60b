#include "core/slicing/constraint_choice.h"

#include <algorithm>
#include <array>
#include <bit>
#include <map>

#include "core/graph/connected_sets.h"

namespace sliceplan {
namespace {

// Connected sets sampled to score candidate constraints (the first ones
// DPccp finds, so the whole set for graphs up to this size).
constexpr uint64_t kSampleSets = 4096;

using Adjacency = std::vector<RelSet>;

// Two relations are adjacent when some predicate names both.
Adjacency BuildAdjacency(const Query& query) {
  Adjacency adj(query.size(), 0);
  for (const Predicate& p : query.predicates()) {
    ForEachMember(p.relations, [&](RelationId r) { adj[r.value] |= p.relations & ~Singleton(r); });
  }
  return adj;
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

RelationId Id(int v) { return RelationId{static_cast<uint8_t>(v)}; }

// Which sampled connected sets hold each relation: bit i of member[v] is
// set when sample set i holds v.
class Membership {
 public:
  Membership(const std::vector<RelSet>& sample, int n)
      : words_((sample.size() + 63) / 64), bits_(n * words_, 0) {
    for (size_t i = 0; i < sample.size(); ++i) {
      ForEachMember(sample[i], [&](RelationId r) {
        bits_[r.value * words_ + i / 64] |= uint64_t{1} << (i % 64);
      });
    }
  }
  // Sample sets holding all of `with` (one or two ids) and not `without`.
  uint64_t Count(int with_a, int with_b, int without) const {
    const uint64_t* a = &bits_[with_a * words_];
    const uint64_t* b = &bits_[with_b * words_];
    const uint64_t* c = &bits_[without * words_];
    uint64_t count = 0;
    for (size_t w = 0; w < words_; ++w) count += std::popcount(a[w] & b[w] & ~c[w]);
    return count;
  }

 private:
  size_t words_;
  std::vector<uint64_t> bits_;
};

// Ranks candidates: most sets forbidden on the weaker side first (that
// both shrinks and balances the two halves), then a pair of equal colours
// (a likely symmetry), then the lowest ids.
struct Candidate {
  uint64_t score = 0;
  bool same_colour = false;
  std::array<int, 3> ids{};
  bool BetterThan(const Candidate& o) const {
    if (score != o.score) return score > o.score;
    if (same_colour != o.same_colour) return same_colour;
    return ids < o.ids;
  }
};

ConstraintRelations ToRelations(const Candidate& c, int size) {
  ConstraintRelations out;
  out.size = size;
  for (int d = 0; d < size; ++d) out.ids[d] = Id(c.ids[d]);
  return out;
}

// Precedence pair {a, c}: one slice forbids the sets with c but not a, the
// other those with a but not c.
std::vector<ConstraintRelations> ChoosePairs(const Membership& m, const std::vector<int>& colour,
                                             int k) {
  const int n = static_cast<int>(colour.size());
  RelSet used = 0;
  std::vector<ConstraintRelations> out;
  while (static_cast<int>(out.size()) < k) {
    Candidate best;
    bool found = false;
    for (int a = 0; a < n; ++a) {
      for (int c = a + 1; c < n; ++c) {
        if (Contains(used, Id(a)) || Contains(used, Id(c))) continue;
        Candidate cand{
            std::min(m.Count(c, c, a), m.Count(a, a, c)), colour[a] == colour[c], {a, c, 0}};
        if (!found || cand.BetterThan(best)) best = cand, found = true;
      }
    }
    out.push_back(ToRelations(best, 2));
    used |= Singleton(Id(best.ids[0])) | Singleton(Id(best.ids[1]));
  }
  return out;
}

// Path triple {r, t, u}: one slice forbids the sets with r and t but not u,
// the other those with r and u but not t.
std::vector<ConstraintRelations> ChooseTriples(const Membership& m, const std::vector<int>& colour,
                                               int k) {
  const int n = static_cast<int>(colour.size());
  RelSet used = 0;
  std::vector<ConstraintRelations> out;
  const auto free = [&](int v) { return !Contains(used, Id(v)); };
  while (static_cast<int>(out.size()) < k) {
    Candidate best;
    bool found = false;
    for (int t = 0; t < n; ++t) {
      for (int u = t + 1; u < n; ++u) {
        if (!free(t) || !free(u)) continue;
        for (int r = 0; r < n; ++r) {
          if (!free(r) || r == t || r == u) continue;
          Candidate cand{
              std::min(m.Count(r, t, u), m.Count(r, u, t)), colour[t] == colour[u], {r, t, u}};
          if (!found || cand.BetterThan(best)) best = cand, found = true;
        }
      }
    }
    out.push_back(ToRelations(best, 3));
    for (int d = 0; d < 3; ++d) used |= Singleton(Id(best.ids[d]));
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

std::vector<ConstraintRelations> ChooseConstraintRelations(const Query& query, PlanShape shape,
                                                           int k, bool cross_products) {
  if (k == 0) return {};
  if (cross_products) {  // docs/slicing.md: any disjoint choice gives equal slices
    const int w = RelationsPerConstraint(shape);
    std::vector<ConstraintRelations> out(k);
    for (int j = 0; j < k; ++j) {
      out[j].size = w;
      for (int d = 0; d < w; ++d) out[j].ids[d] = Id(w * j + d);
    }
    return out;
  }
  const std::vector<int> colour = RefinedColours(query);
  const Membership members(ConnectedSets(query, kSampleSets), query.size());
  if (shape == PlanShape::kLeftDeep) return ChoosePairs(members, colour, k);
  return ChooseTriples(members, colour, k);
}

}  // namespace sliceplan
