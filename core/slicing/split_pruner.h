// Which splits of one relation set a slice can skip before reaching them.
//
// A slice constraint forbids the sets holding all of its trigger and none
// of its need (slice_constraints.h). For an admissible set S, only the
// constraints lying wholly inside S can forbid a part of a split of S (a
// trigger not inside S is in no part; a need outside S, with the trigger
// inside, would make S itself inadmissible). A split enumerator that
// grows the part c between a known floor c and a known ceiling S \ x
// (set_ccp_walk.h) knows the pattern of a constraint once c and x settle
// it: every part c* with c <= c* <= S \ x is forbidden when c holds the
// trigger and x the need, and every remainder S \ c* when x holds the
// trigger and c the need. Such a state is dead and all it would grow into.
// Cheap to build per set (k tests); immutable; thread-safe.
#ifndef SLICEPLAN_CORE_SLICING_SPLIT_PRUNER_H_
#define SLICEPLAN_CORE_SLICING_SPLIT_PRUNER_H_

#include <array>

#include "core/model/relation_set.h"
#include "core/slicing/slice_constraints.h"

namespace sliceplan {

class SplitPruner {
 public:
  // The constraints of `constraints` lying wholly inside `set`.
  // NOLINTNEXTLINE(cppcoreguidelines-pro-type-member-init): see the arrays.
  SplitPruner(const SliceConstraints& constraints, RelSet set) {
    for (const OrientedConstraint& c : constraints.constraints()) {
      if (((c.trigger | c.need) & ~set) == 0) {
        trigger_[count_] = c.trigger;
        need_[count_] = c.need;
        ++count_;
      }
    }
  }

  // True when no split of the state (c, x) is admissible on both sides:
  // some constraint is settled to forbid the part or the remainder.
  bool operator()(RelSet c, RelSet x) const {
    for (int i = 0; i < count_; ++i) {
      const RelSet t = trigger_[i], n = need_[i];
      if (((c & t) == t && (x & n) == n) || ((x & t) == t && (c & n) == n)) return true;
    }
    return false;
  }
  // No constraint lies inside the set: nothing is ever dead.
  bool empty() const { return count_ == 0; }

 private:
  // At most one constraint per two relations (pairs are the smallest).
  static constexpr int kMaxConstraints = kMaxRelations / 2;
  // Only [0, count_) is written: a set's pruner is built per set, and
  // clearing the arrays would cost more than its tests.
  std::array<RelSet, kMaxConstraints> trigger_;
  std::array<RelSet, kMaxConstraints> need_;
  int count_ = 0;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SLICING_SPLIT_PRUNER_H_
