// Left-deep enumeration over connected sets only, in two orders:
//   push (RunConnectedLeftDeep, any memo, hyperedges): a plan of S grows by
//     one base relation x at a time, and only when a predicate links x to S
//     (a predicate containing x that lies inside S u {x}). Sets are visited
//     by size, so every prefix is final before it is extended. A slice
//     keeps the steps whose result is admissible (prefixes are admissible
//     by construction);
//   pull (RunConnectedLeftDeepPull, a direct memo, binary predicates): each
//     connected set in mask order takes its best prefix from its own
//     splits (connected_strategy.h chooses it wherever it applies).
#ifndef SLICEPLAN_CORE_SEARCH_CONNECTED_LEFT_DEEP_H_
#define SLICEPLAN_CORE_SEARCH_CONNECTED_LEFT_DEEP_H_

#include <vector>

#include "absl/status/status.h"
#include "absl/strings/str_cat.h"
#include "core/graph/join_graph.h"
#include "core/memo/connected_memo.h"
#include "core/memo/direct_memo.h"
#include "core/model/cardinality.h"
#include "core/search/connected_pull.h"
#include "core/search/search_control.h"
#include "core/search/search_policy.h"
#include "core/search/search_stats.h"
#include "core/slicing/slice_constraints.h"

namespace sliceplan {

// Runs the connected left-deep DP into `policy` and `memo` (both empty).
// Errors as ConnectedPush::Run.
template <SearchPolicy Policy, class Memo>
absl::Status RunConnectedLeftDeep(int n, const JoinGraph& graph, const Cardinality& card,
                                  const SliceConstraints& constraints, Policy& policy, Memo& memo,
                                  SearchControl& control, SearchStats& stats) {
  std::vector<RelSet> level;
  const auto add = [&](RelSet s, Slot& slot, bool* added = nullptr) {
    auto found = AddConnectedSet(memo, policy, s, added);
    if (found.ok()) slot = *found;
    return found.status();
  };
  for (int v = 0; v < n; ++v) {
    const RelationId r{static_cast<uint8_t>(v)};
    if (!constraints.Admissible(Singleton(r))) continue;
    Slot slot = kNoSlot;
    if (auto st = add(Singleton(r), slot); !st.ok()) return st;
    policy.InitLeaf(slot, r);
    level.push_back(Singleton(r));
  }
  for (int size = 1; size < n && !level.empty(); ++size) {
    std::vector<RelSet> next;
    for (RelSet prefix : level) {
      const Slot from = *memo.Find(prefix);
      uint64_t work = 0;
      absl::Status status;
      ForEachMember(graph.Around(prefix), [&](RelationId x) {
        const RelSet grown = prefix | Singleton(x);
        if (!status.ok() || !constraints.Admissible(grown) ||
            !card.Connects(prefix, Singleton(x))) {
          return;
        }
        Slot to = kNoSlot;
        bool added = false;
        status = add(grown, to, &added);
        if (!status.ok()) return;
        if (added) next.push_back(grown);
        policy.RelaxLeafRight(to, from, x);
        ++work;
      });
      if (!status.ok()) return status;
      stats.splits += work;
      if (control.Tick(work + 1)) return control.status();
    }
    level = std::move(next);
  }
  return absl::OkStatus();
}

namespace connected_left_deep_internal {

// The split source of the pull order: each (S \ {r}, r) whose prefix is in
// the memo (connected, with a plan in this slice) and whose relation r
// shares a binary predicate with it, tested by one memo bit and one mask.
struct LeftDeepSplits {
  // A scattered policy's set cardinality comes from the best prefix's
  // cached one times the relation's factors where every predicate is
  // binary and in range (Cardinality::OfJoin; else a pass over the
  // predicates, as before); that pass per set was 40% of a 22-star's
  // search.
  static constexpr bool kScattered = true;
  static constexpr bool kOneWay = true;  // the right input is always the relation
  const JoinGraph& graph;
  const JoinFilter* joins = nullptr;  // non-inner joins: the prefix must be the left input

  template <SearchPolicy Policy>
  bool operator()(const Policy& policy, const DirectMemo& memo, SearchControl&, bool, RelSet set,
                  typename Policy::Acc& acc, uint64_t& pairs) const {
    const JoinConflicts::AtSet at =
        joins != nullptr ? joins->conflicts->At(set) : JoinConflicts::AtSet{};
    for (RelSet rest = set; rest != 0; rest &= rest - 1) {
      const RelSet bit = LowestBit(rest), prefix = set ^ bit;
      if (memo.Contains(prefix) && (graph.Adjacent(bit) & prefix) != 0) {
        if (joins != nullptr && !joins->conflicts->Fit(at, prefix, bit, false).forward) continue;
        acc = policy.OfferLeafRight(acc, static_cast<Slot>(prefix), Lowest(bit));
        ++pairs;
      }
    }
    return true;
  }
};

}  // namespace connected_left_deep_internal

// The same search in pull order over a direct memo: every connected set in
// increasing mask order (its prefixes come first) takes its best prefix
// from its own splits, so the reads of S \ {r} run in n sequential streams
// rather than scattered pushes. `memo` holds exactly the connected sets on
// entry, those with a plan in this slice on return; the policy is sized to
// memo.slot_count(), after UseScatteredLayout() where it has a scattered
// layout (search_policy.h). Binary predicates only (a hyperedge can join r to a
// prefix no binary predicate reaches). Errors: CANCELLED /
// DEADLINE_EXCEEDED.
template <SearchPolicy Policy>
absl::Status RunConnectedLeftDeepPull(const JoinGraph& graph, const SliceConstraints& constraints,
                                      Policy& policy, DirectMemo& memo, SearchControl& control,
                                      SearchStats& stats, const JoinFilter* joins = nullptr) {
  const bool done = connected_pull_internal::SolveWords(
      constraints, policy, memo, control, stats.splits, 0, memo.words().size(),
      connected_left_deep_internal::LeftDeepSplits{graph, joins});
  return done ? absl::OkStatus() : control.status();
}

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SEARCH_CONNECTED_LEFT_DEEP_H_
