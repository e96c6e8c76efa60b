// The `cout` cost model as a search policy (docs/cost-models.md):
//   C_out(leaf) = 0;  C_out(L join R) = card(L u R) + C_out(L) + C_out(R).
// One metric, symmetric in L and R, so enumerators offer each unordered
// split once. Memo: 8 bytes of cost and 4 of best left operand per slot
// (plus 8 of cardinality in scattered mode). Single-threaded.
#ifndef SLICEPLAN_CORE_COUT_POLICY_H_
#define SLICEPLAN_CORE_COUT_POLICY_H_

#include <limits>
#include <vector>

#include "core/cardinality.h"
#include "core/dense_layout.h"
#include "core/search_policy.h"
#include "core/value_range.h"

namespace sliceplan {

// One join's cout cost from its output cardinality and its inputs' costs.
// Shared by the policy and by plan costing so both round identically.
// Saturates at kValueCeiling (value_range.h).
inline double CoutJoin(double card, double left_cost, double right_cost) {
  return Saturate(card + (left_cost + right_cost));
}

class CoutPolicy {
 public:
  static constexpr bool kSymmetric = true;
  static constexpr size_t kBytesPerSlot = sizeof(double) + sizeof(Slot);
  static constexpr double kInf = std::numeric_limits<double>::infinity();

  struct Acc {
    double best;
    Slot left;
  };

  // `card` must outlive the policy and use the enumerator's numbering.
  explicit CoutPolicy(const Cardinality& card) : card_(card) {}

  void Resize(size_t slots) {
    cost_.resize(slots, kInf);
    left_.resize(slots, kNoSlot);
  }
  void InitLeaf(Slot s, RelationId) { cost_[s] = 0; }

  Acc Begin(Slot, RelSet) const { return {kInf, kNoSlot}; }
  // An improvement is rare once a good split is found, so the branch is
  // predicted; a branch-free min would chain every split on the last one.
  Acc Offer(Acc a, Slot left, Slot right) const {
    const double v = cost_[left] + cost_[right];
    if (__builtin_expect(v < a.best, 0)) a = {v, left};
    return a;
  }
  Acc OfferLeafRight(Acc a, Slot left, RelationId) const {
    const double v = cost_[left] + 0.0;
    if (__builtin_expect(v < a.best, 0)) a = {v, left};
    return a;
  }
  void Finish(Slot s, RelSet set, const Acc& a) {
    if (a.left == kNoSlot) return;
    // Store before calling Of(): no SSE register survives a call, and a
    // best cost live across one is kept in memory for the whole hot loop.
    cost_[s] = a.best;
    left_[s] = a.left;
    // = CoutJoin(card, left, right): + commutes. Inputs are at most the
    // ceiling each, so the sum is finite before it saturates. Written as
    // two steps on purpose: folding them into one expression made GCC 12
    // keep the best cost in memory through the hot loop (3.3 ns per split
    // instead of 1.0 at 18 relations).
    cost_[s] += card_.Of(set);
    cost_[s] = Saturate(cost_[s]);
  }

  void InitSet(Slot s, RelSet set) {
    if (set_card_.size() <= s) set_card_.resize(cost_.size());
    set_card_[s] = card_.Of(set);
  }
  void Relax(Slot s, Slot left, Slot right) {
    const double v = CoutJoin(set_card_[s], cost_[left], cost_[right]);
    if (v < cost_[s]) cost_[s] = v, left_[s] = left;
  }
  void RelaxLeafRight(Slot s, Slot left, RelationId) {
    const double v = CoutJoin(set_card_[s], cost_[left], 0.0);
    if (v < cost_[s]) cost_[s] = v, left_[s] = left;
  }

  bool HasPlan(Slot s) const { return cost_[s] < kInf; }
  double Cost(Slot s) const { return cost_[s]; }
  // The slot of the best plan's left operand; kNoSlot for a leaf.
  Slot BestLeft(Slot s) const { return left_[s]; }

 private:
  const Cardinality& card_;
  std::vector<double> cost_;
  std::vector<Slot> left_;
  std::vector<double> set_card_;  // scattered mode only
};

static_assert(SearchPolicy<CoutPolicy>);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_COUT_POLICY_H_
