// Bushy enumeration over connected sets for dense join graphs: every
// connected set S in increasing mask order (a valid DP order: a proper
// subset is a smaller number), every split of S into S1 (holding S's lowest
// relation) and S2 = S \ S1 tested by two bits of a direct memo that holds
// exactly the connected sets, the cost of the splits kept in registers as
// in the dense kernel (dense_bushy.h). A split of a connected set into two
// connected sets is joined by some predicate (else S would fall apart), so
// this offers exactly DPhyp's csg-cmp pairs, at the dense kernel's cost per
// tested split. It tests 2^(|S|-1) splits of each S where DPhyp visits only
// the pairs, so it wins only when most splits are pairs (slice_search.h
// chooses by sampling). Binary predicates only: with a hyperedge, a set
// can be connected while a split of it is joined by none.
#ifndef SLICEPLAN_CORE_CONNECTED_SUBSETS_H_
#define SLICEPLAN_CORE_CONNECTED_SUBSETS_H_

#include "absl/status/status.h"
#include "core/direct_memo.h"
#include "core/search_control.h"
#include "core/search_policy.h"
#include "core/search_stats.h"
#include "core/slice_constraints.h"

namespace sliceplan {

// Runs the search into `policy` (sized to memo.slot_count()). `memo` holds
// exactly the connected sets on entry; on return it holds those with a plan
// in this slice (inadmissible sets and sets with no admissible split are
// taken out as they are met). Errors: CANCELLED / DEADLINE_EXCEEDED.
template <SearchPolicy Policy>
absl::Status RunConnectedSubsets(const SliceConstraints& constraints, Policy& policy,
                                 DirectMemo& memo, SearchControl& control, SearchStats& stats) {
  // Splits tested between two looks at the control inside one large set.
  constexpr uint64_t kCheckEvery = uint64_t{1} << 20;
  const bool sliced = !constraints.constraints().empty();
  const std::vector<uint64_t>& words = memo.words();
  for (size_t w = 0; w < words.size(); ++w) {
    for (uint64_t bits = words[w]; bits != 0; bits &= bits - 1) {
      const RelSet set = (RelSet{w} << 6) | static_cast<RelSet>(std::countr_zero(bits));
      if (sliced && !constraints.Admissible(set)) {
        memo.Erase(set);
        continue;
      }
      const Slot s = static_cast<Slot>(set);
      if (Size(set) == 1) {
        policy.InitLeaf(s, Lowest(set));
        continue;
      }
      const RelSet lowest = LowestBit(set);
      const RelSet rest = set ^ lowest;
      auto acc = policy.Begin(s, set);
      uint64_t pairs = 0, tested = 0;
      for (RelSet sub = 0; sub != rest; sub = (sub - rest) & rest) {
        const RelSet left = sub | lowest, right = set ^ left;
        if (memo.Contains(left) && memo.Contains(right)) {
          acc = policy.Offer(acc, static_cast<Slot>(left), static_cast<Slot>(right));
          if constexpr (!Policy::kSymmetric) {
            acc = policy.Offer(acc, static_cast<Slot>(right), static_cast<Slot>(left));
          }
          ++pairs;
        }
        if (++tested == kCheckEvery) {
          tested = 0;
          if (control.Tick(SearchControl::kTickWork)) return control.status();
        }
      }
      if (pairs == 0) {
        memo.Erase(set);
        continue;
      }
      policy.Finish(s, set, acc);
      const uint64_t work = Policy::kSymmetric ? pairs : 2 * pairs;
      stats.splits += work;
      if (control.Tick(work + 1)) return control.status();
    }
  }
  return absl::OkStatus();
}

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_CONNECTED_SUBSETS_H_
