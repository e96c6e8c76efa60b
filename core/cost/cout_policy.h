// The `cout` cost model as a search policy (docs/cost-models.md):
//   C_out(leaf) = 0;  C_out(L join R) = card(L u R) + C_out(L) + C_out(R).
// One metric, symmetric in L and R, so enumerators offer each unordered
// split once. Memo: 8 bytes of cost and 4 of best left operand per slot
// (and 8 of cached cardinality in scattered mode). Single-threaded except as
// kParallelDense allows.
#ifndef SLICEPLAN_CORE_COST_COUT_POLICY_H_
#define SLICEPLAN_CORE_COST_COUT_POLICY_H_

#include <bit>
#include <limits>
#include <vector>

#include "core/cost/cout_model.h"
#include "core/memo/memo_allocator.h"
#include "core/model/cardinality.h"
#include "core/model/value_range.h"
#include "core/search/search_policy.h"

namespace sliceplan {

class CoutPolicy {
 public:
  static constexpr bool kSymmetric = true;
  // Dense enumeration may run on several threads at once (Offer reads finished slots, Finish writes
  // its own).
  static constexpr bool kParallelDense = true;
  static constexpr size_t kBytesPerSlot = sizeof(double) + sizeof(Slot);
  static constexpr double kInf = std::numeric_limits<double>::infinity();

  struct Acc {
    double best;
    Slot left;
  };

  // `card` must outlive the policy and use the enumerator's numbering.
  explicit CoutPolicy(const Cardinality& card) : card_(card) {}

  // Called before Resize by a search that relaxes sets in scattered order,
  // or solves each set from its best split's cached cardinalities
  // (connected pairs): each set's cardinality is then cached beside its
  // cost (set_card_), so relaxing a pair reads it without a pass over the
  // predicates, and the arrays are left uninitialised until a set is met.
  void UseScatteredLayout() {
    scattered_ = true;
    leaf_card_.resize(card_.relations());
    for (int r = 0; r < card_.relations(); ++r) {
      leaf_card_[r] = card_.Of(Singleton(RelationId{static_cast<uint8_t>(r)}));
    }
  }

  // Called before Resize by a search that writes every entry it keeps
  // before any read (the connected-only pull searches): Resize then leaves
  // the entries uninitialised, so the memo's pages are touched only where
  // the search keeps sets.
  void LeaveUnfilled() { unfilled_ = true; }

  void Resize(size_t slots) {
    if (unfilled_ && !scattered_) {
      cost_.resize(slots);
      left_.resize(slots);
      return;
    }
    if (scattered_) {
      cost_.resize(slots);
      left_.resize(slots);
      set_card_.resize(slots);
      return;
    }
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
  // The accumulator no split has touched, and two accumulators joined (the
  // first kept on a tie): a loop may keep two to break its dependency chain.
  Acc Empty() const { return {kInf, kNoSlot}; }
  Acc Merge(Acc a, Acc b) const { return b.best < a.best ? b : a; }
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
    // two steps on purpose: folded into one expression, GCC 12 keeps the
    // best cost in memory through the hot loop, which triples the time
    // per split.
    cost_[s] += card_.Of(set);
    cost_[s] = Saturate(cost_[s]);
  }

  // Finish in scattered mode over a direct memo (slots are sets): the
  // set's cardinality from its best split's cached operand cardinalities
  // (O(|smaller side|)) instead of a pass over the predicates, and cached.
  // A one-relation right operand's comes from the leaf table: a left-deep
  // slice joins relations whose own set it does not admit (a relation
  // that must come after another is no prefix alone).
  void FinishJoin(Slot s, RelSet set, const Acc& a) {
    if (a.left == kNoSlot) return;
    const RelSet left = a.left, right = set ^ left;
    const double right_card =
        (right & (right - 1)) == 0 ? leaf_card_[std::countr_zero(right)] : set_card_[right];
    const double card = card_.OfJoin(left, set_card_[a.left], right, right_card);
    set_card_[s] = card;
    left_[s] = a.left;
    cost_[s] = CoutJoin(card, a.best, 0.0);
  }

  // Scattered mode only (UseScatteredLayout before Resize); every entry is
  // initialised by one of these before it is read.
  void InitSet(Slot s, RelSet set) { Init(s, card_.Of(set)); }
  // The entry of a set first met as the join of two known sets (their
  // cardinalities combine in O(|smaller side|), cardinality.h).
  void InitJoin(Slot s, Slot left, RelSet left_set, Slot right, RelSet right_set) {
    Init(s, card_.OfJoin(left_set, set_card_[left], right_set, set_card_[right]));
  }
  void Relax(Slot s, Slot left, Slot right) {
    const double v = CoutJoin(set_card_[s], cost_[left], cost_[right]);
    if (v < cost_[s]) cost_[s] = v, left_[s] = left;
  }
  void RelaxLeafRight(Slot s, Slot left, RelationId) {
    const double v = CoutJoin(set_card_[s], cost_[left], 0.0);
    if (v < cost_[s]) cost_[s] = v, left_[s] = left;
  }

  // A hint that Relax will soon touch slot s as a join's result and slot
  // `operand` as an operand.
  void Prefetch(Slot s, Slot operand) const {
    __builtin_prefetch(&cost_[s], 1);
    __builtin_prefetch(&set_card_[s]);
    __builtin_prefetch(&cost_[operand]);
  }

  bool HasPlan(Slot s) const { return cost_[s] < kInf; }
  double Cost(Slot s) const { return cost_[s]; }
  // The slot of the best plan's left operand; kNoSlot for a leaf.
  Slot BestLeft(Slot s) const { return left_[s]; }

 private:
  void Init(Slot s, double card) {
    cost_[s] = kInf;
    left_[s] = kNoSlot;
    set_card_[s] = card;
  }

  const Cardinality& card_;
  bool scattered_ = false;
  bool unfilled_ = false;
  // Scattered mode leaves entries uninitialised until InitSet or InitJoin.
  std::vector<double, MemoAllocator<double>> cost_;
  std::vector<Slot, MemoAllocator<Slot>> left_;
  std::vector<double, MemoAllocator<double>> set_card_;  // scattered mode
  std::vector<double> leaf_card_;  // scattered mode: relation -> card({relation})
};

static_assert(SearchPolicy<CoutPolicy>);
static_assert(ScatteredLayout<CoutPolicy>);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_COST_COUT_POLICY_H_
