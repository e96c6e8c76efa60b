// The dense memo layout of one slice in the cross-product space.
//
// The relations are renumbered so that the f free relations take the low
// bits 0..f-1 and constraint j takes bits f + w*j .. f + w*j + w-1 (w = 2 for
// pairs, 3 for triples), in the digit order of OrientedConstraint. A set's
// high bits then form k digits of w bits; each digit has R allowed patterns
// (R = 3 for pairs, 7 for triples), numbered so that a sub-pattern gets a
// smaller number. The slot of an admissible set S is
//     slot(S) = (low f bits of S) + 2^f * block(high bits of S),
// with block() the mixed-radix number of the digits. So:
//   1. slots are dense: [0, R^k * 2^f) holds exactly the admissible sets;
//   2. a subset's slot is smaller than its superset's, so counting slots up
//      is a valid dynamic-programming order;
//   3. the sets of one block share their high bits and differ in the low
//      ones, so a split walks whole blocks with plain subset arithmetic.
// Immutable after construction; thread-safe.
#ifndef SLICEPLAN_CORE_DENSE_LAYOUT_H_
#define SLICEPLAN_CORE_DENSE_LAYOUT_H_

#include <cstdint>
#include <vector>

#include "core/relation_set.h"
#include "core/slice_constraints.h"

namespace sliceplan {

using Slot = uint32_t;
inline constexpr Slot kNoSlot = ~Slot{0};

// A pair of blocks whose patterns split a block's pattern into two
// admissible, disjoint parts.
struct BlockSplit {
  uint32_t left;
  uint32_t right;
};

// A constrained relation whose removal from a block's pattern leaves an
// admissible pattern (left-deep plans remove one relation per step).
struct BlockRemoval {
  RelationId relation;  // renumbered id, >= free_bits()
  uint32_t rest_block;  // block of the pattern without it
};

class DenseLayout {
 public:
  // REQUIRES: the constraints belong to a query of n relations.
  DenseLayout(int n, const SliceConstraints& constraints);

  int relations() const { return n_; }
  int free_bits() const { return f_; }
  uint64_t block_count() const { return block_count_; }
  uint64_t slot_count() const { return block_count_ << f_; }
  RelSet low_mask() const { return FullSet(f_); }
  // perm()[i] is the renumbered id of original relation i.
  const std::vector<RelationId>& perm() const { return perm_; }
  const std::vector<RelationId>& inverse_perm() const { return inverse_; }

  // The high part (bits above f, shifted down) of the sets of block b.
  RelSet BlockPattern(uint64_t b) const { return patterns_[b]; }
  // True when a renumbered set is admissible.
  bool Admissible(RelSet s) const;
  // REQUIRES: s is admissible (renumbered).
  Slot SlotOf(RelSet s) const {
    return static_cast<Slot>((BlockOf(s >> f_) << f_) | (s & low_mask()));
  }
  RelSet SetOf(Slot slot) const {
    return (patterns_[slot >> f_] << f_) | (slot & low_mask());
  }

  // The splits of block b's pattern into two admissible patterns, both
  // orders, or (symmetric) one order per unordered pair with left <= right
  // pattern. Written into `out`, which is cleared first.
  void BlockSplits(uint64_t b, bool symmetric, std::vector<BlockSplit>& out) const;
  // The constrained relations removable from block b's pattern.
  void BlockRemovals(uint64_t b, std::vector<BlockRemoval>& out) const;

 private:
  bool PatternAdmissible(RelSet high) const;
  // REQUIRES: PatternAdmissible(high).
  uint64_t BlockOf(RelSet high) const;

  int n_;
  int f_;
  int width_;  // bits per digit
  int radix_;  // allowed patterns per digit
  int digits_;
  uint64_t block_count_;
  std::vector<RelationId> perm_;
  std::vector<RelationId> inverse_;
  std::vector<RelSet> patterns_;     // block -> high pattern
  std::vector<int8_t> digit_value_;  // local pattern -> digit value or -1
  // digit value -> its splits into two allowed digit values (left, right)
  std::vector<std::vector<std::pair<uint8_t, uint8_t>>> digit_splits_;
  std::vector<uint64_t> place_;      // radix^j
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_DENSE_LAYOUT_H_
