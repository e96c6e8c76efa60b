// Relation ids and relation sets.
//
// A query's relations are numbered 0..n-1 in file order; a set of them is a
// 64-bit mask (bit i = relation i), which is why the exact search is limited
// to 64 relations. All functions here are pure and thread-compatible.
#ifndef SLICEPLAN_CORE_MODEL_RELATION_SET_H_
#define SLICEPLAN_CORE_MODEL_RELATION_SET_H_

#include <bit>
#include <cstdint>

namespace sliceplan {

// Maximum number of relations of an exact search (one mask bit each).
inline constexpr int kMaxRelations = 64;

// A typed relation index, so that a relation id cannot be mixed up with a
// memo slot, a slice index or a count.
struct RelationId {
  uint8_t value = 0;
  friend constexpr bool operator==(RelationId, RelationId) = default;
  friend constexpr auto operator<=>(RelationId, RelationId) = default;
};

using RelSet = uint64_t;

// The set {r}.
constexpr RelSet Singleton(RelationId r) { return RelSet{1} << r.value; }
// The set {0, ..., n-1}. REQUIRES: 0 <= n <= 64.
constexpr RelSet FullSet(int n) { return n >= 64 ? ~RelSet{0} : (RelSet{1} << n) - 1; }
constexpr int Size(RelSet s) { return std::popcount(s); }
constexpr bool Contains(RelSet s, RelationId r) { return (s >> r.value) & 1; }
constexpr bool IsSubset(RelSet sub, RelSet of) { return (sub & ~of) == 0; }
// The smallest member. REQUIRES: s != 0.
constexpr RelationId Lowest(RelSet s) {
  return RelationId{static_cast<uint8_t>(std::countr_zero(s))};
}
constexpr RelSet LowestBit(RelSet s) { return s & (~s + 1); }

// Calls fn(RelationId) for each member in increasing order.
template <class Fn>
constexpr void ForEachMember(RelSet s, Fn&& fn) {
  for (; s != 0; s &= s - 1) fn(Lowest(s));
}

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MODEL_RELATION_SET_H_
