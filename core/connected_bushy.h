// Bushy enumeration over connected sets only (no cross products), for
// binary predicates and hyperedges: the DPhyp algorithm of Moerkotte and
// Neumann ("Dynamic programming strikes back", SIGMOD 2008). It emits every
// csg-cmp pair (S1, S2) once (two connected, disjoint sets joined by some
// predicate), each after both sides are final, so the memo needs only the
// connected sets. A slice keeps the pairs whose S1, S2 and S1 u S2 are all
// admissible; the others are skipped (and not counted as splits).
#ifndef SLICEPLAN_CORE_CONNECTED_BUSHY_H_
#define SLICEPLAN_CORE_CONNECTED_BUSHY_H_

#include "absl/status/status.h"
#include "absl/strings/str_cat.h"
#include "core/cardinality.h"
#include "core/connected_memo.h"
#include "core/join_graph.h"
#include "core/search_control.h"
#include "core/search_policy.h"
#include "core/search_stats.h"
#include "core/slice_constraints.h"

namespace sliceplan {

// One run of DPhyp into `policy` and `memo` (both empty). Single use.
template <SearchPolicy Policy>
class ConnectedBushy {
 public:
  ConnectedBushy(int n, const JoinGraph& graph, const Cardinality& card,
                 const SliceConstraints& constraints, Policy& policy, ConnectedMemo& memo,
                 SearchControl& control, SearchStats& stats)
      : n_(n),
        graph_(graph),
        card_(card),
        constraints_(constraints),
        policy_(policy),
        memo_(memo),
        control_(control),
        stats_(stats) {}

  // OK, or CANCELLED / DEADLINE_EXCEEDED from the control, or
  // RESOURCE_EXHAUSTED when the memo reached its slot limit.
  absl::Status Run() {
    for (int v = 0; v < n_; ++v) {
      const RelSet leaf = Singleton(RelationId{static_cast<uint8_t>(v)});
      if (!constraints_.Admissible(leaf)) continue;
      const Slot s = Add(leaf);
      if (s != kNoSlot) policy_.InitLeaf(s, Lowest(leaf));
    }
    for (int v = n_ - 1; v >= 0 && status_.ok(); --v) {
      const RelSet start = Singleton(RelationId{static_cast<uint8_t>(v)});
      const RelSet below = FullSet(v + 1);  // B_v: relations <= v
      EmitCsg(start);
      EnumerateCsgRec(start, below);
    }
    return status_;
  }

 private:
  bool Stopped() const { return !status_.ok(); }

  // The slot of a new or known set; kNoSlot (and a status) at the limit.
  Slot Add(RelSet s) {
    auto slot = AddConnectedSet(memo_, policy_, s);
    if (!slot.ok()) {
      status_ = slot.status();
      return kNoSlot;
    }
    return *slot;
  }

  void EnumerateCsgRec(RelSet s1, RelSet x) {
    const RelSet nb = graph_.Neighbourhood(s1, x);
    if (nb == 0) return;
    for (RelSet sub = nb & (0 - nb); !Stopped(); sub = (sub - nb) & nb) {
      if (memo_.Find(s1 | sub)) EmitCsg(s1 | sub);
      if (sub == nb) break;
    }
    for (RelSet sub = nb & (0 - nb); !Stopped(); sub = (sub - nb) & nb) {
      EnumerateCsgRec(s1 | sub, x | nb);
      if (sub == nb) break;
    }
  }

  void EmitCsg(RelSet s1) {
    const RelSet x = s1 | FullSet(Lowest(s1).value + 1);
    const RelSet nb = graph_.Neighbourhood(s1, x);
    for (RelSet rest = nb; rest != 0 && !Stopped();) {
      const int v = 63 - std::countl_zero(rest);  // descending order
      const RelSet s2 = RelSet{1} << v;
      rest &= ~s2;
      if (memo_.Find(s2) && card_.Connects(s1, s2)) EmitPair(s1, s2);
      EnumerateCmpRec(s1, s2, x | (nb & FullSet(v + 1)));
    }
  }

  void EnumerateCmpRec(RelSet s1, RelSet s2, RelSet x) {
    const RelSet nb = graph_.Neighbourhood(s2, x);
    if (nb == 0) return;
    for (RelSet sub = nb & (0 - nb); !Stopped(); sub = (sub - nb) & nb) {
      const RelSet grown = s2 | sub;
      if (memo_.Find(grown) && card_.Connects(s1, grown)) EmitPair(s1, grown);
      if (sub == nb) break;
    }
    for (RelSet sub = nb & (0 - nb); !Stopped(); sub = (sub - nb) & nb) {
      EnumerateCmpRec(s1, s2 | sub, x | nb);
      if (sub == nb) break;
    }
  }

  void EmitPair(RelSet s1, RelSet s2) {
    const RelSet whole = s1 | s2;
    if (!constraints_.Admissible(whole)) return;
    const Slot a = *memo_.Find(s1);
    const Slot b = *memo_.Find(s2);
    const Slot s = Add(whole);
    if (s == kNoSlot) return;
    policy_.Relax(s, a, b);
    uint64_t work = 1;
    if constexpr (!Policy::kSymmetric) {
      policy_.Relax(s, b, a);
      work = 2;
    }
    stats_.splits += work;
    if (control_.Tick(work)) status_ = control_.status();
  }

  const int n_;
  const JoinGraph& graph_;
  const Cardinality& card_;
  const SliceConstraints& constraints_;
  Policy& policy_;
  ConnectedMemo& memo_;
  SearchControl& control_;
  SearchStats& stats_;
  absl::Status status_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_CONNECTED_BUSHY_H_
