// Generators of large join graphs for the tiers' tests and benchmarks:
// random trees, snowflakes, trees with extra cycle edges and trees with
// hyperedges, over any number of relations. Selectivities follow the
// key/foreign-key pattern (about 1 / the larger side's rows), so
// cardinalities stay near the base tables' sizes however many relations
// join. Deterministic for a given seed.
#ifndef SLICEPLAN_TESTS_SUPPORT_WIDE_QUERIES_H_
#define SLICEPLAN_TESTS_SUPPORT_WIDE_QUERIES_H_

#include <cstdint>
#include <string>

#include "core/model/wide_query.h"

namespace sliceplan::testing {

enum class WideShape { kTree, kSnowflake, kTreeWithCycles, kTreeWithHyperedges };

std::string WideShapeName(WideShape shape);

// n relations t0..t{n-1}, rows log-uniform in [10, 1e7] (snowflakes: the
// fact table largest, each level ten times smaller).
WideQuery MakeWideQuery(WideShape shape, int n, uint64_t seed);

}  // namespace sliceplan::testing

#endif  // SLICEPLAN_TESTS_SUPPORT_WIDE_QUERIES_H_
