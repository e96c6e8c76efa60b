// Running a request through the search tiers (docs/tiers.md): the one
// entry point the embedded mode and the coordinator share above the slice
// scheduler.
//
// `auto` (the default), for the cout model:
//   1. a greedy plan (milliseconds) is the incumbent, then the linear one
//      where it is cheap (up to kAutoLinearRelations): every request has a
//      plan, whatever happens after;
//   2. up to 64 relations, the exact search runs when the capacity model
//      (core/capacity/capacity_model.h) predicts it finishes within kExactShare of
//      the time left on this pool, by the default rates or, where those
//      say no, by the rates measured for the query on this machine; cut
//      short by the deadline, its best plan so far competes with the
//      incumbent;
//   3. otherwise (bushy plans) idp improves the incumbent block by block,
//      each block an exact search sliced over the pool, the block size
//      chosen and re-chosen by the capacity model from the time left.
// Without a deadline the time is TierRequest::budget_seconds. The answer
// is the cheapest plan found, never costlier than the greedy one (nor the
// linear one where it ran), and names the tier that found it.
//
// A forced tier runs that tier alone (idp: seeded as in auto). `exact`
// keeps the scheduler's deadline rules (partial_on_deadline).
//
// The cluster model is searched by the exact tier (up to 64 relations) or
// the anytime tier (any size); auto runs the exact search where it is
// forecast to fit, else the anytime search seeded with what the exact
// search solved (tiers/anytime_frontier.h).
//
// Thread-safe: one call per request, any number at once.
#ifndef SLICEPLAN_SCHEDULE_TIERED_SEARCH_H_
#define SLICEPLAN_SCHEDULE_TIERED_SEARCH_H_

#include <optional>
#include <span>
#include <string>
#include <vector>

#include "absl/status/statusor.h"
#include "core/capacity/capacity_model.h"
#include "core/model/search_tier.h"
#include "core/model/wide_query.h"
#include "schedule/incumbent_board.h"
#include "schedule/slice_scheduler.h"
#include "tiers/idp.h"
#include "tiers/linear_dp.h"
#include "tiers/wide_plan.h"

namespace sliceplan {

// auto runs the linear tier as a second incumbent up to this many
// relations, the linear tier's own limit (its O(n^3) DP takes a fraction
// of a second there; a deadline cuts it short, and greedy's plan stands).
// Greedy alone is often several times costlier at that size
// (docs/benchmarks.md).
inline constexpr int kAutoLinearRelations = kMaxLinearRelations;
inline constexpr double kDefaultBudgetSeconds = 10;
// auto measures the rates (TierRequest::rates_given) only with this much
// time left, and gives the measuring at most this share of it: a
// calibration takes 0.1-0.3 s (docs/tiers.md).
inline constexpr double kCalibrateFromSeconds = 0.5;
inline constexpr double kCalibrationShare = 0.25;

struct TierRequest {
  SearchTier tier = SearchTier::kAuto;
  // The time auto and idp plan for: the request's own deadline if it has
  // one, else a default (kDefaultBudgetSeconds). The scheduler's deadline,
  // if sooner, still ends everything.
  double budget_seconds = kDefaultBudgetSeconds;
  uint32_t slice_count = 0;  // the exact search's P; 0: the planner's
  // The capacity model's rates. Unless given, auto keeps the defaults
  // (which over-predict on the reference machine) while the exact search
  // fits by them, and measures this machine's rates for the query
  // (CalibrateRatesOnce) before it gives the exact search up.
  MachineRates rates;
  bool rates_given = false;
  // Where the cout tiers post each better plan as they find it (greedy's
  // first); null: nowhere. Must outlive the run.
  IncumbentBoard* board = nullptr;
};

struct TieredOutcome {
  SearchTier tier = SearchTier::kExact;  // the tier whose plan is returned
  bool proven_optimal = false;
  double coverage = 0;  // exact: the fraction of slices solved
  WidePlan plan;        // the answer (cout; the cluster model's chosen plan)
  // The cluster model's Pareto set, at any query size (the exact search's
  // frontier or the anytime set), by increasing latency_s, and the plan the
  // choice rule names (`plan` is that plan; none when no plan meets the
  // bounds, and `plan` is the first). Empty for the cout model.
  std::vector<WidePlan> frontier;
  std::optional<size_t> chosen;
  // The slices solved: the exact search's over the whole query (with its
  // retries, hedges and, for the cluster model, the frontier), or those of
  // idp's blocks (slice_count 0); empty for greedy and linear.
  ScheduleOutcome schedule;
  bool exact_ran = false;  // `schedule` is the whole query's exact search
  IdpStats idp;
  std::optional<ExactForecast> forecast;  // what auto predicted for exact
  double start_cost = 0;                  // the greedy plan's
  std::string reason;                     // one line: why this tier, what it did
  double wall_seconds = 0;
};

// Errors: INVALID_ARGUMENT for a tier the options exclude (the cluster
// model past exact, idp for left-deep plans) or a query the exact tier
// cannot take; NOT_FOUND without cross products on a disconnected join
// graph; the exact tier's own errors when it is forced; CANCELLED.
absl::StatusOr<TieredOutcome> RunTiers(const WideQuery& query, const SearchOptions& options,
                                       const TierRequest& request,
                                       std::span<SliceWorker* const> workers,
                                       const ScheduleOptions& schedule);

}  // namespace sliceplan

#endif  // SLICEPLAN_SCHEDULE_TIERED_SEARCH_H_
