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

}  // namespace

DenseLayout::DenseLayout(int n, const SliceConstraints& constraints)
    : n_(n),
      width_(RelationsPerConstraint(constraints.shape())),
      digits_(static_cast<int>(constraints.constraints().size())) {
  const bool pairs = width_ == 2;
  radix_ = pairs ? 3 : 7;
  f_ = n - width_ * digits_;
  perm_.assign(n, RelationId{});
  inverse_.assign(n, RelationId{});
  int next = 0;
  for (int i = 0; i < n; ++i) {  // free relations keep their relative order
    const RelationId r{static_cast<uint8_t>(i)};
    if (!Contains(constraints.constrained(), r)) perm_[i].value = static_cast<uint8_t>(next++);
  }
  for (const OrientedConstraint& c : constraints.constraints()) {
    for (int d = 0; d < c.relations.size; ++d) {
      perm_[c.relations.ids[d].value].value = static_cast<uint8_t>(next++);
    }
  }
  for (int i = 0; i < n; ++i) inverse_[perm_[i].value].value = static_cast<uint8_t>(i);

  digit_value_.assign(size_t{1} << width_, -1);
  for (int v = 0; v < radix_; ++v) {
    const RelSet p = pairs ? kPairPatterns[v] : kTriplePatterns[v];
    digit_value_[p] = static_cast<int8_t>(v);
  }
  digit_splits_.resize(radix_);
  for (int v = 0; v < radix_; ++v) {
    const RelSet p = pairs ? kPairPatterns[v] : kTriplePatterns[v];
    RelSet l = 0;
    do {  // every sub-pattern l of p with l and p \ l both allowed
      const int8_t vl = digit_value_[l], vr = digit_value_[p ^ l];
      if (vl >= 0 && vr >= 0) {
        digit_splits_[v].emplace_back(static_cast<uint8_t>(vl), static_cast<uint8_t>(vr));
      }
      l = (l - p) & p;
    } while (l != 0);
  }
  // The symmetric order keeps a split when the left pattern is at most the
  // right one as an integer; disjoint parts differ first at the pattern's
  // top bit, so that is when the right part holds the top bit of the top
  // non-zero digit. Those splits of each digit value, in the same order:
  digit_splits_top_.resize(radix_);
  for (int v = 0; v < radix_; ++v) {
    const RelSet p = pairs ? kPairPatterns[v] : kTriplePatterns[v];
    const RelSet top = p == 0 ? 0 : RelSet{1} << (63 - std::countl_zero(p));
    for (const auto& [vl, vr] : digit_splits_[v]) {
      const RelSet right = pairs ? kPairPatterns[vr] : kTriplePatterns[vr];
      if ((right & top) == top) digit_splits_top_[v].emplace_back(vl, vr);
    }
  }
  block_count_ = 1;
  for (int j = 0; j < digits_; ++j) {
    place_.push_back(block_count_);
    block_count_ *= static_cast<uint64_t>(radix_);
  }
  patterns_.resize(block_count_);
  for (uint64_t b = 0; b < block_count_; ++b) {
    RelSet high = 0;
    uint64_t rest = b;
    for (int j = 0; j < digits_; ++j) {
      const uint64_t v = rest % static_cast<uint64_t>(radix_);
      rest /= static_cast<uint64_t>(radix_);
      high |= (pairs ? kPairPatterns[v] : kTriplePatterns[v]) << (width_ * j);
    }
    patterns_[b] = high;
  }
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
