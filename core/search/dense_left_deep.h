// Left-deep enumeration over a slice's dense memo (cross products allowed).
//
// A left-deep plan of S joins a plan of S \ {x} with the base relation x, so
// each admissible set is reached from every admissible S \ {x}: a free x
// stays in the same block (slot minus 2^x), a constrained x moves to the
// block DenseLayout::BlockRemovals names. Per slice that is
//   f * 2^(f-1) * 3^k + 2k * 3^(k-1) * 2^f - (f + k)
// (set, relation) pairs: all (S, x) with S \ {x} admissible and non-empty.
#ifndef SLICEPLAN_CORE_SEARCH_DENSE_LEFT_DEEP_H_
#define SLICEPLAN_CORE_SEARCH_DENSE_LEFT_DEEP_H_

#include <vector>

#include "absl/status/status.h"
#include "core/search/search_control.h"
#include "core/search/search_policy.h"
#include "core/search/search_stats.h"
#include "core/slicing/dense_layout.h"

namespace sliceplan {

// As RunDenseBushy, for left-deep plans.
template <SearchPolicy Policy>
absl::Status RunDenseLeftDeep(const DenseLayout& layout, Policy& policy, SearchControl& control,
                              SearchStats& stats) {
  const int f = layout.free_bits();
  const uint64_t low_sets = uint64_t{1} << f;
  std::vector<BlockRemoval> removals;
  for (uint64_t b = 0; b < layout.block_count(); ++b) {
    layout.BlockRemovals(b, removals);
    const RelSet high = layout.BlockPattern(b) << f;
    const Slot base = static_cast<Slot>(b << f);
    for (RelSet low = 0; low < low_sets; ++low) {
      const Slot s = base + static_cast<Slot>(low);
      const RelSet set = high | low;
      if (Size(set) <= 1) {
        if (set != 0) policy.InitLeaf(s, Lowest(set));
        continue;
      }
      auto acc = policy.Begin(s, set);
      for (RelSet rest = low; rest != 0; rest &= rest - 1) {
        const RelSet bit = LowestBit(rest);
        acc = policy.OfferLeafRight(acc, s - static_cast<Slot>(bit), Lowest(bit));
      }
      for (const BlockRemoval& rm : removals) {
        acc =
            policy.OfferLeafRight(acc, static_cast<Slot>((rm.rest_block << f) | low), rm.relation);
      }
      policy.Finish(s, set, acc);
      const uint64_t work = static_cast<uint64_t>(Size(low)) + removals.size();
      stats.splits += work;
      if (control.Tick(work + 1)) return control.status();
    }
  }
  return absl::OkStatus();
}

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SEARCH_DENSE_LEFT_DEEP_H_
