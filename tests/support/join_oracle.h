// Test oracles for non-inner joins, independent of the engine's detector:
//   - RandomJoinQuery: a random original tree over a few relations with
//     inner, left, full, semi and anti joins and predicates that read only
//     what is visible from where they sit;
//   - Closure: every tree reachable from the original by the
//     transformations of docs/joins.md (commutativity, assoc, l-asscom,
//     r-asscom), breadth-first;
//   - Evaluate: runs a tree on small generated tables (duplicates and
//     NULLs in the join columns) and returns its rows as a sorted multiset.
#ifndef SLICEPLAN_TESTS_SUPPORT_JOIN_ORACLE_H_
#define SLICEPLAN_TESTS_SUPPORT_JOIN_ORACLE_H_

#include <memory>
#include <random>
#include <set>
#include <string>
#include <vector>

#include "core/model/plan.h"
#include "core/model/query.h"

namespace sliceplan::testing {

// A join tree: a leaf (relation >= 0) or a join with a type and, for a
// non-inner join, the index of its operator in Query::joins() (inner
// joins apply every inner predicate first complete at them).
struct OpTree {
  int relation = -1;
  JoinType type = JoinType::kInner;
  int op = -1;
  std::shared_ptr<const OpTree> left, right;
  RelSet set = 0;
};
using OpTreePtr = std::shared_ptr<const OpTree>;

OpTreePtr Leaf(int relation);
OpTreePtr Join(JoinType type, int op, OpTreePtr left, OpTreePtr right);
// "(r0 LEFT#1 (r1 r2))": a canonical text (children in their order).
std::string Text(const OpTree& tree);

struct JoinCase {
  Query query;
  OpTreePtr original;
};

// A random original tree of n relations (n <= 8) and its query.
JoinCase RandomJoinQuery(int n, std::mt19937_64& rng);

// Every tree reachable from `original`, as Text. Trees with a cross
// product are kept only when `cross_products`.
std::set<std::string> Closure(const Query& query, const OpTreePtr& original, bool cross_products);
// The same trees themselves.
std::vector<OpTreePtr> ClosureTrees(const Query& query, const OpTreePtr& original,
                                    bool cross_products);

// True when some inner join of the tree has no inner predicate between
// its inputs.
bool HasCrossProduct(const Query& query, const OpTree& tree);

// The query's original tree (core/model/join_tree.h) as an OpTree.
OpTreePtr OriginalTree(const Query& query);

// A plan's tree with its join types (the operator found by its sets).
OpTreePtr FromPlan(const Query& query, const Plan& plan);

// The rows of `tree` over tables generated from `seed` (every relation a
// few rows, join columns drawn from {0, 1, 2, NULL}): each row the row
// index of every relation it keeps (-1 for a padded NULL), sorted. Fails
// the current test when an inner predicate would be applied at a
// non-inner join.
std::vector<std::vector<int>> Evaluate(const Query& query, const OpTree& tree, uint64_t seed);

// C_out of the tree under the engine's cardinality.
double TreeCout(const Query& query, const OpTree& tree);

}  // namespace sliceplan::testing

#endif  // SLICEPLAN_TESTS_SUPPORT_JOIN_ORACLE_H_
