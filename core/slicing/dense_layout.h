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
#ifndef SLICEPLAN_CORE_SLICING_DENSE_LAYOUT_H_
#define SLICEPLAN_CORE_SLICING_DENSE_LAYOUT_H_

#include <cstdint>
#include <vector>

#include "core/memo/slot.h"
#include "core/model/relation_set.h"
#include "core/slicing/slice_constraints.h"

namespace sliceplan {

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
  RelSet SetOf(Slot slot) const { return (patterns_[slot >> f_] << f_) | (slot & low_mask()); }

  // The splits of block b's pattern into two admissible patterns, both
  // orders, or (symmetric) one order per unordered pair with left <= right
  // pattern. Written into `out`, which is cleared first.
  void BlockSplits(uint64_t b, bool symmetric, std::vector<BlockSplit>& out) const;
  // The same splits in the same order, folded: acc = fn(acc, left, right)
  // per split, with nothing stored. For slices with no free relations,
  // where each block holds one set and its splits are used once.
  template <class Acc, class Fn>
  Acc FoldBlockSplits(uint64_t b, bool symmetric, Acc acc, Fn&& fn) const;
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
  // the same, only those whose right part holds the value's top bit
  std::vector<std::vector<std::pair<uint8_t, uint8_t>>> digit_splits_top_;
  std::vector<uint64_t> place_;  // radix^j
};

template <class Acc, class Fn>
Acc DenseLayout::FoldBlockSplits(uint64_t b, bool symmetric, Acc acc, Fn&& fn) const {
  // The splits of a block are the product of its digits' splits, digit 0
  // varying fastest. The lowest digits' product is flattened into a short
  // table of (left, right) offsets, walked in a tight inner loop; the other
  // digits advance like an odometer, each step changing the two block
  // numbers by the digit's change times its place.
  using Choices = std::vector<std::pair<uint8_t, uint8_t>>;
  constexpr size_t kInner = 64;
  const Choices* lists[kMaxRelations];
  uint32_t choice[kMaxRelations];
  uint64_t rest = b;
  int top = -1;  // the most significant non-zero digit
  for (int j = 0; j < digits_; ++j) {
    const uint64_t v = rest % static_cast<uint64_t>(radix_);
    rest /= static_cast<uint64_t>(radix_);
    lists[j] = &digit_splits_[v];
    choice[j] = 0;
    if (v != 0) top = j;
  }
  if (symmetric && top >= 0) {
    lists[top] = &digit_splits_top_[(b / place_[top]) % static_cast<uint64_t>(radix_)];
  }
  uint32_t inner_l[kInner], inner_r[kInner];
  size_t inner = 1;
  inner_l[0] = inner_r[0] = 0;
  int d = 0;  // digits below d are flattened
  for (; d < digits_ && inner * lists[d]->size() <= kInner; ++d) {
    const Choices& list = *lists[d];
    const auto place = static_cast<uint32_t>(place_[d]);
    for (size_t c = list.size(); c-- > 0;) {  // choice c's block of entries
      for (size_t e = 0; e < inner; ++e) {
        inner_l[c * inner + e] = inner_l[e] + list[c].first * place;
        inner_r[c * inner + e] = inner_r[e] + list[c].second * place;
      }
    }
    inner *= list.size();
  }
  int64_t left = 0, right = 0;
  for (int j = d; j < digits_; ++j) {
    left += static_cast<int64_t>((*lists[j])[0].first * place_[j]);
    right += static_cast<int64_t>((*lists[j])[0].second * place_[j]);
  }
  for (;;) {
    const auto base_l = static_cast<uint32_t>(left), base_r = static_cast<uint32_t>(right);
    for (size_t e = 0; e < inner; ++e) acc = fn(acc, base_l + inner_l[e], base_r + inner_r[e]);
    int j = d;
    for (; j < digits_; ++j) {
      const Choices& list = *lists[j];
      const auto [old_l, old_r] = list[choice[j]];
      choice[j] = choice[j] + 1 == list.size() ? 0 : choice[j] + 1;
      const auto [new_l, new_r] = list[choice[j]];
      const auto place = static_cast<int64_t>(place_[j]);
      left += (int64_t{new_l} - old_l) * place;
      right += (int64_t{new_r} - old_r) * place;
      if (choice[j] != 0) break;  // no carry into the next digit
    }
    if (j == digits_) return acc;
  }
}

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SLICING_DENSE_LAYOUT_H_
