// A query with non-inner joins seen by the enumerators: each split is
// joined as the conflict detector says (core/graph/join_conflicts.h), in
// the orders it allows; left-deep searches take a single relation on the
// right (docs/joins.md). Plain value; the detector must outlive it.
#ifndef SLICEPLAN_CORE_SEARCH_JOIN_FILTER_H_
#define SLICEPLAN_CORE_SEARCH_JOIN_FILTER_H_

#include "core/graph/join_conflicts.h"
#include "core/memo/slot.h"
#include "core/search/search_policy.h"

namespace sliceplan {

struct JoinFilter {
  const JoinConflicts* conflicts;
  bool cross_products;
  bool left_deep;
};

// Offers the split (left, right) of a direct memo's set (slot = set) as
// `joins` allows: a symmetric policy once, in an allowed order; an
// asymmetric one in each allowed order. Counts it in `pairs` when offered.
// REQUIRES: at = joins.conflicts->At(left | right).
template <SearchPolicy Policy>
[[gnu::always_inline]] inline typename Policy::Acc OfferJoined(
    const Policy& policy, typename Policy::Acc a, RelSet left, RelSet right,
    const JoinFilter& joins, const JoinConflicts::AtSet& at, uint64_t& pairs) {
  const JoinFit fit = joins.conflicts->Fit(at, left, right, joins.cross_products);
  if (!fit.ok()) return a;
  ++pairs;
  const Slot l = static_cast<Slot>(left), r = static_cast<Slot>(right);
  if constexpr (Policy::kSymmetric) {
    return fit.forward ? policy.Offer(a, l, r) : policy.Offer(a, r, l);
  } else {
    if (fit.forward) a = policy.Offer(a, l, r);
    if (fit.backward) a = policy.Offer(a, r, l);
    return a;
  }
}

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SEARCH_JOIN_FILTER_H_
