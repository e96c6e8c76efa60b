// DPhyp's walk over the csg-cmp pairs of a join graph (Moerkotte and
// Neumann, "Dynamic programming strikes back", SIGMOD 2008), apart from any
// memo or cost: the connected sets in an order where each is met after its
// connected subsets' pairs could be, and for one connected set S1 every
// complement S2 (connected, disjoint, adjacent, lowest relation above S1's)
// once. The search that owns a memo (connected_push.h) decides what a set
// found means.
//
// Kept tight (docs/benchmarks.md, "Connected-only search"): neighbourhoods
// grow from the binary-adjacency mask of the set already known, and a
// recursion whose neighbourhood cannot grow past what it excludes is not
// entered. Immutable; thread-safe (visitors are the callers').
#ifndef SLICEPLAN_CORE_GRAPH_CCP_WALK_H_
#define SLICEPLAN_CORE_GRAPH_CCP_WALK_H_

#include <bit>

#include "core/graph/join_graph.h"
#include "core/model/relation_set.h"

namespace sliceplan {

// A visitor of the connected sets (CcpWalk::Csgs):
//   bool Stopped();                  // true ends the walk
//   bool Start(RelSet leaf);         // false skips every set grown from it
//   void Csg(RelSet s, RelSet adjacent);  // adjacent = graph.Adjacent(s)
// A visitor of one set's complements (CcpWalk::Cmps):
//   bool Stopped();
//   void Pair(RelSet s2);            // one complement
//   void Singles(RelSet nb);         // Pair({v}) follows for each v in nb
//   void Grown(RelSet s2, RelSet nb);  // Pair(s2 | sub) follows for each
//                                    // non-empty sub of nb (prefetch hints)
class CcpWalk {
 public:
  // `graph` must outlive the walk.
  CcpWalk(int n, const JoinGraph& graph) : n_(n), graph_(graph), hyper_(graph.has_hyperedges()) {}

  // Every connected set grown from a started relation, highest start first,
  // each after the sets its pairs' complements are drawn from.
  template <class Visitor>
  void Csgs(Visitor& v) const {
    for (int i = n_ - 1; i >= 0 && !v.Stopped(); --i) {
      const RelSet start = RelSet{1} << i;
      if (!v.Start(start)) continue;
      const RelSet adjacent = graph_.Adjacent(start);
      v.Csg(start, adjacent);
      CsgRec(v, start, adjacent, FullSet(i + 1));
    }
  }

  // Every complement of the connected set s1 (adjacent1 its adjacency).
  template <class Visitor>
  void Cmps(Visitor& v, RelSet s1, RelSet adjacent1) const {
    const RelSet x = s1 | FullSet(Lowest(s1).value + 1);
    const RelSet nb = Neighbours(s1, adjacent1, x);
    v.Singles(nb);
    for (RelSet rest = nb; rest != 0 && !v.Stopped();) {
      const int i = 63 - std::countl_zero(rest);  // descending order
      const RelSet s2 = RelSet{1} << i;
      rest &= ~s2;
      v.Pair(s2);
      CmpRec(v, s2, graph_.Adjacent(s2), x | (nb & FullSet(i + 1)));
    }
  }

 private:
  RelSet Neighbours(RelSet s, RelSet adjacent, RelSet x) const {
    RelSet out = adjacent & ~(s | x);
    if (hyper_) out |= graph_.HyperNeighbourhood(s, x);
    return out;
  }
  // True when no set grown from `s` by relations of `nb` can have a
  // neighbour outside x u nb: the recursion would find nothing.
  bool Closed(RelSet s, RelSet adjacent, RelSet nb, RelSet x) const {
    if (hyper_) return false;
    return ((adjacent | graph_.Adjacent(nb)) & ~(s | nb | x)) == 0;
  }

  template <class Visitor>
  void CsgRec(Visitor& v, RelSet s1, RelSet adjacent, RelSet x) const {
    const RelSet nb = Neighbours(s1, adjacent, x);
    if (nb == 0) return;
    for (RelSet sub = nb & (0 - nb); !v.Stopped(); sub = (sub - nb) & nb) {
      v.Csg(s1 | sub, adjacent | graph_.Adjacent(sub));
      if (sub == nb) break;
    }
    if (Closed(s1, adjacent, nb, x)) return;
    for (RelSet sub = nb & (0 - nb); !v.Stopped(); sub = (sub - nb) & nb) {
      CsgRec(v, s1 | sub, adjacent | graph_.Adjacent(sub), x | nb);
      if (sub == nb) break;
    }
  }

  template <class Visitor>
  void CmpRec(Visitor& v, RelSet s2, RelSet adjacent2, RelSet x) const {
    const RelSet nb = Neighbours(s2, adjacent2, x);
    if (nb == 0) return;
    v.Grown(s2, nb);
    for (RelSet sub = nb & (0 - nb); !v.Stopped(); sub = (sub - nb) & nb) {
      v.Pair(s2 | sub);
      if (sub == nb) break;
    }
    if (Closed(s2, adjacent2, nb, x)) return;
    for (RelSet sub = nb & (0 - nb); !v.Stopped(); sub = (sub - nb) & nb) {
      CmpRec(v, s2 | sub, adjacent2 | graph_.Adjacent(sub), x | nb);
      if (sub == nb) break;
    }
  }

  const int n_;
  const JoinGraph& graph_;
  const bool hyper_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_GRAPH_CCP_WALK_H_
