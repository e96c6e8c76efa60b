// The join graph seen by the connected-sets enumerators: binary predicates
// as adjacency masks, wider predicates as hyperedges. Immutable;
// thread-safe.
#ifndef SLICEPLAN_CORE_GRAPH_JOIN_GRAPH_H_
#define SLICEPLAN_CORE_GRAPH_JOIN_GRAPH_H_

#include <bit>
#include <vector>

#include "core/model/query.h"

namespace sliceplan {

class JoinGraph {
 public:
  explicit JoinGraph(const Query& query);

  // DPhyp's neighbourhood N(S, X): relations outside S and X reachable from
  // S by one edge; for a hyperedge P touching S whose part outside S avoids
  // X, that part's lowest relation stands for it.
  RelSet Neighbourhood(RelSet s, RelSet x) const {
    RelSet out = Adjacent(s) & ~(s | x);
    if (!hyper_.empty()) out |= HyperNeighbourhood(s, x);
    return out;
  }
  // Relations sharing a binary predicate with a member of S (members of S
  // among them).
  RelSet Adjacent(RelSet s) const {
    RelSet out = 0;
    for (; s != 0; s &= s - 1) out |= simple_[std::countr_zero(s)];
    return out;
  }
  // The hyperedge part of N(S, X): for each predicate over three or more
  // relations touching S whose part outside S avoids X, that part's lowest
  // relation.
  RelSet HyperNeighbourhood(RelSet s, RelSet x) const;
  bool has_hyperedges() const { return !hyper_.empty(); }
  // Relations sharing any predicate with a member of S, S excluded.
  RelSet Around(RelSet s) const;

 private:
  std::vector<RelSet> simple_;    // relation -> binary-predicate neighbours
  std::vector<RelSet> touching_;  // relation -> all co-members of predicates
  std::vector<RelSet> hyper_;     // predicates over three or more relations
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_GRAPH_JOIN_GRAPH_H_
