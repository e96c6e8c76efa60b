// Bushy enumeration over connected sets only (no cross products), for
// binary predicates and hyperedges: the DPhyp algorithm of Moerkotte and
// Neumann ("Dynamic programming strikes back", SIGMOD 2008). It emits every
// csg-cmp pair (S1, S2) once (two connected, disjoint sets joined by some
// predicate), each after both sides are final, so the memo needs only the
// connected sets. A slice keeps the pairs whose S1, S2 and S1 u S2 are all
// admissible; the others are skipped (and not counted as splits).
//
// Kept tight (docs/benchmarks.md, "Connected-only search"): each side's
// slot is looked up once (S1 once for all its complements), neighbourhoods
// grow from the binary-adjacency mask of the set already known, a
// recursion whose neighbourhood cannot grow is not entered, and on a graph
// without hyperedges no pair is tested for a connecting predicate (a
// complement grows from a neighbour of S1, so one always exists).
#ifndef SLICEPLAN_CORE_CONNECTED_BUSHY_H_
#define SLICEPLAN_CORE_CONNECTED_BUSHY_H_

#include "absl/status/status.h"
#include "core/cardinality.h"
#include "core/connected_memo.h"
#include "core/join_graph.h"
#include "core/search_control.h"
#include "core/search_policy.h"
#include "core/search_stats.h"
#include "core/slice_constraints.h"

namespace sliceplan {

// One run of DPhyp into `policy` and `memo` (both empty; a direct memo's
// policy already sized). Single use.
template <SearchPolicy Policy, class Memo>
class ConnectedBushy {
 public:
  ConnectedBushy(int n, const JoinGraph& graph, const Cardinality& card,
                 const SliceConstraints& constraints, Policy& policy, Memo& memo,
                 SearchControl& control, SearchStats& stats)
      : n_(n),
        graph_(graph),
        card_(card),
        constraints_(constraints),
        policy_(policy),
        memo_(memo),
        control_(control),
        stats_(stats),
        sliced_(!constraints.constraints().empty()),
        hyper_(graph.has_hyperedges()) {}

  // OK, or CANCELLED / DEADLINE_EXCEEDED from the control, or
  // RESOURCE_EXHAUSTED when the memo reached its slot limit.
  absl::Status Run() {
    for (int v = 0; v < n_; ++v) {
      const RelSet leaf = RelSet{1} << v;
      if (!constraints_.Admissible(leaf)) continue;
      const Slot s = Add(leaf);
      if (s != kNoSlot) policy_.InitLeaf(s, Lowest(leaf));
    }
    for (int v = n_ - 1; v >= 0 && status_.ok(); --v) {
      const RelSet start = RelSet{1} << v;
      const auto slot = memo_.Find(start);
      if (!slot) continue;
      const RelSet adjacent = graph_.Adjacent(start);
      EmitCsg(start, *slot, adjacent);
      EnumerateCsgRec(start, adjacent, FullSet(v + 1));
    }
    Flush();
    return status_;
  }

 private:
  // Every `kFlushPairs` pairs the control is ticked: often enough to stop
  // within microseconds, rarely enough to cost nothing per pair.
  static constexpr uint64_t kFlushPairs = 1024;

  bool Stopped() const { return !status_.ok(); }

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

  // The slot of a new or known set; kNoSlot (and a status) at the limit.
  // A pair's union is initialised from its operands where the policy can.
  Slot Add(RelSet s, RelSet s1 = 0, Slot slot1 = kNoSlot, RelSet s2 = 0, Slot slot2 = kNoSlot) {
    bool added = false;
    const Slot slot = memo_.Insert(s, added);
    if (added) {
      if constexpr (Memo::kGrows) policy_.Resize(memo_.size());
      constexpr bool kJoins = requires(Policy & p) { p.InitJoin(slot, slot, s, slot, s); };
      if constexpr (kJoins) {
        if (s1 != 0) {
          policy_.InitJoin(slot, slot1, s1, slot2, s2);
          return slot;
        }
      }
      policy_.InitSet(slot, s);
    } else if (slot == kNoSlot) {
      status_ = AddConnectedSet(memo_, policy_, s).status();  // the limit's message
    }
    return slot;
  }

  void EnumerateCsgRec(RelSet s1, RelSet adjacent, RelSet x) {
    const RelSet nb = Neighbours(s1, adjacent, x);
    if (nb == 0) return;
    for (RelSet sub = nb & (0 - nb); !Stopped(); sub = (sub - nb) & nb) {
      const RelSet grown = s1 | sub;
      if (const auto slot = memo_.Find(grown)) {
        EmitCsg(grown, *slot, adjacent | graph_.Adjacent(sub));
      }
      if (sub == nb) break;
    }
    if (Closed(s1, adjacent, nb, x)) return;
    for (RelSet sub = nb & (0 - nb); !Stopped(); sub = (sub - nb) & nb) {
      EnumerateCsgRec(s1 | sub, adjacent | graph_.Adjacent(sub), x | nb);
      if (sub == nb) break;
    }
  }

  void EmitCsg(RelSet s1, Slot slot1, RelSet adjacent1) {
    const RelSet x = s1 | FullSet(Lowest(s1).value + 1);
    const RelSet nb = Neighbours(s1, adjacent1, x);
    PrefetchEach(s1, nb);
    for (RelSet rest = nb; rest != 0 && !Stopped();) {
      const int v = 63 - std::countl_zero(rest);  // descending order
      const RelSet s2 = RelSet{1} << v;
      rest &= ~s2;
      if (const auto slot2 = memo_.Find(s2); slot2 && Joinable(s1, s2)) {
        EmitPair(s1, slot1, s2, *slot2);
      }
      EnumerateCmpRec(s1, slot1, s2, graph_.Adjacent(s2), x | (nb & FullSet(v + 1)));
    }
  }

  void EnumerateCmpRec(RelSet s1, Slot slot1, RelSet s2, RelSet adjacent2, RelSet x) {
    const RelSet nb = Neighbours(s2, adjacent2, x);
    if (nb == 0) return;
    Prefetch(s1, s2, nb);
    for (RelSet sub = nb & (0 - nb); !Stopped(); sub = (sub - nb) & nb) {
      const RelSet grown = s2 | sub;
      if (const auto slot2 = memo_.Find(grown); slot2 && Joinable(s1, grown)) {
        EmitPair(s1, slot1, grown, *slot2);
      }
      if (sub == nb) break;
    }
    if (Closed(s2, adjacent2, nb, x)) return;
    for (RelSet sub = nb & (0 - nb); !Stopped(); sub = (sub - nb) & nb) {
      EnumerateCmpRec(s1, slot1, s2 | sub, adjacent2 | graph_.Adjacent(sub), x | nb);
      if (sub == nb) break;
    }
  }

  // With a direct memo (slot = set) the entries of the pairs (s1, s2 u sub)
  // for every sub of nb are asked for before any is relaxed, so their
  // cache misses overlap.
  void Prefetch(RelSet s1, RelSet s2, RelSet nb) const {
    constexpr bool kCan = requires(const Policy& p) { p.Prefetch(Slot{}, Slot{}); };
    if constexpr (kCan && !Memo::kGrows) {
      for (RelSet sub = nb & (0 - nb);; sub = (sub - nb) & nb) {
        const RelSet grown = s2 | sub;
        policy_.Prefetch(static_cast<Slot>(s1 | grown), static_cast<Slot>(grown));
        if (sub == nb) break;
      }
    }
  }

  // The same for the pairs (s1, {v}), v in nb.
  void PrefetchEach(RelSet s1, RelSet nb) const {
    constexpr bool kCan = requires(const Policy& p) { p.Prefetch(Slot{}, Slot{}); };
    if constexpr (kCan && !Memo::kGrows) {
      for (; nb != 0; nb &= nb - 1) {
        const RelSet v = LowestBit(nb);
        policy_.Prefetch(static_cast<Slot>(s1 | v), static_cast<Slot>(v));
      }
    }
  }

  // Without hyperedges every emitted pair is joined by a predicate.
  bool Joinable(RelSet s1, RelSet s2) const { return !hyper_ || card_.Connects(s1, s2); }

  void EmitPair(RelSet s1, Slot slot1, RelSet s2, Slot slot2) {
    const RelSet whole = s1 | s2;
    if (sliced_ && !constraints_.Admissible(whole)) return;
    const Slot s = Add(whole, s1, slot1, s2, slot2);
    if (s == kNoSlot) return;
    policy_.Relax(s, slot1, slot2);
    if constexpr (!Policy::kSymmetric) policy_.Relax(s, slot2, slot1);
    if (++pending_ == kFlushPairs) Flush();
  }

  void Flush() {
    const uint64_t work = Policy::kSymmetric ? pending_ : 2 * pending_;
    pending_ = 0;
    stats_.splits += work;
    if (control_.Tick(work) && status_.ok()) status_ = control_.status();
  }

  const int n_;
  const JoinGraph& graph_;
  const Cardinality& card_;
  const SliceConstraints& constraints_;
  Policy& policy_;
  Memo& memo_;
  SearchControl& control_;
  SearchStats& stats_;
  const bool sliced_;
  const bool hyper_;
  uint64_t pending_ = 0;
  absl::Status status_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_CONNECTED_BUSHY_H_
