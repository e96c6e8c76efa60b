// IKKBZ: the optimal left-deep order without cross products of a tree
// query under a cost function with the adjacent sequence interchange (ASI)
// property, here C_out (T. Ibaraki and T. Kameda, "On the Optimal Nesting
// Order for Computing N-Relational Joins", ACM TODS 9(3), 1984; R.
// Krishnamurthy, H. Boral and C. Zaniolo, "Optimization of Nonrecursive
// Queries", VLDB 1986).
//
// For a root, the tree becomes a precedence tree: relation i (not the root)
// with the selectivity s_i of the edge to its parent has T_i = s_i rows_i
// and C_i = T_i; a sequence has C(AB) = C(A) + T(A) C(B), T(AB) = T(A) T(B)
// and rank (T - 1) / C. Bottom up, each subtree's children's chains are
// merged by ascending rank and the subtree's root is put in front; while
// the front has a higher rank than what follows, the two are fused into one
// module (normalisation). The root followed by its merged chains is the
// optimal order for that root; the best over the roots tried is returned.
//
// A query that is not a tree is first reduced to a spanning tree of its
// join graph of least total selectivity (Kruskal over the binary
// predicates; then, where they leave parts apart, edges from a hyperedge's
// first relation to its others; parts still apart are tied together by
// edges of selectivity 1, i.e. cross products). Pure.
#ifndef SLICEPLAN_TIERS_IKKBZ_H_
#define SLICEPLAN_TIERS_IKKBZ_H_

#include <cstdint>
#include <vector>

#include "core/model/wide_query.h"

namespace sliceplan {

struct TreeEdge {
  int32_t a, b;
  double selectivity;
};

// The spanning tree the order is built on: n - 1 edges.
std::vector<TreeEdge> SpanningTree(const WideQuery& query);

// The IKKBZ order for one root over `tree` (SpanningTree's edges).
std::vector<int32_t> IkkbzOrderFrom(const WideQuery& query, const std::vector<TreeEdge>& tree,
                                    int32_t root);

// C_out of the left-deep plan joining `order` from left to right, on the
// whole query (every predicate, not only the tree's).
double LeftDeepCout(const WideQuery& query, const std::vector<int32_t>& order);

// The best IKKBZ order (by LeftDeepCout) over up to `max_roots` roots:
// every relation when n <= max_roots, else the max_roots smallest
// relations. REQUIRES: max_roots >= 1.
std::vector<int32_t> IkkbzOrder(const WideQuery& query, int max_roots);

}  // namespace sliceplan

#endif  // SLICEPLAN_TIERS_IKKBZ_H_
