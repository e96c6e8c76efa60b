// The `idp` tier: iterative DP over blocks of a complete plan, after IDP-2
// (D. Kossmann and K. Stocker, "Iterative Dynamic Programming: A New Class
// of Query Optimization Algorithms", ACM TODS 25(1), 2000), here as local
// improvement of a start plan (the best of greedy and linear).
//
// A block is a subtree of the plan cut at up to k "units": starting from
// the subtree's root, the unit with the most relations is replaced by its
// two children until there are k of them. The block becomes a query of k
// relations (a unit's rows are its cardinality; a predicate within the
// subtree and not within one unit names the units it touches, hyperedges
// included), which an exact search (handed in by the caller; the
// scheduler slices it over the pool like any request) solves. Under C_out
// the block's plan over its units costs exactly what the subtree above the
// units costs, so a cheaper answer replaces that part of the tree and
// lowers the plan's cost by the difference.
//
// One pass visits the plan top-down in disjoint blocks (each block's
// composite units start the next blocks). Passes alternate block sizes k
// and about 2k/3, so block boundaries move; it stops when two passes in a
// row improve nothing, when the caller's time is out, or after max_passes.
//
// The exact search's answer is a function of the block query alone, so a
// block query met again (a later pass over a part of the plan that did not
// change, or another part with the same figures) reuses its first answer
// instead of searching again; the outcome is the same as searching it
// again. A block whose search failed (a deadline) is not kept.
//
// Single-threaded: the exact searches run wherever the callback sends them.
#ifndef SLICEPLAN_TIERS_IDP_H_
#define SLICEPLAN_TIERS_IDP_H_

#include <functional>
#include <string>

#include "absl/status/statusor.h"
#include "core/model/plan.h"
#include "core/model/query.h"
#include "core/model/wide_query.h"
#include "tiers/wide_plan.h"

namespace sliceplan {

// The exact search of one block query (at most 64 relations, bushy, the
// request's cross-product choice): its best plan, costed with C_out over
// the block's relations, or an error (a deadline cut it short: the block is
// skipped and the run ends).
using BlockSearch = std::function<absl::StatusOr<Plan>(const Query& block)>;

struct IdpConfig {
  int block = 10;  // k, units per block; 3 <= k <= kMaxRelations
  bool cross_products = true;
  int max_passes = 8;
  // Polled before every block; true ends the run with the plan so far.
  std::function<bool()> out_of_time;
  // After each block searched: its size, the seconds its search took and
  // the blocks searched so far in this run (it included); returns the k for
  // the next (the caller's capacity model). Empty: k stays.
  std::function<int(int block, double seconds, int searched)> next_block;
  // Answer a block met again from its first search (the outcome is the
  // same; false searches it again, for the tests that show so).
  bool reuse_answers = true;
  // Called with the whole plan (costed) after each block that improved it.
  std::function<void(const WidePlan&)> on_improved;
};

struct IdpStats {
  int blocks = 0;  // exact block searches run (failed ones included)
  int failed = 0;  // of those, searches that gave no answer (no worker, memo limit, deadline)
  std::string last_failure;  // the last failed search's error
  int reused = 0;            // block queries met again, answered from an earlier search
  int improved = 0;          // blocks (searched or reused) that lowered the cost
  int passes = 0;
  int largest_block = 0;  // units in the largest block searched
  double start_cost = 0;
};

struct IdpResult {
  WidePlan plan;  // costed; never costlier than the start plan
  IdpStats stats;
};

// REQUIRES: `start` is a valid plan of `query` (CheckWidePlan).
IdpResult ImproveByBlocks(const WideQuery& query, WidePlan start, const IdpConfig& config,
                          const BlockSearch& search);

}  // namespace sliceplan

#endif  // SLICEPLAN_TIERS_IDP_H_
