// Bushy enumeration over connected sets only (no cross products), for
// binary predicates and hyperedges: the DPhyp algorithm of Moerkotte and
// Neumann ("Dynamic programming strikes back", SIGMOD 2008). It emits every
// csg-cmp pair (S1, S2) once (two connected, disjoint sets joined by some
// predicate), each after both sides are final, so the memo needs only the
// connected sets. A slice keeps the pairs whose S1, S2 and S1 u S2 are all
// admissible; the others are skipped (and not counted as splits).
//
// The walk itself is CcpWalk (ccp_walk.h). Kept tight (docs/benchmarks.md,
// "Connected-only search"): each side's slot is looked up once (S1 once
// for all its complements), and on a graph without hyperedges no pair is
// tested for a connecting predicate (a complement grows from a neighbour
// of S1, so one always exists).
#ifndef SLICEPLAN_CORE_SEARCH_CONNECTED_PUSH_H_
#define SLICEPLAN_CORE_SEARCH_CONNECTED_PUSH_H_

#include "absl/status/status.h"
#include "core/graph/ccp_walk.h"
#include "core/graph/join_graph.h"
#include "core/memo/connected_memo.h"
#include "core/model/cardinality.h"
#include "core/search/join_filter.h"
#include "core/search/search_control.h"
#include "core/search/search_policy.h"
#include "core/search/search_stats.h"
#include "core/slicing/slice_constraints.h"

namespace sliceplan {

// One run of DPhyp into `policy` and `memo` (both empty; a direct memo's
// policy already sized). Single use.
template <SearchPolicy Policy, class Memo>
class ConnectedPush {
 public:
  ConnectedPush(int n, const JoinGraph& graph, const Cardinality& card,
                const SliceConstraints& constraints, Policy& policy, Memo& memo,
                SearchControl& control, SearchStats& stats, const JoinFilter* joins = nullptr)
      : n_(n),
        walk_(n, graph),
        card_(card),
        constraints_(constraints),
        policy_(policy),
        memo_(memo),
        control_(control),
        stats_(stats),
        sliced_(!constraints.constraints().empty()),
        hyper_(graph.has_hyperedges()),
        joins_(joins) {}

  // OK, or CANCELLED / DEADLINE_EXCEEDED from the control, or
  // RESOURCE_EXHAUSTED when the memo reached its slot limit.
  absl::Status Run() {
    for (int v = 0; v < n_; ++v) {
      const RelSet leaf = RelSet{1} << v;
      // A left-deep plan's right operands are leaves whatever the slice
      // (EmitJoin tests a leaf on the left).
      if (!constraints_.Admissible(leaf) && !(joins_ && joins_->left_deep)) continue;
      const Slot s = Add(leaf);
      if (s != kNoSlot) policy_.InitLeaf(s, Lowest(leaf));
    }
    walk_.Csgs(*this);
    Flush();
    return status_;
  }

 private:
  friend class CcpWalk;

  // Every `kFlushPairs` pairs the control is ticked: often enough to stop
  // within microseconds, rarely enough to cost nothing per pair.
  static constexpr uint64_t kFlushPairs = 1024;

  // The complements of one set S1 found in the memo (CcpWalk::Cmps).
  struct Complements {
    ConnectedPush& search;
    RelSet s1;
    Slot slot1;

    bool Stopped() const { return search.Stopped(); }
    void Pair(RelSet s2) {
      const auto slot2 = search.memo_.Find(s2);
      if (!slot2) return;
      if (search.joins_) {
        search.EmitJoin(s1, slot1, s2, *slot2);
      } else if (search.Joinable(s1, s2)) {
        search.EmitPair(s1, slot1, s2, *slot2);
      }
    }
    void Singles(RelSet nb) const { search.PrefetchEach(s1, nb); }
    void Grown(RelSet s2, RelSet nb) const { search.Prefetch(s1, s2, nb); }
  };

  // CcpWalk::Csgs: a start is a leaf in the memo; a connected set's
  // complements are walked when it is in the memo.
  bool Stopped() const { return !status_.ok(); }
  bool Start(RelSet leaf) const { return memo_.Find(leaf).has_value(); }
  void Csg(RelSet s1, RelSet adjacent1) {
    if (const auto slot = memo_.Find(s1)) {
      Complements cmps{*this, s1, *slot};
      walk_.Cmps(cmps, s1, adjacent1);
    }
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

  // A pair of a query with non-inner joins: relaxed in each order the
  // detector allows (a symmetric policy: once, the allowed order first).
  void EmitJoin(RelSet s1, Slot slot1, RelSet s2, Slot slot2) {
    const JoinFit fit = joins_->conflicts->Fit(s1, s2, joins_->cross_products);
    bool forward = fit.forward, backward = fit.backward;
    if (joins_->left_deep) {
      const auto opens = [&](RelSet s) { return Size(s) > 1 || constraints_.Admissible(s); };
      forward = forward && Size(s2) == 1 && opens(s1);
      backward = backward && Size(s1) == 1 && opens(s2);
    }
    if (!forward && !backward) return;
    const RelSet whole = s1 | s2;
    if (sliced_ && !constraints_.Admissible(whole)) return;
    const Slot s = Add(whole, s1, slot1, s2, slot2);
    if (s == kNoSlot) return;
    if constexpr (Policy::kSymmetric) {
      if (forward) {
        policy_.Relax(s, slot1, slot2);
      } else {
        policy_.Relax(s, slot2, slot1);
      }
    } else {
      if (forward) policy_.Relax(s, slot1, slot2);
      if (backward) policy_.Relax(s, slot2, slot1);
    }
    if (++pending_ == kFlushPairs) Flush();
  }

  void Flush() {
    const uint64_t work = Policy::kSymmetric ? pending_ : 2 * pending_;
    pending_ = 0;
    stats_.splits += work;
    if (control_.Tick(work) && status_.ok()) status_ = control_.status();
  }

  const int n_;
  const CcpWalk walk_;
  const Cardinality& card_;
  const SliceConstraints& constraints_;
  Policy& policy_;
  Memo& memo_;
  SearchControl& control_;
  SearchStats& stats_;
  const bool sliced_;
  const bool hyper_;
  const JoinFilter* joins_;
  uint64_t pending_ = 0;
  absl::Status status_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SEARCH_CONNECTED_PUSH_H_
