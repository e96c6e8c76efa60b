#include "templates/template_prepare.h"

#include <atomic>
#include <chrono>
#include <cmath>
#include <limits>
#include <map>
#include <mutex>
#include <thread>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_join.h"
#include "core/model/status_macros.h"
#include "core/plan_cover.h"
#include "core/slice_solver.h"

namespace sliceplan {
namespace {

// A plan's shape as a key: each node's set and children.
std::string ShapeKey(const Plan& plan) {
  std::string key;
  for (const PlanNode& n : plan.nodes)
    absl::StrAppend(&key, n.relations, ",", n.left, ",", n.right, ";");
  return key;
}

// The grid point of index `x`, parameter 0 varying fastest.
std::vector<double> PointAt(size_t x, const std::vector<std::vector<double>>& axes) {
  std::vector<double> values;
  for (const auto& axis : axes) {
    values.push_back(axis[x % axis.size()]);
    x /= axis.size();
  }
  return values;
}

absl::Status CheckOptions(const QueryTemplate& t, const PrepareOptions& o, size_t& points) {
  if (o.grid < kMinGrid || o.grid > kMaxGrid) {
    return absl::InvalidArgumentError(
        absl::StrCat("--grid: ", o.grid, " is outside ", kMinGrid, "..", kMaxGrid));
  }
  if (!(o.max_ratio >= 1) || !std::isfinite(o.max_ratio)) {
    return absl::InvalidArgumentError(absl::StrCat("--max-ratio: must be >= 1, got ", o.max_ratio));
  }
  if (o.search.cost != CostModelKind::kCout) {
    return absl::InvalidArgumentError(
        "prepare: the cout model only (a Pareto set per grid point is not stored yet)");
  }
  points = 1;
  for (size_t i = 0; i < t.parameters().size(); ++i) {
    points *= static_cast<size_t>(o.grid);
    if (points > kMaxGridPoints) {
      return absl::ResourceExhaustedError(absl::StrCat(
          "--grid: ", o.grid, " values for each of ", t.parameters().size(),
          " parameters is more than ", kMaxGridPoints, " grid points; use a smaller grid"));
    }
  }
  return absl::OkStatus();
}

bool HasAntiJoin(const Query& q) {
  for (const JoinOp& op : q.joins()) {
    if (op.type == JoinType::kAnti) return true;
  }
  return false;
}

// Each grid point's exact optimum by the search in this process.
absl::StatusOr<Plan> SolveInProcess(const Query& q, const SearchOptions& search) {
  SearchControl control;
  ASSIGN_OR_RETURN(SliceResult r, SolveSlice(q, search, {0, 1}, control));
  if (!r.plan) return absl::NotFoundError("no plan joins all relations without a cross product");
  return *std::move(r.plan);
}

// The bound of PreparedPlans::box_ratio_bound: over the grid's cells, the
// least over kept plans of their cost at the cell's upper corner over the
// optimum at its lower corner. costs[p][x] as PointAt numbers x. With no
// parameter the grid is one point and the bound is its ratio.
double BoxRatioBound(const std::vector<std::vector<double>>& costs,
                     const std::vector<double>& optimum,
                     const std::vector<std::vector<double>>& axes) {
  const size_t d = axes.size();
  if (d == 0) return 1;
  const size_t g = axes[0].size();
  double worst = 1;
  // Each cell by its lower corner: every coordinate below g - 1.
  for (size_t lower = 0; lower < optimum.size(); ++lower) {
    size_t upper = 0, stride = 1, rest = lower;
    bool cell = true;
    for (size_t i = 0; i < d; ++i, stride *= g, rest /= g) {
      cell = cell && rest % g + 1 < g;
      upper += (rest % g + 1) * stride;
    }
    if (!cell) continue;
    double best = std::numeric_limits<double>::infinity();
    for (const auto& plan : costs) best = std::min(best, plan[upper] / optimum[lower]);
    worst = std::max(worst, best);
  }
  return worst;
}

}  // namespace

PrepareFigures FiguresOf(const PreparedPlans& p) {
  return {p.plans.size(), p.grid_points,     p.grid,   p.distinct_optima, p.max_ratio,
          p.worst_ratio,  p.box_ratio_bound, p.seconds};
}

std::vector<double> GridValues(const TemplateParameter& p, int grid) {
  std::vector<double> out;
  for (int i = 0; i < grid; ++i) {
    out.push_back(i == grid - 1
                      ? p.max
                      : p.min * std::pow(p.max / p.min, static_cast<double>(i) / (grid - 1)));
  }
  return out;
}

absl::StatusOr<PreparedPlans> PrepareTemplate(const QueryTemplate& t,
                                              const PrepareOptions& options) {
  const auto start = std::chrono::steady_clock::now();
  size_t points = 0;
  RETURN_IF_ERROR(CheckOptions(t, options, points));
  std::vector<std::vector<double>> axes;
  for (const TemplateParameter& p : t.parameters()) axes.push_back(GridValues(p, options.grid));
  std::vector<Query> queries;
  queries.reserve(points);
  for (size_t x = 0; x < points; ++x) {
    ASSIGN_OR_RETURN(Query q, t.At(PointAt(x, axes)));
    queries.push_back(std::move(q));
  }
  // Every point's exact optimum, `workers` points at a time.
  std::vector<std::optional<Plan>> optima(points);
  std::vector<absl::Status> errors(points);
  std::atomic<size_t> next{0}, done{0};
  std::atomic<bool> failed{false};
  const PointSolver solve = options.solve_point ? options.solve_point : PointSolver(SolveInProcess);
  std::mutex progress_mu;
  const auto work = [&] {
    for (size_t x; (x = next.fetch_add(1)) < points;) {
      // After a point's error the rest is not worth solving.
      if (failed.load()) break;
      auto r = solve(queries[x], options.search);
      if (r.ok()) {
        optima[x] = *std::move(r);
      } else {
        errors[x] = r.status();
        failed.store(true);
      }
      const size_t d = done.fetch_add(1) + 1;
      if (options.on_progress) {
        std::lock_guard<std::mutex> lock(progress_mu);
        options.on_progress(d, points);
      }
    }
  };
  std::vector<std::thread> threads;
  for (int w = 1; w < std::max(1, options.workers); ++w) threads.emplace_back(work);
  work();
  for (std::thread& th : threads) th.join();
  for (size_t x = 0; x < points; ++x) {
    if (!errors[x].ok()) {
      return absl::Status(errors[x].code(),
                          absl::StrCat("grid point (", absl::StrJoin(PointAt(x, axes), ", "),
                                       "): ", errors[x].message()));
    }
  }
  // The distinct optima, each costed at every point.
  std::map<std::string, size_t> index;
  std::vector<Plan> candidates;
  std::vector<double> optimum(points);
  for (size_t x = 0; x < points; ++x) {
    if (!optima[x]) return absl::InternalError("a grid point was left unsolved");
    optimum[x] = optima[x]->root().cost;
    if (index.emplace(ShapeKey(*optima[x]), candidates.size()).second) {
      candidates.push_back(*optima[x]);
    }
  }
  std::vector<std::vector<double>> costs(candidates.size(), std::vector<double>(points));
  for (size_t p = 0; p < candidates.size(); ++p) {
    for (size_t x = 0; x < points; ++x) {
      Plan copy = candidates[p];
      costs[p][x] = CostPlanOn(copy, queries[x]);
    }
  }
  const GridCover cover = CoverGrid(costs, optimum, options.max_ratio);
  PreparedPlans out;
  out.grid = options.grid;
  out.max_ratio = options.max_ratio;
  for (size_t p : cover.kept) out.plans.push_back(candidates[p]);
  out.plan_worst = cover.kept_worst;
  out.worst_ratio = cover.worst_ratio;
  std::vector<std::vector<double>> kept_costs;
  for (size_t p : cover.kept) kept_costs.push_back(costs[p]);
  if (!HasAntiJoin(queries[0])) {
    out.box_ratio_bound = std::max(cover.worst_ratio, BoxRatioBound(kept_costs, optimum, axes));
  }
  out.grid_points = points;
  out.distinct_optima = candidates.size();
  out.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  return out;
}

StoredChoice ChooseStoredPlan(const PreparedPlans& prepared, const Query& at_values, bool robust) {
  StoredChoice best;
  if (robust) {
    // The least worst ratio on the grid, whatever the values: costed once.
    for (size_t p = 1; p < prepared.plans.size(); ++p) {
      if (prepared.plan_worst[p] < prepared.plan_worst[best.index]) best.index = p;
    }
    best.plan = prepared.plans[best.index];
    CostPlanOn(best.plan, at_values);
    return best;
  }
  for (size_t p = 0; p < prepared.plans.size(); ++p) {
    Plan plan = prepared.plans[p];
    const double cost = CostPlanOn(plan, at_values);
    if (p == 0 || cost < best.plan.root().cost) {
      best.index = p;
      best.plan = std::move(plan);
    }
  }
  return best;
}

absl::StatusOr<StoredChoice> ChooseStoredPlan(const QueryTemplate& t, const PreparedPlans& prepared,
                                              std::span<const double> values, bool robust) {
  if (prepared.plans.empty()) return absl::FailedPreconditionError("the plan set holds no plan");
  ASSIGN_OR_RETURN(const Query q, t.At(values));
  return ChooseStoredPlan(prepared, q, robust);
}

}  // namespace sliceplan
