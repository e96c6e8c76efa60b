// The csg-cmp pairs of one connected set, found from the set itself (pull
// order): every split of a connected set S into two connected parts, each
// unordered split once, the part holding S's lowest relation first. A
// bottom-up search that solves each connected set from its own splits
// (connected_pull.h) writes each memo entry once, where DPhyp pushes
// every pair into its union's entry; and its sets of one size can be
// solved on several threads at once.
//
// The partitioning grows the part C holding t = lowest(S) one neighbour at
// a time, as top-down join enumeration does (the idea of partitioning a
// set into two connected halves by growing one of them is B. Fender and
// G. Moerkotte's MinCutBranch, ICDE 2011; the rules below are our own
// derivation, docs/benchmarks.md, "Connected-only search"). A state (C, X)
// stands for every C* with C <= C* <= S \ X such that C* and S \ C* are
// both connected and S \ C* is not empty; it holds that S \ C is
// connected, so C itself is one of them and is reported on entry. Its
// candidates are C's neighbours in S outside C and X; the i-th candidate v
// opens the child (C + v, X + the candidates before it), so the children
// share nothing and together hold every larger C*. A child whose
// remainder R = S \ (C + v) has fallen apart is settled before it is
// entered: the final remainder, being connected, lies in one component K
// of R, and every other component (adjacent to C, since S is connected)
// must join C. If X is not empty, K is the component holding X (none if X
// spans two: the child is empty); if X is empty, each component is a
// child of its own. Every state entered reports one pair, so the work is
// the pairs plus the children found empty, and a connectivity test is one
// bit of the connected-sets bitmap.
//
// Binary predicates only (with a hyperedge, "connected" is not a property
// of the adjacency masks). Immutable after construction; thread-safe.
#ifndef SLICEPLAN_CORE_GRAPH_SET_CCP_WALK_H_
#define SLICEPLAN_CORE_GRAPH_SET_CCP_WALK_H_

#include <array>
#include <bit>
#include <vector>

#include "core/graph/join_graph.h"
#include "core/memo/direct_memo.h"
#include "core/model/relation_set.h"

namespace sliceplan {

class SetCcpWalk {
 public:
  // REQUIRES: `graph` has no hyperedges; `connected` holds exactly the
  // connected sets of the n relations (MarkConnectedSets) and outlives
  // this object.
  SetCcpWalk(int n, const JoinGraph& graph, const DirectMemo& connected) : connected_(connected) {
    for (int r = 0; r < n; ++r) {
      adjacent_[r] = graph.Adjacent(Singleton(RelationId{static_cast<uint8_t>(r)}));
    }
  }

  // Calls fn(c, rest) for every split of `set` into connected c (holding
  // the lowest relation) and connected rest = set \ c, each once, until fn
  // returns false. Returns false if fn did. REQUIRES: `set` connected.
  template <class Fn>
  bool ForEach(RelSet set, Fn&& fn) const {
    Walk walk(*this, set);
    walk.Enter(LowestBit(set), 0, adjacent_[std::countr_zero(set)] & set & ~LowestBit(set), fn);
    while (walk.top > 0) {
      Frame& f = walk.stack[walk.top - 1];
      if (f.candidates == 0) {
        --walk.top;
        continue;
      }
      const RelSet v = LowestBit(f.candidates);
      f.candidates ^= v;
      const RelSet x = f.excluded;
      f.excluded |= v;  // the later children exclude v
      const RelSet c = f.part | v;
      walk.Enter(c, x, (f.boundary | adjacent_[std::countr_zero(v)]) & set & ~c, fn);
    }
    return !walk.stopped;
  }

 private:
  struct Frame {
    RelSet part;        // C
    RelSet excluded;    // X, then the candidates already opened
    RelSet candidates;  // not yet opened
    RelSet boundary;    // C's neighbours in S outside C
  };

  struct Walk {
    // Leaves the stack uninitialised (4 KiB cleared per set otherwise).
    Walk(const SetCcpWalk& owner, RelSet whole) : self(owner), set(whole) {}

    const SetCcpWalk& self;
    const RelSet set;
    // The remainders of the live states are distinct and pairwise nested
    // or disjoint subsets of S, so there are fewer than 2 |S| of them.
    std::array<Frame, 2 * kMaxRelations> stack;
    int top = 0;
    bool stopped = false;  // fn said so: the walk ends (top is 0)

    // Settles and enters the child part c (excluding x, with `boundary`
    // its neighbours in S outside it).
    template <class Fn>
    [[gnu::always_inline]] void Enter(RelSet c, RelSet x, RelSet boundary, Fn& fn) {
      const RelSet rest = set ^ c;
      if (rest == 0) return;
      if (self.connected_.Contains(rest)) {
        Push(c, x, boundary, fn);
        return;
      }
      if (x != 0) {
        const RelSet k = self.Component(rest, LowestBit(x));
        if ((x & ~k) == 0) Absorb(k, x, fn);
        return;
      }
      for (RelSet left = rest; left != 0;) {
        const RelSet k = self.Component(left, LowestBit(left));
        left ^= k;
        Absorb(k, 0, fn);
      }
    }

    // Enters S \ k, k a component of the remainder.
    template <class Fn>
    [[gnu::always_inline]] void Absorb(RelSet k, RelSet x, Fn& fn) {
      const RelSet c = set ^ k;
      // A one-relation remainder has no child: its boundary is not needed.
      Push(c, x, (k & (k - 1)) != 0 ? self.Boundary(k, c) : k, fn);
    }

    // Reports c and enters its state, unless its remainder is one
    // relation (whose only child would be S itself).
    template <class Fn>
    [[gnu::always_inline]] void Push(RelSet c, RelSet x, RelSet boundary, Fn& fn) {
      if (stopped) return;
      const RelSet rest = set ^ c;
      if (!fn(c, rest)) {
        stopped = true;
        top = 0;
        return;
      }
      if ((rest & (rest - 1)) != 0) stack[top++] = {c, x, boundary & ~x, boundary};
    }
  };

  // The component of `within` holding `seed` (a single relation).
  RelSet Component(RelSet within, RelSet seed) const {
    RelSet reached = seed;
    for (RelSet frontier = seed; frontier != 0;) {
      RelSet next = 0;
      for (; frontier != 0; frontier &= frontier - 1) next |= adjacent_[std::countr_zero(frontier)];
      frontier = next & within & ~reached;
      reached |= frontier;
    }
    return reached;
  }

  // The members of k with a neighbour in c.
  RelSet Boundary(RelSet k, RelSet c) const {
    RelSet out = 0;
    for (RelSet m = k; m != 0; m &= m - 1) {
      if ((adjacent_[std::countr_zero(m)] & c) != 0) out |= LowestBit(m);
    }
    return out;
  }

  const DirectMemo& connected_;
  std::array<RelSet, kMaxRelations> adjacent_{};
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_GRAPH_SET_CCP_WALK_H_
