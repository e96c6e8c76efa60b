// What a worker is asked to solve: a plan shape and one slice of its space.
//
// A slice count P = 2^k splits the plans by k binary constraints (see
// docs/slicing.md); slice index i in [0, P) picks, bit by bit,
// which side of each constraint the slice keeps. Plain values, copyable.
#ifndef SLICEPLAN_CORE_SLICING_SLICE_SPEC_H_
#define SLICEPLAN_CORE_SLICING_SLICE_SPEC_H_

#include <bit>
#include <cstdint>

#include "absl/status/status.h"
#include "core/model/plan_shape.h"

namespace sliceplan {

// Relations one constraint takes: a precedence pair (left-deep) or a path
// triple (bushy).
constexpr int RelationsPerConstraint(PlanShape shape) { return shape == PlanShape::kBushy ? 3 : 2; }

struct SliceSpec {
  uint32_t index = 0;
  uint32_t count = 1;  // a power of two
  // k, the number of constraints. REQUIRES: count is a power of two.
  int bits() const { return std::countr_zero(count); }
  // Bit j of the index: which side of constraint j this slice keeps.
  bool bit(int j) const { return (index >> j) & 1; }
};

// How an entry point names the two numbers in its messages: the CLI's
// flag, the RPC fields, or the library's own words.
struct SliceFieldNames {
  const char* count = "slices";
  const char* index = "slice index";
};

// The one slice check every entry point uses (CLI, coordinator, worker,
// scheduler): OK when `count` is a power of two, index < count, and a
// query of n relations has room for the k disjoint constraints of `shape`
// (2k <= n for pairs, 3k <= n for triples). Otherwise INVALID_ARGUMENT,
// "<count field>: 3 is not a power of two (1, 2, 4, 8, ...)" and the like.
absl::Status ValidateSlice(SliceSpec spec, int n, PlanShape shape, SliceFieldNames names = {});

// The largest k a query of n relations allows for `shape`.
constexpr int MaxSliceBits(int n, PlanShape shape) { return n / RelationsPerConstraint(shape); }

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SLICING_SLICE_SPEC_H_
