// The range of cardinalities and costs the engine represents.
//
// Estimates multiply: 64 relations of 1e10 rows make a cross product of
// 1e640 rows, past the range of double. Rather than refuse such queries up
// front (most of their sub-plans are small once predicates apply), every
// cardinality and every cost saturates at kValueCeiling: a value at the
// ceiling means "at least this large". Sums of a few saturated values stay
// finite (3 x 1e300 < DBL_MAX), so comparisons in the hot loops never meet
// an infinity or a NaN. A final answer whose cost reached the ceiling is not
// a number the engine can report: it is refused (OUT_OF_RANGE), never
// returned as inf or as the ceiling (docs/numeric-range.md).
//
// Pure functions; thread-safe.
#ifndef SLICEPLAN_CORE_MODEL_VALUE_RANGE_H_
#define SLICEPLAN_CORE_MODEL_VALUE_RANGE_H_

namespace sliceplan {

inline constexpr double kValueCeiling = 1e300;

// min(x, kValueCeiling); NaN (only from an out-of-range operand) saturates.
inline double Saturate(double x) { return x < kValueCeiling ? x : kValueCeiling; }

// True when `x` is at the ceiling (or NaN): no longer an exact value.
inline bool IsSaturated(double x) { return !(x < kValueCeiling); }

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MODEL_VALUE_RANGE_H_
