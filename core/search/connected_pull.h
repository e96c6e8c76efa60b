// Bushy enumeration over connected sets in pull order: every connected set
// S in increasing mask order (a valid DP order: a proper subset is a
// smaller number) is solved from its own splits into S1 (holding S's
// lowest relation) and S2 = S \ S1, over a direct memo that holds exactly
// the connected sets, the cost of the splits kept in registers as in the
// dense kernel (dense_bushy.h), and S's entry written once. The splits come
// from one of two sources:
//   every split:  all 2^(|S|-1) - 1 splits tested by two memo bits; a split
//                 of a connected set into two connected sets is joined by
//                 some predicate (else S would fall apart), so these are
//                 DPhyp's csg-cmp pairs exactly, at the dense kernel's cost
//                 per tested split; for dense graphs, where most splits
//                 are csg-cmp pairs (connected_strategy.h chooses by sampling);
//   set ccps:     only the csg-cmp pairs, found from S by the set ccp
//                 walk (set_ccp_walk.h); for the other graphs.
// Either way a set's entry depends only on smaller sets, so the sets of
// one prefix size can be solved on several threads at once. Binary
// predicates only: with a hyperedge, a set can be connected while a split
// of it is joined by none.
#ifndef SLICEPLAN_CORE_SEARCH_CONNECTED_PULL_H_
#define SLICEPLAN_CORE_SEARCH_CONNECTED_PULL_H_

#include "absl/status/status.h"
#include "core/graph/set_ccp_walk.h"
#include "core/memo/direct_memo.h"
#include "core/search/join_filter.h"
#include "core/search/level_threads.h"
#include "core/search/search_control.h"
#include "core/search/search_policy.h"
#include "core/search/search_stats.h"
#include "core/slicing/slice_constraints.h"

namespace sliceplan {

namespace connected_pull_internal {

// Splits tested between two looks at the control inside one large set.
inline constexpr uint64_t kCheckEvery = uint64_t{1} << 20;

// Offers left x right (and right x left for an asymmetric policy).
template <SearchPolicy Policy>
typename Policy::Acc OfferBoth(const Policy& policy, typename Policy::Acc a, RelSet left,
                               RelSet right) {
  a = policy.Offer(a, static_cast<Slot>(left), static_cast<Slot>(right));
  if constexpr (!Policy::kSymmetric) {
    a = policy.Offer(a, static_cast<Slot>(right), static_cast<Slot>(left));
  }
  return a;
}

// The split source of the every-split pull search: every split of the set
// tested by two memo bits.
struct EverySplit {
  static constexpr bool kScattered = false;
  static constexpr bool kOneWay = false;  // a split offered both ways counts twice
  const JoinFilter* joins = nullptr;      // non-inner joins: each split as it allows
  // Offers `set`'s splits whose parts are both in `memo` into acc,
  // counting them in `pairs`. False once `control` stopped. (`sliced`:
  // the memo may lack connected sets; the bits are tested either way.)
  template <SearchPolicy Policy>
  bool operator()(const Policy& policy, const DirectMemo& memo, SearchControl& control,
                  bool /*sliced*/, RelSet set, typename Policy::Acc& acc, uint64_t& pairs) const {
    const RelSet lowest = LowestBit(set);
    const RelSet rest = set ^ lowest;
    uint64_t tested = 0;
    const JoinConflicts::AtSet at =
        joins != nullptr ? joins->conflicts->At(set) : JoinConflicts::AtSet{};
    // Offers the split with left part x | lowest if both parts are sets.
    const auto test = [&](typename Policy::Acc a, RelSet x) {
      const RelSet left = x | lowest, right = set ^ left;
      if (memo.Contains(left) && memo.Contains(right)) {
        if (joins != nullptr) return OfferJoined(policy, a, left, right, *joins, at, pairs);
        a = OfferBoth(policy, a, left, right);
        ++pairs;
      }
      return a;
    };
    if constexpr (TwoChains<Policy>) {
      // The subsets of rest without its lowest relation to one
      // accumulator, with it to another (dense_bushy.h); rest itself is
      // no split.
      const RelSet bit = LowestBit(rest), half = rest ^ bit;
      auto other = policy.Empty();
      for (RelSet sub = 0;; sub = (sub - half) & half) {
        acc = test(acc, sub);
        if (sub == half) break;
        other = test(other, sub | bit);
        if ((tested += 2) >= kCheckEvery) {
          tested = 0;
          if (control.Tick(SearchControl::kTickWork)) return false;
        }
      }
      acc = policy.Merge(acc, other);
    } else {
      for (RelSet sub = 0; sub != rest; sub = (sub - rest) & rest) {
        acc = test(acc, sub);
        if (++tested == kCheckEvery) {
          tested = 0;
          if (control.Tick(SearchControl::kTickWork)) return false;
        }
      }
    }
    return true;
  }
};

// The split source of the pull search over set ccps: the set's csg-cmp pairs
// walked from the set (set_ccp_walk.h), offered when both parts
// have a plan in this slice. (Costing the pairs in batches of 256, so that
// their scattered loads overlap, measured slower: docs/benchmarks.md.)
struct WalkedSplits {
  // A scattered policy caches each set's cardinality (search_policy.h).
  static constexpr bool kScattered = true;
  static constexpr bool kOneWay = false;
  const SetCcpWalk& walk;
  const JoinFilter* joins = nullptr;  // non-inner joins: each pair as it allows

  // Flattened: with the walk and the offers called, the accumulator lives
  // in memory across the pairs (random 22-relation graph 0.117 s against
  // 0.105 s inlined, a 22-star 0.124 s against 0.117 s).
  template <SearchPolicy Policy>
  [[gnu::flatten]] bool operator()(const Policy& policy, const DirectMemo& memo,
                                   SearchControl& control, bool sliced, RelSet set,
                                   typename Policy::Acc& acc, uint64_t& pairs) const {
    auto a = acc;
    uint64_t offered = 0, walked = 0;
    const JoinConflicts::AtSet at =
        joins != nullptr ? joins->conflicts->At(set) : JoinConflicts::AtSet{};
    const bool done = walk.ForEach(set, [&](RelSet left, RelSet right) {
      // Unsliced and inner, every connected set has a plan: no bit to test.
      if (joins != nullptr) {
        if (memo.Contains(left) && memo.Contains(right)) {
          a = OfferJoined(policy, a, left, right, *joins, at, offered);
        }
      } else if (!sliced || (memo.Contains(left) && memo.Contains(right))) {
        a = OfferBoth(policy, a, left, right);
        ++offered;
      }
      if (++walked == kCheckEvery) {
        walked = 0;
        if (control.Tick(SearchControl::kTickWork)) return false;
      }
      return true;
    });
    acc = a;
    pairs += offered;
    return done;
  }
};

// Solves the sets of memo words [first, last) in increasing order from the
// splits `source` offers, adding them to `splits`. False once `control`
// stopped.
template <SearchPolicy Policy, class Source>
bool SolveWords(const SliceConstraints& constraints, Policy& policy, DirectMemo& memo,
                SearchControl& control, uint64_t& splits, size_t first, size_t last,
                const Source& source) {
  constexpr bool kScattered = Source::kScattered && ScatteredLayout<Policy>;
  const bool sliced = !constraints.constraints().empty();
  const std::vector<uint64_t>& words = memo.words();
  // Counted here and added once: threads' totals share a cache line.
  uint64_t work_done = 0;
  const auto stop = [&] {
    splits += work_done;
    return false;
  };
  // With every constrained relation above bit 5 (the dense layout's
  // numbering puts them on top), the 64 sets of a word share their
  // constrained members, so one test settles the word.
  const bool by_word = sliced && (constraints.constrained() & 63) == 0;
  for (size_t w = first; w < last; ++w) {
    if (by_word && words[w] != 0 && !constraints.Admissible(RelSet{w} << 6)) {
      memo.EraseWord(w);
      continue;
    }
    for (uint64_t bits = words[w]; bits != 0; bits &= bits - 1) {
      const RelSet set = (RelSet{w} << 6) | static_cast<RelSet>(std::countr_zero(bits));
      if (sliced && !by_word && !constraints.Admissible(set)) {
        memo.Erase(set);
        continue;
      }
      const Slot s = static_cast<Slot>(set);
      if ((set & (set - 1)) == 0) {  // one relation
        if constexpr (kScattered) policy.InitSet(s, set);
        policy.InitLeaf(s, Lowest(set));
        continue;
      }
      auto acc = policy.Begin(s, set);
      uint64_t pairs = 0;
      if (!source(policy, memo, control, sliced, set, acc, pairs)) return stop();
      if (pairs == 0) {
        memo.Erase(set);
        continue;
      }
      if constexpr (kScattered) {
        policy.FinishJoin(s, set, acc);
      } else {
        policy.Finish(s, set, acc);
      }
      const uint64_t work = Source::kOneWay || Policy::kSymmetric ? pairs : 2 * pairs;
      work_done += work;
      if (control.Tick(work + 1)) return stop();
    }
  }
  splits += work_done;
  return true;
}

// SolveWords with the pairs `walk` finds, or (none) every split tested.
template <SearchPolicy Policy>
bool SolveWordsFrom(const SetCcpWalk* walk, const SliceConstraints& constraints, Policy& policy,
                    DirectMemo& memo, SearchControl& control, uint64_t& splits, size_t first,
                    size_t last, const JoinFilter* joins) {
  if (walk != nullptr) {
    return SolveWords(constraints, policy, memo, control, splits, first, last,
                      WalkedSplits{*walk, joins});
  }
  return SolveWords(constraints, policy, memo, control, splits, first, last, EverySplit{joins});
}

}  // namespace connected_pull_internal

// Runs the search into `policy` (sized to memo.slot_count(); a policy with
// a scattered layout must have had UseScatteredLayout() before it was
// sized, walk given: search_policy.h). `memo` holds
// exactly the connected sets on entry; on return it holds those with a plan
// in this slice (inadmissible sets and sets with no admissible split are
// taken out as they are met). Errors: CANCELLED / DEADLINE_EXCEEDED.
// `walk`, when given, offers each set's csg-cmp pairs instead of testing
// every split (the pull search over set ccps; binary predicates only).
template <SearchPolicy Policy>
absl::Status RunConnectedPull(const SliceConstraints& constraints, Policy& policy, DirectMemo& memo,
                              SearchControl& control, SearchStats& stats,
                              const SetCcpWalk* walk = nullptr, const JoinFilter* joins = nullptr) {
  const bool done = connected_pull_internal::SolveWordsFrom(
      walk, constraints, policy, memo, control, stats.splits, 0, memo.words().size(), joins);
  return done ? absl::OkStatus() : control.status();
}

// The same on `threads` threads sharing the memo, as RunDenseBushyThreaded
// does it: an item is the sets with one value of the top h relation bits
// (whole 64-set words, so no two threads write one word), items of the
// same prefix size run at once, each in mask order. REQUIRES: n >= 7, a
// policy with kParallelDense.
template <SearchPolicy Policy>
absl::Status RunConnectedPullThreaded(int n, const SliceConstraints& constraints, Policy& policy,
                                      DirectMemo& memo, const SearchControl& control,
                                      SearchStats& stats, int threads,
                                      const SetCcpWalk* walk = nullptr,
                                      const JoinFilter* joins = nullptr) {
  static_assert(Policy::kParallelDense);
  int h = 0;  // prefix bits per item
  while (h < n - 6 && (uint64_t{1} << h) < 256 * static_cast<uint64_t>(threads)) ++h;
  const int word_bits = n - h - 6;  // log2 of an item's words
  std::vector<uint64_t> splits(threads, 0);
  const auto status = RunLevels(
      0, h, threads, control, [&](int) { return uint64_t{1} << h; },
      [&](int level, uint64_t prefix, int t, SearchControl& ctl) {
        if (Size(prefix) != level) return true;
        return connected_pull_internal::SolveWordsFrom(walk, constraints, policy, memo, ctl,
                                                       splits[t], prefix << word_bits,
                                                       (prefix + 1) << word_bits, joins);
      });
  for (uint64_t s : splits) stats.splits += s;
  return status;
}

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SEARCH_CONNECTED_PULL_H_
