// Bushy enumeration over a slice's dense memo (cross products allowed).
//
// Visits slots in increasing order (a valid DP order, dense_layout.h) and
// offers exactly the admissible splits of each set: a set of block b splits
// into a pair of admissible block patterns (DenseLayout::BlockSplits) times
// any split of its low bits, so nothing is generated and then filtered. For
// a symmetric policy each unordered split is offered once. Per slice that is
//   3^f * 21^k - 2 * 2^f * 7^k + 1   ordered splits (docs/slicing.md),
// half of it for a symmetric policy.
#ifndef SLICEPLAN_CORE_SEARCH_DENSE_BUSHY_H_
#define SLICEPLAN_CORE_SEARCH_DENSE_BUSHY_H_

#include <algorithm>
#include <concepts>
#include <vector>

#include "absl/status/status.h"
#include "core/search/level_threads.h"
#include "core/search/search_control.h"
#include "core/search/search_policy.h"
#include "core/search/search_stats.h"
#include "core/slicing/dense_layout.h"

namespace sliceplan {
namespace dense_bushy_internal {

// Offers to `acc` the split (l, low ^ l) of the low bits into the blocks
// with slot bases (lb, rb); returns the accumulator. REQUIRES: l within low.
template <SearchPolicy Policy>
[[gnu::always_inline]] inline typename Policy::Acc OfferSplit(const Policy& policy,
                                                              typename Policy::Acc acc, Slot lb,
                                                              Slot rb, RelSet low, RelSet l) {
  return policy.Offer(acc, lb + static_cast<Slot>(l), rb + static_cast<Slot>(low ^ l));
}

// Offers (lb + l, rb + (low ^ l)) for every l within `low` (not empty), in
// increasing order, without l = 0 when skip_empty and without l = low when
// skip_full: the subsets without low's lowest relation go to one
// accumulator and those with it to another.
template <SearchPolicy Policy>
requires TwoChains<Policy>
[[gnu::always_inline]] inline typename Policy::Acc OfferSubsetsTwoChains(
    const Policy& policy, typename Policy::Acc a, Slot lb, Slot rb, RelSet low, bool skip_empty,
    bool skip_full) {
  const RelSet bit = LowestBit(low), half = low ^ bit;
  auto b = policy.Empty();
  // Inlined by force: left to itself GCC 12 keeps this lambda out of
  // line, a call per split of every sliced search (docs/benchmarks.md).
  const auto offer = [&](typename Policy::Acc acc, RelSet l) __attribute__((always_inline)) {
    return policy.Offer(acc, lb + static_cast<Slot>(l), rb + static_cast<Slot>(low ^ l));
  };
  if (!skip_empty) a = offer(a, 0);
  if (half == 0) {  // low is one relation: the splits are l = 0 and l = low
    if (!skip_full) b = offer(b, low);
    return policy.Merge(a, b);
  }
  b = offer(b, bit);
  RelSet sub = (0 - half) & half;
  for (; sub != half; sub = (sub - half) & half) {
    a = offer(a, sub);
    b = offer(b, sub | bit);
  }
  a = offer(a, half);
  if (!skip_full) b = offer(b, low);
  return policy.Merge(a, b);
}

// Offers every split of a set whose low bits are `low` into the block pair
// (lb, rb), given as slot bases; returns how many it offered. The
// accumulator is taken and returned by value so that it stays in registers
// (through a reference GCC spills it and chains every split on a
// store-to-load round trip, three times the time per split).
template <SearchPolicy Policy>
[[gnu::always_inline]] inline typename Policy::Acc OfferBlockPair(const Policy& policy,
                                                                  typename Policy::Acc a, Slot lb,
                                                                  Slot rb, bool left_empty,
                                                                  bool right_empty, RelSet low,
                                                                  uint64_t& work) {
  const uint64_t subsets = uint64_t{1} << Size(low);
  if (left_empty && right_empty) {  // both parts come from the low bits
    if constexpr (Policy::kSymmetric) {
      // The left part holds the lowest relation: each unordered split once.
      const RelSet lowest = LowestBit(low);
      const RelSet rest = low ^ lowest;
      if constexpr (TwoChains<Policy>) {
        // Two accumulators, one for the subsets without rest's lowest
        // relation and one for those with it, so the min of one split does
        // not wait for the previous split's.
        if (rest != 0) {
          const RelSet bit = LowestBit(rest);
          const RelSet half = rest ^ bit;
          auto b = policy.Empty();
          RelSet sub = 0;
          for (; sub != half; sub = (sub - half) & half) {
            a = OfferSplit(policy, a, lb, rb, low, sub | lowest);
            b = OfferSplit(policy, b, lb, rb, low, sub | bit | lowest);
          }
          // sub = half; half | bit = rest is no split
          a = OfferSplit(policy, a, lb, rb, low, sub | lowest);
          a = policy.Merge(a, b);
        }
      } else {
        for (RelSet sub = 0; sub != rest; sub = (sub - rest) & rest) {
          a = OfferSplit(policy, a, lb, rb, low, sub | lowest);
        }
      }
      work += subsets / 2 - 1;
    } else {
      if constexpr (TwoChains<Policy>) {
        if (low != 0) a = OfferSubsetsTwoChains(policy, a, lb, rb, low, true, true);
      } else {
        for (RelSet l = (0 - low) & low; l != low; l = (l - low) & low) {
          a = OfferSplit(policy, a, lb, rb, low, l);
        }
      }
      work += subsets - 2;
    }
    return a;
  }
  if (low == 0) {  // the high parts alone make the split
    if (!left_empty && !right_empty) {
      a = OfferSplit(policy, a, lb, rb, low, RelSet{0});
      work += 1;
    }
    return a;
  }
  if constexpr (TwoChains<Policy>) {
    // left part non-empty: l != 0; right part non-empty: l != low
    a = OfferSubsetsTwoChains(policy, a, lb, rb, low, left_empty, right_empty);
    work += subsets - (left_empty ? 1 : 0) - (right_empty ? 1 : 0);
    return a;
  }
  if (left_empty) {  // left part non-empty: l != 0
    RelSet l = 0;
    do {
      l = (l - low) & low;
      a = OfferSplit(policy, a, lb, rb, low, l);
    } while (l != low);
    work += subsets - 1;
  } else if (right_empty) {  // right part non-empty: l != low
    for (RelSet l = 0; l != low; l = (l - low) & low) a = OfferSplit(policy, a, lb, rb, low, l);
    work += subsets - 1;
  } else {
    RelSet l = 0;
    do {
      a = OfferSplit(policy, a, lb, rb, low, l);
      l = (l - low) & low;
    } while (l != 0);
    work += subsets;
  }
  return a;
}

// Offers the splits of a set with low bits `low` into every block pair of
// `inner` (both high parts non-empty, so any l from the empty set to all of
// `low` goes), the pair loop innermost. When the low part is small and the
// pairs many (high k), this beats a short subset loop per pair.
template <SearchPolicy Policy>
[[gnu::always_inline]] inline typename Policy::Acc OfferInnerPairsByLow(
    const Policy& policy, typename Policy::Acc a, const std::vector<std::pair<Slot, Slot>>& inner,
    RelSet low) {
  RelSet l = 0;
  if constexpr (TwoChains<Policy>) {
    auto b = policy.Empty();
    const size_t even = inner.size() & ~size_t{1};
    do {
      const Slot left = static_cast<Slot>(l), right = static_cast<Slot>(low ^ l);
      for (size_t i = 0; i < even; i += 2) {
        a = policy.Offer(a, inner[i].first + left, inner[i].second + right);
        b = policy.Offer(b, inner[i + 1].first + left, inner[i + 1].second + right);
      }
      if (even != inner.size())
        a = policy.Offer(a, inner[even].first + left, inner[even].second + right);
      l = (l - low) & low;
    } while (l != 0);
    return policy.Merge(a, b);
  } else {
    do {
      const Slot left = static_cast<Slot>(l), right = static_cast<Slot>(low ^ l);
      for (const auto& [lb, rb] : inner) a = policy.Offer(a, lb + left, rb + right);
      l = (l - low) & low;
    } while (l != 0);
    return a;
  }
}

// A block's splits into block pairs: those with an empty high part, and
// the slot bases of those with both high parts non-empty.
struct BlockPairs {
  std::vector<BlockSplit> splits;  // scratch
  std::vector<BlockSplit> edge;
  std::vector<std::pair<Slot, Slot>> inner;
  int f = 0;

  void Load(const DenseLayout& layout, uint64_t b, bool symmetric) {
    f = layout.free_bits();
    layout.BlockSplits(b, symmetric, splits);
    edge.clear();
    inner.clear();
    for (const BlockSplit& bs : splits) {
      if (bs.left == 0 || bs.right == 0) {
        edge.push_back(bs);
      } else {
        inner.emplace_back(static_cast<Slot>(bs.left << f), static_cast<Slot>(bs.right << f));
      }
    }
  }
};

// Solves the set (high | low) at slot base + low: a leaf is initialised,
// a larger set gets every split of its block pairs. Returns the splits.
template <SearchPolicy Policy>
[[gnu::always_inline]] inline uint64_t SolveSet(Policy& policy, const BlockPairs& pairs, Slot base,
                                                RelSet high, RelSet low) {
  const Slot s = base + static_cast<Slot>(low);
  const RelSet set = high | low;
  if (Size(set) <= 1) {
    if (set != 0) policy.InitLeaf(s, Lowest(set));
    return 0;
  }
  const int f = pairs.f;
  auto acc = policy.Begin(s, set);
  uint64_t work = 0;
  for (const BlockSplit& bs : pairs.edge) {
    acc = OfferBlockPair(policy, acc, static_cast<Slot>(bs.left << f),
                         static_cast<Slot>(bs.right << f), bs.left == 0, bs.right == 0, low, work);
  }
  const uint64_t subsets = uint64_t{1} << Size(low);
  if (pairs.inner.size() > subsets) {
    acc = OfferInnerPairsByLow(policy, acc, pairs.inner, low);
    work += pairs.inner.size() * subsets;
  } else {
    for (const auto& [lb, rb] : pairs.inner) {
      acc = OfferBlockPair(policy, acc, lb, rb, false, false, low, work);
    }
  }
  policy.Finish(s, set, acc);
  return work;
}

}  // namespace dense_bushy_internal

// Runs the bushy DP over `layout` into `policy` (already Resize()d to
// layout.slot_count()). Returns CANCELLED or DEADLINE_EXCEEDED when
// `control` stops it; the memo is then incomplete. Adds to stats.splits.
template <SearchPolicy Policy>
absl::Status RunDenseBushyNoFreeBits(const DenseLayout& layout, Policy& policy,
                                     SearchControl& control, SearchStats& stats);

template <SearchPolicy Policy>
absl::Status RunDenseBushy(const DenseLayout& layout, Policy& policy, SearchControl& control,
                           SearchStats& stats) {
  using dense_bushy_internal::SolveSet;
  const int f = layout.free_bits();
  if (f == 0) return RunDenseBushyNoFreeBits(layout, policy, control, stats);
  const uint64_t low_sets = uint64_t{1} << f;
  dense_bushy_internal::BlockPairs pairs;
  for (uint64_t b = 0; b < layout.block_count(); ++b) {
    pairs.Load(layout, b, Policy::kSymmetric);
    const RelSet high = layout.BlockPattern(b) << f;
    const Slot base = static_cast<Slot>(b << f);
    for (RelSet low = 0; low < low_sets; ++low) {
      const uint64_t work = SolveSet(policy, pairs, base, high, low);
      stats.splits += work;
      if (control.Tick(work + 1)) return control.status();
    }
  }
  return absl::OkStatus();
}

// The same search on `threads` threads sharing the memo. An item is one
// block and one value c of the free relations' top h bits: its sets are
// the block's slots with that prefix, solved in slot order as above. A
// set's subsets lie in its own item (earlier in it) or in an item of a
// sub-pattern and a sub-prefix, so items of the same size (pattern plus
// prefix relations) are independent and run level by level
// (level_threads.h) while each keeps the serial loop's memory order. h is
// chosen for at least 256 items a thread; the largest item is then a small
// share of the work ((2/3)^h unsliced). The policy must allow Offer/Finish
// on different slots at once (kParallelDense). Same memo, splits and
// optimum as RunDenseBushy.
template <SearchPolicy Policy>
absl::Status RunDenseBushyThreaded(const DenseLayout& layout, Policy& policy,
                                   const SearchControl& control, SearchStats& stats, int threads) {
  static_assert(Policy::kParallelDense);
  using dense_bushy_internal::SolveSet;
  const int f = layout.free_bits();
  const uint64_t blocks = layout.block_count();
  int h = 0;  // prefix bits per item
  while (h < f && (blocks << h) < 256 * static_cast<uint64_t>(threads)) ++h;
  const int g = f - h;  // bits walked inside an item
  int top_level = h;
  for (uint64_t b = 0; b < blocks; ++b) {
    top_level = std::max(top_level, Size(layout.BlockPattern(b)) + h);
  }
  struct Local {
    uint64_t block = ~uint64_t{0};
    dense_bushy_internal::BlockPairs pairs;
    uint64_t splits = 0;
  };
  std::vector<Local> locals(threads);
  const auto status = RunLevels(
      0, top_level, threads, control, [&](int) { return blocks << h; },
      [&](int level, uint64_t item, int t, SearchControl& ctl) {
        const uint64_t b = item >> h;
        const RelSet prefix = item & ((uint64_t{1} << h) - 1);
        if (Size(layout.BlockPattern(b)) + Size(prefix) != level) return true;
        Local& local = locals[t];
        if (local.block != b) {
          local.pairs.Load(layout, b, Policy::kSymmetric);
          local.block = b;
        }
        const RelSet high = layout.BlockPattern(b) << f;
        const Slot base = static_cast<Slot>(b << f);
        const RelSet first = prefix << g, end = (prefix + 1) << g;
        for (RelSet low = first; low < end; ++low) {
          const uint64_t work = SolveSet(policy, local.pairs, base, high, low);
          local.splits += work;
          if (ctl.Tick(work + 1)) return false;
        }
        return true;
      });
  for (const Local& local : locals) stats.splits += local.splits;
  return status;
}

// With no free relations every block holds one set, so its block splits
// would be stored and read once: they are generated and offered in one
// pass instead (a block pair with an empty side is no split here: the
// empty high pattern is the empty set), much faster than storing them
// (docs/benchmarks.md).
template <SearchPolicy Policy>
absl::Status RunDenseBushyNoFreeBits(const DenseLayout& layout, Policy& policy,
                                     SearchControl& control, SearchStats& stats) {
  for (uint64_t b = 0; b < layout.block_count(); ++b) {
    const Slot s = static_cast<Slot>(b);
    const RelSet set = layout.BlockPattern(b);
    if (Size(set) <= 1) {
      if (set != 0) policy.InitLeaf(s, Lowest(set));
      continue;
    }
    struct Fold {
      typename Policy::Acc acc;
      uint64_t work;
    };
    const Fold done = layout.FoldBlockSplits(b, Policy::kSymmetric, Fold{policy.Begin(s, set), 0},
                                             [&policy](Fold f, uint32_t left, uint32_t right) {
                                               if (left != 0 && right != 0)
                                                 f = {policy.Offer(f.acc, left, right), f.work + 1};
                                               return f;
                                             });
    policy.Finish(s, set, done.acc);
    stats.splits += done.work;
    if (control.Tick(done.work + 1)) return control.status();
  }
  return absl::OkStatus();
}

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SEARCH_DENSE_BUSHY_H_
