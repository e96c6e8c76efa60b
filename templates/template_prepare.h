// Preparing a query template (docs/templates.md): the template optimized
// exactly at every point of a log-spaced grid over its parameter box, the
// distinct optima costed at every point, and the fewest of them kept such
// that at every point a kept plan costs at most max_ratio times the
// optimum (core/plan_cover.h); choosing one of the kept plans for given
// values. Thread-safe: calls share nothing.
#ifndef SLICEPLAN_TEMPLATES_TEMPLATE_PREPARE_H_
#define SLICEPLAN_TEMPLATES_TEMPLATE_PREPARE_H_

#include <cstddef>
#include <functional>
#include <optional>
#include <span>
#include <vector>

#include "absl/status/statusor.h"
#include "core/model/plan.h"
#include "core/search_options.h"
#include "wire/query_template.h"

namespace sliceplan {

inline constexpr int kMinGrid = 2;
inline constexpr int kMaxGrid = 64;
// The most grid points one prepare optimizes (each is an exact search).
inline constexpr size_t kMaxGridPoints = 65536;

// One grid point's exact optimum: the plan, or an error that ends the
// prepare (named with the point). Called from `workers` threads at once.
using PointSolver =
    std::function<absl::StatusOr<Plan>(const Query& at_point, const SearchOptions& options)>;

struct PrepareOptions {
  int grid = 8;            // G values per parameter
  double max_ratio = 1.2;  // the guarantee asked for, >= 1
  int workers = 1;         // grid points optimized at once
  SearchOptions search;    // the cout model
  // Empty: the exact search in this process (SolveSlice, one slice). The
  // coordinator passes one that runs each point on its pool.
  PointSolver solve_point;
  std::function<void(size_t done, size_t total)> on_progress;  // may be empty
};

struct PreparedPlans {
  int grid = 0;
  double max_ratio = 0;
  std::vector<Plan> plans;         // the kept plans (relations and shape only)
  std::vector<double> plan_worst;  // each kept plan's largest ratio on the grid
  double worst_ratio = 1;          // the grid guarantee achieved
  // A bound anywhere in the box, not only on the grid: C_out grows with
  // every rows and selectivity value, so in each grid cell the best kept
  // plan costs at most its cost at the cell's upper corner over the
  // optimum at its lower corner (docs/templates.md). >= worst_ratio.
  // None for a template with an anti join, whose estimate falls as its
  // right input grows.
  std::optional<double> box_ratio_bound;
  size_t grid_points = 0;
  size_t distinct_optima = 0;
  double seconds = 0;
};

// What a prepare reports (the CLI's text and JSON, the RPC's report).
struct PrepareFigures {
  size_t stored_plans = 0;
  size_t grid_points = 0;
  int grid = 0;
  size_t distinct_optima = 0;
  double max_ratio = 0;    // asked
  double worst_ratio = 1;  // achieved on the grid
  std::optional<double> box_ratio_bound;
  double seconds = 0;
};
PrepareFigures FiguresOf(const PreparedPlans& prepared);

// v_i = min (max / min)^(i / (G - 1)), i = 0 .. G-1 (docs/interfaces.md).
std::vector<double> GridValues(const TemplateParameter& p, int grid);

// Errors: INVALID_ARGUMENT for a grid outside [kMinGrid, kMaxGrid], a
// max_ratio below 1, the cluster model; RESOURCE_EXHAUSTED, with the
// numbers, for more than kMaxGridPoints points (checked first); a search's
// error at a point, naming the point.
absl::StatusOr<PreparedPlans> PrepareTemplate(const QueryTemplate& t,
                                              const PrepareOptions& options);

struct StoredChoice {
  size_t index = 0;  // into PreparedPlans::plans
  Plan plan;         // costed at the values
};

// The kept plan cheapest at `values` (each plan costed there), or with
// `robust` the one whose largest ratio on the grid is least, costed at the
// values. Errors: the template's for values (At).
absl::StatusOr<StoredChoice> ChooseStoredPlan(const QueryTemplate& t, const PreparedPlans& prepared,
                                              std::span<const double> values, bool robust);
// The same on the query already made at the values (QueryTemplate::At).
// REQUIRES: prepared.plans is not empty.
StoredChoice ChooseStoredPlan(const PreparedPlans& prepared, const Query& at_values, bool robust);

}  // namespace sliceplan

#endif  // SLICEPLAN_TEMPLATES_TEMPLATE_PREPARE_H_
