// Closed forms the enumerator suites check counts against, each with its
// source. Exact integers; REQUIRES n small enough not to overflow (n <= 20).
#ifndef SLICEPLAN_TESTS_SUPPORT_CLOSED_FORMS_H_
#define SLICEPLAN_TESTS_SUPPORT_CLOSED_FORMS_H_

#include <cstdint>

#include "tests/support/test_queries.h"

namespace sliceplan::testing {

inline uint64_t Pow(uint64_t base, int e) {
  uint64_t out = 1;
  while (e-- > 0) out *= base;
  return out;
}

inline uint64_t Factorial(int n) {
  uint64_t out = 1;
  for (int i = 2; i <= n; ++i) out *= i;
  return out;
}

// Splits of every subset of n relations into two non-empty unordered parts:
// sum over |S| = s of C(n, s) (2^(s-1) - 1) = (3^n - 2^(n+1) + 1) / 2.
inline uint64_t UnorderedSplitsAllSubsets(int n) { return (Pow(3, n) - Pow(2, n + 1) + 1) / 2; }

// Left-deep splits (S \ {r}, r) of every subset of two or more relations:
// sum over s of C(n, s) s = n 2^(n-1), less the n singletons.
inline uint64_t LeftDeepSplitsAllSubsets(int n) { return n * (Pow(2, n - 1) - 1); }

// Csg-cmp pairs (unordered) of the four classic shapes: Moerkotte and
// Neumann, "Analysis of two existing and one new dynamic programming
// algorithm for the generation of optimal bushy join trees without cross
// products", VLDB 2006, table of #ccp (from memory, and each rechecked by
// brute force in tests/core/graph/set_ccp_walk_test.cc's sweep).
inline uint64_t CcpCount(GraphShape shape, int n) {
  const uint64_t m = n;
  switch (shape) {
    case GraphShape::kChain:
      return (m * m * m - m) / 6;
    case GraphShape::kCycle:
      return (m * m * m - 2 * m * m + m) / 2;
    case GraphShape::kStar:
      return (m - 1) * Pow(2, n - 2);
    case GraphShape::kClique:
      return UnorderedSplitsAllSubsets(n);
    default:
      return 0;
  }
}

// Left-deep splits (S \ {r}, r) with both sides connected and joined,
// derived here: chain, intervals of length s >= 2 lose either end:
// 2 (n - 1) + 2 (n - 2) + ... = n (n - 1); cycle, arcs of length 2..n-1 lose
// either end (2 n (n - 2)) and the whole cycle any relation (n); star,
// a centre with k >= 1 leaves loses any leaf (sum k C(n-1, k) =
// (n - 1) 2^(n-2)) or, for k = 1, the centre (n - 1 more); clique, every
// subset's every relation.
inline uint64_t ConnectedLeftDeepSplits(GraphShape shape, int n) {
  const uint64_t m = n;
  switch (shape) {
    case GraphShape::kChain:
      return m * (m - 1);
    case GraphShape::kCycle:
      return 2 * m * (m - 2) + m;
    case GraphShape::kStar:
      return (m - 1) * Pow(2, n - 2) + (m - 1);
    case GraphShape::kClique:
      return LeftDeepSplitsAllSubsets(n);
    default:
      return 0;
  }
}

// Catalan number C(k) = (2k)! / ((k + 1)! k!), by its recurrence.
inline uint64_t Catalan(int k) {
  uint64_t c = 1;
  for (int i = 0; i < k; ++i) c = c * 2 * (2 * i + 1) / (i + 2);
  return c;
}

// Ordered bushy trees (each join's operands in order) over n relations:
// with cross products (2n - 2)! / (n - 1)!; without them, chain
// 2^(n-1) C(n-1) and star 2^(n-1) (n-1)! (Ono and Lohman, "Measuring the
// complexity of join enumeration in query optimization", VLDB 1990, from
// memory; the star's: every join has a leaf on one side, (n-1)! leaf orders
// times 2 orders of each join).
inline uint64_t BushyTrees(GraphShape shape, int n, bool cross_products) {
  if (cross_products || shape == GraphShape::kClique)
    return Factorial(2 * n - 2) / Factorial(n - 1);
  if (shape == GraphShape::kChain) return Pow(2, n - 1) * Catalan(n - 1);
  if (shape == GraphShape::kStar) return Pow(2, n - 1) * Factorial(n - 1);
  return 0;
}

// Left-deep join orders: n! with cross products or on a clique; without
// them, chain 2^(n-1) (each step extends the interval at one of its two
// ends; the first pair counts both orders), star 2 (n-1)! (the centre
// first or second), cycle n 2^(n-2) (a start, then one of the arc's two
// ends each step but the last).
inline uint64_t LeftDeepOrders(GraphShape shape, int n, bool cross_products) {
  if (cross_products || shape == GraphShape::kClique) return Factorial(n);
  switch (shape) {
    case GraphShape::kChain:
      return Pow(2, n - 1);
    case GraphShape::kStar:
      return 2 * Factorial(n - 1);
    case GraphShape::kCycle:
      return n * Pow(2, n - 2);
    default:
      return 0;
  }
}

}  // namespace sliceplan::testing

#endif  // SLICEPLAN_TESTS_SUPPORT_CLOSED_FORMS_H_
