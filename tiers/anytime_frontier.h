// The anytime frontier search for the cluster model at any size (issue of
// many objectives at every size; docs/cost-models.md, "cluster"): a set
// of Pareto-optimal plans that improves for as long as it is given.
//
// Our design, after the idea of randomized multi-objective search by
// iterated local improvement of whole plans (Trummer and Koch, SIGMOD
// 2016): every join tree visited is evaluated whole by the Pareto set of
// its physical choices (tiers/physical_frontier.h), and the plans enter
// one archive kept non-dominated on the selected objectives.
//   1. Seeds: the greedy trees (bushy, or left-deep for that shape), each
//      evaluated.
//   2. Then, until the control stops it: a random local move on the
//      current tree (bushy: a rotation or an exchange at a random join,
//      (A B) C -> A (B C) or (A C) B and their mirror images; left-deep:
//      two relations of the order swapped), refused when it makes a cross
//      product the request excludes; the new tree is evaluated; a tree
//      that added a plan becomes the current one, otherwise now and then
//      a tree of the archive does (restarts).
// Deterministic for a seed and a number of moves. Thread-compatible.
#ifndef SLICEPLAN_TIERS_ANYTIME_FRONTIER_H_
#define SLICEPLAN_TIERS_ANYTIME_FRONTIER_H_

#include <cstdint>
#include <functional>
#include <memory>
#include <vector>

#include "core/cost/cluster_config.h"
#include "core/model/plan_shape.h"
#include "core/model/wide_query.h"
#include "core/search/search_control.h"
#include "tiers/physical_frontier.h"
#include "tiers/wide_plan.h"

namespace sliceplan {

struct AnytimeFrontierOptions {
  PlanShape shape = PlanShape::kBushy;
  bool cross_products = true;
  uint64_t seed = 1;
  size_t cap_per_node = 8;  // PhysicalFrontierOptions::cap
  size_t max_plans = 1000;  // the archive's bound: past it, only dominating plans enter
  uint64_t max_moves = 0;   // 0: until the control stops the search
  // Each tree's nodes take the Pareto sub-plans of their sets found in
  // earlier trees (tiers/shared_subplans.h); false: each tree alone.
  bool share_subplans = true;
  // Called once the seed is evaluated, then once a second (each time a
  // second has passed since the last call, checked before every move, so
  // as often as moves allow) and at the end, with the archive's size and
  // the trees evaluated so far.
  std::function<void(size_t plans, uint64_t trees)> on_progress;
};

struct AnytimeFrontierResult {
  std::vector<FrontierPlan> frontier;  // non-dominated, by increasing latency_s
  uint64_t trees = 0;                  // trees evaluated
  uint64_t moves_refused = 0;          // moves that made an excluded cross product
};

// REQUIRES: the query has at least 2 relations; config's parameters valid.
// Without cross products the join graph must be connected (the seeds are
// then free of cross products, and so is every move kept).
AnytimeFrontierResult AnytimeFrontier(const WideQuery& query, const ClusterSearchConfig& config,
                                      const AnytimeFrontierOptions& options,
                                      SearchControl& control);

}  // namespace sliceplan

#endif  // SLICEPLAN_TIERS_ANYTIME_FRONTIER_H_
