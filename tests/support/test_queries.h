// Query generators for the tests: the join-graph shapes of the literature
// (chain, cycle, star, clique) and random graphs, with seeded random row
// counts and selectivities. Deterministic for a given seed.
#ifndef SLICEPLAN_TESTS_SUPPORT_TEST_QUERIES_H_
#define SLICEPLAN_TESTS_SUPPORT_TEST_QUERIES_H_

#include <cstdint>
#include <string>
#include <utility>
#include <vector>

#include "core/model/query.h"

namespace sliceplan::testing {

enum class GraphShape { kChain, kCycle, kStar, kClique, kRandom, kHyper };

std::string ShapeName(GraphShape shape);
// The shape ShapeName calls `name`; false for any other name.
bool ShapeFromName(const std::string& name, GraphShape& shape);

// The edges of a shape over n relations (kRandom: a random spanning tree
// plus extra edges; kHyper: a chain plus one predicate over three relations).
std::vector<std::vector<int>> ShapeEdges(GraphShape shape, int n, uint64_t seed);

// A query with relations r0..r{n-1}, rows in [10, 1e6] and selectivities
// in [1e-4, 0.5], log-uniform, over the edges of `shape`.
Query MakeQuery(GraphShape shape, int n, uint64_t seed);

// The same with every row count 100 and selectivity 0.5 (counting tests).
Query MakeUniformQuery(GraphShape shape, int n);

// A query from explicit parts; aborts the test binary on invalid input.
Query MakeQueryOrDie(std::vector<Relation> relations, std::vector<Predicate> predicates);

}  // namespace sliceplan::testing

#endif  // SLICEPLAN_TESTS_SUPPORT_TEST_QUERIES_H_
