// Bushy enumeration over a slice's dense memo (cross products allowed).
//
// Visits slots in increasing order (a valid DP order, dense_layout.h) and
// offers exactly the admissible splits of each set: a set of block b splits
// into a pair of admissible block patterns (DenseLayout::BlockSplits) times
// any split of its low bits, so nothing is generated and then filtered. For
// a symmetric policy each unordered split is offered once. Per slice that is
//   3^f * 21^k - 2 * 2^f * 7^k + 1   ordered splits (slicing.md),
// half of it for a symmetric policy.
#ifndef SLICEPLAN_CORE_DENSE_BUSHY_H_
#define SLICEPLAN_CORE_DENSE_BUSHY_H_

#include <vector>

#include "absl/status/status.h"
#include "core/dense_layout.h"
#include "core/search_control.h"
#include "core/search_policy.h"
#include "core/search_stats.h"

namespace sliceplan {
namespace dense_bushy_internal {

// Offers every split of a set whose low bits are `low` into the block pair
// (lb, rb), given as slot bases; returns how many it offered.
template <SearchPolicy Policy>
uint64_t OfferBlockPair(const Policy& policy, typename Policy::Acc& acc,
                        Slot lb, Slot rb, bool left_empty, bool right_empty,
                        RelSet low) {
  const uint64_t subsets = uint64_t{1} << Size(low);
  const auto offer = [&](RelSet l) {
    policy.Offer(acc, lb + static_cast<Slot>(l), rb + static_cast<Slot>(low ^ l));
  };
  if (left_empty && right_empty) {  // both parts come from the low bits
    if constexpr (Policy::kSymmetric) {
      // The left part holds the lowest relation: each unordered split once.
      const RelSet lowest = LowestBit(low);
      const RelSet rest = low ^ lowest;
      for (RelSet sub = 0; sub != rest; sub = (sub - rest) & rest) offer(sub | lowest);
      return subsets / 2 - 1;
    } else {
      for (RelSet l = (0 - low) & low; l != low; l = (l - low) & low) offer(l);
      return subsets - 2;
    }
  }
  if (low == 0) {  // the high parts alone make the split
    if (left_empty || right_empty) return 0;
    offer(0);
    return 1;
  }
  if (left_empty) {  // left part non-empty: l != 0
    RelSet l = 0;
    do {
      l = (l - low) & low;
      offer(l);
    } while (l != low);
    return subsets - 1;
  }
  if (right_empty) {  // right part non-empty: l != low
    for (RelSet l = 0; l != low; l = (l - low) & low) offer(l);
    return subsets - 1;
  }
  RelSet l = 0;
  do {
    offer(l);
    l = (l - low) & low;
  } while (l != 0);
  return subsets;
}

}  // namespace dense_bushy_internal

// Runs the bushy DP over `layout` into `policy` (already Resize()d to
// layout.slot_count()). Returns CANCELLED or DEADLINE_EXCEEDED when
// `control` stops it; the memo is then incomplete. Adds to stats.splits.
template <SearchPolicy Policy>
absl::Status RunDenseBushy(const DenseLayout& layout, Policy& policy,
                           SearchControl& control, SearchStats& stats) {
  const int f = layout.free_bits();
  const uint64_t low_sets = uint64_t{1} << f;
  std::vector<BlockSplit> splits;
  for (uint64_t b = 0; b < layout.block_count(); ++b) {
    layout.BlockSplits(b, Policy::kSymmetric, splits);
    const RelSet high = layout.BlockPattern(b) << f;
    const Slot base = static_cast<Slot>(b << f);
    for (RelSet low = 0; low < low_sets; ++low) {
      const Slot s = base + static_cast<Slot>(low);
      const RelSet set = high | low;
      if (Size(set) <= 1) {
        if (set != 0) policy.InitLeaf(s, Lowest(set));
        continue;
      }
      auto acc = policy.Begin();
      uint64_t work = 0;
      for (const BlockSplit& bs : splits) {
        work += dense_bushy_internal::OfferBlockPair(
            policy, acc, static_cast<Slot>(bs.left << f),
            static_cast<Slot>(bs.right << f), bs.left == 0, bs.right == 0, low);
      }
      policy.Finish(s, set, acc);
      stats.splits += work;
      if (control.Tick(work + 1)) return control.status();
    }
  }
  return absl::OkStatus();
}

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_DENSE_BUSHY_H_
