// The anytime frontier search spread over a pool (issue of many objectives
// at every size: "across the pool, no cross-talk"): the search is run as
// `parts` independent parts, each with its own seeds (part k draws its
// random moves from seed k + 1; part 0 is the single search's), each on
// its own worker until its deadline; the coordinator merges their sets by
// dominance. A part's answer comes from a worker the coordinator does not
// trust, so CheckAnytimeAnswer recomputes every figure of it first.
// Thread-compatible; the functions are pure but for the control.
#ifndef SLICEPLAN_TIERS_ANYTIME_PART_H_
#define SLICEPLAN_TIERS_ANYTIME_PART_H_

#include <cstdint>
#include <functional>
#include <vector>

#include "absl/status/status.h"
#include "core/model/wide_query.h"
#include "core/search/search_control.h"
#include "core/search_options.h"
#include "tiers/wide_plan.h"

namespace sliceplan {

inline constexpr uint32_t kMaxAnytimeParts = 4096;

// Parts share Pareto sub-plans across trees (tiers/shared_subplans.h) up
// to this many relations: measured better there (bench/
// shared_subplans_bench, 1,500 moves, mean alpha against the union of all
// sets: 1.90 -> 1.26 at 20 relations, 1.75 -> 1.25 at 30, 1.97 -> 1.55 at
// 50), worse at 60 (1.60 -> 1.71), where sets recur less.
inline constexpr int kShareSubplansUpTo = 50;

struct AnytimePartSpec {
  uint32_t part = 0;
  uint32_t parts = 1;
};

// INVALID_ARGUMENT naming the field ("anytime.parts", "anytime.part")
// unless 1 <= parts <= kMaxAnytimeParts and part < parts.
absl::Status ValidateAnytimePart(const AnytimePartSpec& spec);

struct AnytimeAnswer {
  std::vector<WidePlan> frontier;  // physical choices and metrics in the nodes
  uint64_t trees = 0;              // join trees evaluated
  double seconds = 0;
  bool checked = false;  // CheckAnytimeAnswer passed (where a worker's proxy ran it)
};

// The most plans a part's archive keeps: 1,000, fewer where that many
// plans of the query's size would pass `memory_bytes` (about 64 bytes a
// plan node), at least 16.
size_t AnytimeMaxPlans(int relations, uint64_t memory_bytes);

// Runs part `spec` until `control` stops it (or, in tests, max_moves):
// options.shape and cross_products, options.cluster's parameters and
// objectives; up to 16 relations each node keeps 32 physical entries,
// past them 8 (docs/tiers.md); sub-plans shared up to
// kShareSubplansUpTo relations; the archive keeps at most
// AnytimeMaxPlans(n, options.memo_limit_bytes) plans. `on_progress` as AnytimeFrontierOptions'.
// REQUIRES: options.cost is the cluster model, its parameters valid; the
// query has at least 2 relations and, without cross products, a
// connected join graph.
AnytimeAnswer RunAnytimePart(const WideQuery& query, const SearchOptions& options,
                             const AnytimePartSpec& spec, SearchControl& control,
                             std::function<void(size_t plans, uint64_t trees)> on_progress = {},
                             uint64_t max_moves = 0);

// OK when every plan of `answer` could be a part's true answer: a tree
// over the query's relations (CheckWidePlan) of the requested shape,
// every join inner, without a cross product where they are excluded, every sample rate and
// node count one the options offer, and every node's cardinality and
// three metrics equal to those recomputed here from the tree and its
// choices (relative 1e-9). DATA_LOSS naming the plan, the node and the
// figure otherwise.
absl::Status CheckAnytimeAnswer(const WideQuery& query, const SearchOptions& options,
                                const AnytimeAnswer& answer);

}  // namespace sliceplan

#endif  // SLICEPLAN_TIERS_ANYTIME_PART_H_
