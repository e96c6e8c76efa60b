// The contract between an enumerator and what it computes per memo entry.
//
// An enumerator (dense_bushy.h, dense_left_deep.h, connected_*.h) visits
// relation sets in a valid dynamic-programming order and hands every split
// it generates to a policy; the policy owns the memo arrays, indexed by slot.
// A cost model plugs in as a policy (cout_policy.h) and so does plan
// counting (count_policy.h); the enumerators never change for a new model.
//
// A policy P provides:
//   static constexpr bool kSymmetric;   // cost(L, R) == cost(R, L): the
//                                       // enumerator offers one order only
//   static constexpr size_t kBytesPerSlot;  // memo bytes per entry
//   static constexpr bool kParallelDense;   // Begin/Offer/Finish may run on
//                                       // different slots on several threads
//   void Resize(size_t slots);          // memo holds slots [0, slots)
//   void InitLeaf(Slot s, RelationId r);
// Dense enumeration, all splits of one set in a row:
//   Acc Begin(Slot s, RelSet set);                        // a set's splits start
//   Acc Offer(Acc, Slot left, Slot right) const;          // bushy
//   Acc OfferLeafRight(Acc, Slot left, RelationId right) const;  // left-deep
// (Offer takes and returns the accumulator by value so that it stays in
// registers in the hot loop.)
//   void Finish(Slot s, RelSet set, const Acc&);
// Scattered enumeration (connected sets, splits of a set interleaved):
//   void InitSet(Slot s, RelSet set);
//   void Relax(Slot s, Slot left, Slot right);
//   void RelaxLeafRight(Slot s, Slot left, RelationId right);
// Both:
//   bool HasPlan(Slot s) const;   // leaf, or some split was offered
// Sets are in the enumerator's numbering; slots of the operands were
// finished before they are offered. Policies are single-threaded except
// as kParallelDense allows.
#ifndef SLICEPLAN_CORE_SEARCH_SEARCH_POLICY_H_
#define SLICEPLAN_CORE_SEARCH_SEARCH_POLICY_H_

#include <concepts>
#include <cstddef>

#include "core/memo/slot.h"
#include "core/model/relation_set.h"

namespace sliceplan {

template <class P>
concept SearchPolicy = requires(P p, const P cp, typename P::Acc acc, Slot s, RelSet set,
                                RelationId r) {
  { P::kSymmetric } -> std::convertible_to<bool>;
  { P::kBytesPerSlot } -> std::convertible_to<size_t>;
  { P::kParallelDense } -> std::convertible_to<bool>;
  p.Resize(size_t{1});
  p.InitLeaf(s, r);
  { p.Begin(s, set) } -> std::same_as<typename P::Acc>;
  { cp.Offer(acc, s, s) } -> std::same_as<typename P::Acc>;
  { cp.OfferLeafRight(acc, s, r) } -> std::same_as<typename P::Acc>;
  p.Finish(s, set, acc);
  p.InitSet(s, set);
  p.Relax(s, s, s);
  p.RelaxLeafRight(s, s, r);
  { cp.HasPlan(s) } -> std::convertible_to<bool>;
};

// Policies whose accumulators can be joined (Empty, Merge): their loops
// keep two accumulators, so one split's min does not wait for the last
// one's (the loop is bound by that chain's latency otherwise,
// docs/benchmarks.md).
// Optional:
//   Acc Empty() const;          // the accumulator no split touched
//   Acc Merge(Acc a, Acc b) const;  // both joined, a kept on a tie
template <class Policy>
concept TwoChains = requires(const Policy& p, typename Policy::Acc a) {
  { p.Empty() } -> std::same_as<typename Policy::Acc>;
  { p.Merge(a, a) } -> std::same_as<typename Policy::Acc>;
};

// Policies with a scattered layout (UseScatteredLayout before Resize, for
// searches that meet sets out of mask order, and the pull searches): each
// set's cardinality is cached beside its cost, so a set solved from its
// own splits over a direct memo (slot = set) takes its cardinality from its
// best split's operands.
// Optional:
//   void UseScatteredLayout();
//   void FinishJoin(Slot s, RelSet set, const Acc&);  // Finish, so
template <class Policy>
concept ScatteredLayout = requires(Policy& p, const typename Policy::Acc& a, Slot s, RelSet set) {
  p.UseScatteredLayout();
  p.FinishJoin(s, set, a);
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SEARCH_SEARCH_POLICY_H_
