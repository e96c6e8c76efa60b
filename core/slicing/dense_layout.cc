#include "core/slicing/dense_layout.h"

#include <array>
#include <bit>

namespace sliceplan {
namespace {

// Allowed local patterns in digit order (bit i = the digit's i-th relation),
// sorted by size so that a sub-pattern precedes its super-patterns.
// Pair {required, trigger}: the trigger alone (0b10) is forbidden.
constexpr std::array<RelSet, 3> kPairPatterns = {0b00, 0b01, 0b11};
// Triple {anchor, trigger, required}: anchor and trigger without the
// required one (0b011) is forbidden.
constexpr std::array<RelSet, 7> kTriplePatterns = {0b000, 0b001, 0b010, 0b100, 0b101, 0b110, 0b111};

// digit value -> its splits into two allowed digit values (left, right)
using DigitSplitTable = std::vector<std::vector<std::pair<uint8_t, uint8_t>>>;

// The local pattern of digit value v, for digits of pairs or of triples.
RelSet DigitPattern(bool pairs, uint64_t v) {
  return pairs ? kPairPatterns[v] : kTriplePatterns[v];
}

// perm[i], the renumbered id of relation i of n: the free relations first,
// in their relative order, then each constraint's relations in digit order.
std::vector<RelationId> Renumbering(int n, const SliceConstraints& constraints) {
  std::vector<RelationId> perm(n, RelationId{});
  int next = 0;
  for (int i = 0; i < n; ++i) {  // free relations keep their relative order
    const RelationId r{static_cast<uint8_t>(i)};
    if (!Contains(constraints.constrained(), r)) perm[i].value = static_cast<uint8_t>(next++);
  }
  for (const OrientedConstraint& c : constraints.constraints()) {
    for (int d = 0; d < c.relations.size; ++d) {
      perm[c.relations.ids[d].value].value = static_cast<uint8_t>(next++);
    }
  }
  return perm;
}

// The inverse of a permutation of relation ids.
std::vector<RelationId> InverseOf(const std::vector<RelationId>& perm) {
  std::vector<RelationId> inverse(perm.size(), RelationId{});
  for (size_t i = 0; i < perm.size(); ++i) inverse[perm[i].value].value = static_cast<uint8_t>(i);
  return inverse;
}

// value[p] for each local pattern p of `width` bits: its digit value among
// the `radix` allowed patterns, or -1 when p is not allowed.
std::vector<int8_t> DigitValues(bool pairs, int width, int radix) {
  std::vector<int8_t> value(size_t{1} << width, -1);
  for (int v = 0; v < radix; ++v) value[DigitPattern(pairs, v)] = static_cast<int8_t>(v);
  return value;
}

// For each of the `radix` digit values, every split of its pattern p into
// a sub-pattern l and p \ l, both allowed, in the order l walks p's subsets.
DigitSplitTable DigitSplits(bool pairs, int radix, const std::vector<int8_t>& digit_value) {
  DigitSplitTable splits(radix);
  for (int v = 0; v < radix; ++v) {
    const RelSet p = DigitPattern(pairs, v);
    RelSet l = 0;
    do {  // every sub-pattern l of p with l and p \ l both allowed
      const int8_t vl = digit_value[l], vr = digit_value[p ^ l];
      if (vl >= 0 && vr >= 0) {
        splits[v].emplace_back(static_cast<uint8_t>(vl), static_cast<uint8_t>(vr));
      }
      l = (l - p) & p;
    } while (l != 0);
  }
  return splits;
}

// The symmetric order keeps a split when the left pattern is at most the
// right one as an integer; disjoint parts differ first at the pattern's
// top bit, so that is when the right part holds the top bit of the top
// non-zero digit. Those splits of each digit value, in the same order.
DigitSplitTable TopDigitSplits(bool pairs, const DigitSplitTable& splits) {
  DigitSplitTable top_splits(splits.size());
  for (size_t v = 0; v < splits.size(); ++v) {
    const RelSet p = DigitPattern(pairs, v);
    const RelSet top = p == 0 ? 0 : RelSet{1} << (63 - std::countl_zero(p));
    for (const auto& [vl, vr] : splits[v]) {
      const RelSet right = DigitPattern(pairs, vr);
      if ((right & top) == top) top_splits[v].emplace_back(vl, vr);
    }
  }
  return top_splits;
}

// patterns[b] for each of the block_count blocks: the high pattern whose
// `digits` digits of `width` bits (digit 0 lowest) have the values of b's
// mixed-radix digits.
std::vector<RelSet> BlockPatterns(bool pairs, int width, int radix, int digits,
                                  uint64_t block_count) {
  std::vector<RelSet> patterns(block_count);
  for (uint64_t b = 0; b < block_count; ++b) {
    RelSet high = 0;
    uint64_t rest = b;
    for (int j = 0; j < digits; ++j) {
      const uint64_t v = rest % static_cast<uint64_t>(radix);
      rest /= static_cast<uint64_t>(radix);
      high |= DigitPattern(pairs, v) << (width * j);
    }
    patterns[b] = high;
  }
  return patterns;
}

}  // namespace

DenseLayout::DenseLayout(int n, const SliceConstraints& constraints)
    : n_(n),
      width_(RelationsPerConstraint(constraints.shape())),
      digits_(static_cast<int>(constraints.constraints().size())) {
  const bool pairs = width_ == 2;
  radix_ = pairs ? 3 : 7;
  f_ = n - width_ * digits_;
  perm_ = Renumbering(n, constraints);
  inverse_ = InverseOf(perm_);
  digit_value_ = DigitValues(pairs, width_, radix_);
  digit_splits_ = DigitSplits(pairs, radix_, digit_value_);
  digit_splits_top_ = TopDigitSplits(pairs, digit_splits_);
  block_count_ = 1;
  for (int j = 0; j < digits_; ++j) {
    place_.push_back(block_count_);
    block_count_ *= static_cast<uint64_t>(radix_);
  }
  patterns_ = BlockPatterns(pairs, width_, radix_, digits_, block_count_);
}

bool DenseLayout::PatternAdmissible(RelSet high) const {
  const RelSet digit_mask = FullSet(width_);
  for (int j = 0; j < digits_; ++j) {
    if (digit_value_[(high >> (width_ * j)) & digit_mask] < 0) return false;
  }
  return true;
}

uint64_t DenseLayout::BlockOf(RelSet high) const {
  const RelSet digit_mask = FullSet(width_);
  uint64_t block = 0;
  for (int j = digits_ - 1; j >= 0; --j) {
    block = block * static_cast<uint64_t>(radix_) +
            static_cast<uint64_t>(digit_value_[(high >> (width_ * j)) & digit_mask]);
  }
  return block;
}

bool DenseLayout::Admissible(RelSet s) const { return PatternAdmissible(s >> f_); }

void DenseLayout::BlockSplits(uint64_t b, bool symmetric, std::vector<BlockSplit>& out) const {
  out.clear();
  FoldBlockSplits(b, symmetric, 0, [&out](int, uint32_t left, uint32_t right) {
    out.push_back({left, right});
    return 0;
  });
}

void DenseLayout::BlockRemovals(uint64_t b, std::vector<BlockRemoval>& out) const {
  out.clear();
  const RelSet whole = patterns_[b];
  ForEachMember(whole, [&](RelationId x) {
    const RelSet rest = whole & ~Singleton(x);
    if (PatternAdmissible(rest)) {
      out.push_back(
          {RelationId{static_cast<uint8_t>(x.value + f_)}, static_cast<uint32_t>(BlockOf(rest))});
    }
  });
}

}  // namespace sliceplan
