// Plan counting as a search policy: the same enumerators over the counting
// semiring (sum over splits of the product of the operands' counts). It
// counts ordered trees, (L R) and (R L) apart, so it is not symmetric.
// Counts are exact in uint64 (n! fits up to n = 20; (2n-2)!/(n-1)! up to
// n = 15). Single-threaded.
#ifndef SLICEPLAN_CORE_COST_COUNT_POLICY_H_
#define SLICEPLAN_CORE_COST_COUNT_POLICY_H_

#include <cstdint>
#include <vector>

#include "core/model/cardinality.h"
#include "core/search/search_policy.h"

namespace sliceplan {

class CountPolicy {
 public:
  static constexpr bool kSymmetric = false;
  // Dense enumeration may run on several threads at once (Offer reads finished slots, Finish writes
  // its own).
  static constexpr bool kParallelDense = true;
  static constexpr size_t kBytesPerSlot = sizeof(uint64_t);
  using Acc = uint64_t;

  explicit CountPolicy(const Cardinality&) {}

  void Resize(size_t slots) { count_.resize(slots, 0); }
  void InitLeaf(Slot s, RelationId) { count_[s] = 1; }

  Acc Begin(Slot, RelSet) const { return 0; }
  Acc Offer(Acc a, Slot left, Slot right) const { return a + count_[left] * count_[right]; }
  Acc Empty() const { return 0; }
  Acc Merge(Acc a, Acc b) const { return a + b; }
  Acc OfferLeafRight(Acc a, Slot left, RelationId) const { return a + count_[left]; }
  void Finish(Slot s, RelSet, const Acc& a) { count_[s] = a; }

  void InitSet(Slot s, RelSet) { count_[s] = 0; }
  void Relax(Slot s, Slot left, Slot right) { count_[s] += count_[left] * count_[right]; }
  void RelaxLeafRight(Slot s, Slot left, RelationId) { count_[s] += count_[left]; }

  bool HasPlan(Slot s) const { return count_[s] > 0; }
  uint64_t Count(Slot s) const { return count_[s]; }

 private:
  std::vector<uint64_t> count_;
};

static_assert(SearchPolicy<CountPolicy>);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_COST_COUNT_POLICY_H_
