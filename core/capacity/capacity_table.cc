#include "core/capacity/capacity_table.h"

#include <algorithm>
#include <cmath>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "core/capacity/cluster_forecast.h"
#include "core/capacity/rate_calibration.h"
#include "core/model/status_macros.h"
#include "core/slice_planner.h"

namespace sliceplan {
namespace {

// A worker solves one slice at a time on `options.threads` threads; the
// slice count is the one auto would run (FastestForecast).
CapacityRow Row(const Query& query, const SearchOptions& options, const ExactWork& work,
                int workers, const MachineRates& rates) {
  const ExactForecast f = FastestForecast(query, options, work, workers, rates);
  CapacityRow row;
  row.workers = workers;
  row.slices = f.slices;
  row.seconds = f.seconds;
  row.memo_bytes = f.memo_bytes;
  row.fits_memo = f.memo_bytes <= static_cast<double>(options.memo_limit_bytes);
  return row;
}

std::string Summary(const CapacityTable& t) {
  if (t.enough_workers) {
    std::string s = absl::StrFormat("%d worker%s finish%s the exact search within %.3g s.",
                                    *t.enough_workers, *t.enough_workers == 1 ? "" : "s",
                                    *t.enough_workers == 1 ? "es" : "", t.deadline_seconds);
    if (t.auto_exact_workers == 1) {
      absl::StrAppendFormat(&s,
                            " auto runs it on any of these pools (predicted within %.0f%% of "
                            "the deadline).",
                            100 * kExactShare);
    } else if (t.auto_exact_workers) {
      absl::StrAppendFormat(&s,
                            " auto runs it from %d workers (predicted within %.0f%% of the "
                            "deadline); on fewer it returns the best of greedy, linear and "
                            "idp.",
                            *t.auto_exact_workers, 100 * kExactShare);
    }
    return s;
  }
  return absl::StrFormat(
      "No pool of up to %d workers finishes the exact search within %.3g s: auto would return "
      "the best of greedy and linear, improved by idp (blocks searched exactly over the pool) "
      "until the deadline, not proven optimal.",
      kCapacityMaxWorkers, t.deadline_seconds);
}

}  // namespace

absl::Status CheckCapacityRequest(double deadline_seconds, int threads_per_worker) {
  if (!std::isfinite(deadline_seconds) || !(deadline_seconds > 0)) {
    return absl::InvalidArgumentError(
        absl::StrCat("deadline: must be a finite number of seconds > 0, got ", deadline_seconds));
  }
  if (threads_per_worker < 1 || threads_per_worker > kCapacityMaxThreads) {
    return absl::InvalidArgumentError(absl::StrCat(
        "threads per worker: must be in 1..", kCapacityMaxThreads, ", got ", threads_per_worker));
  }
  return absl::OkStatus();
}

absl::StatusOr<CapacityTable> PlanCapacity(const Query& query, const SearchOptions& options,
                                           double deadline_seconds, int threads_per_worker,
                                           const MachineRates& rates) {
  RETURN_IF_ERROR(CheckCapacityRequest(deadline_seconds, threads_per_worker));
  CapacityTable t;
  t.deadline_seconds = deadline_seconds;
  t.threads_per_worker = threads_per_worker;
  t.rates = rates;
  SearchOptions threaded = options;
  threaded.threads = threads_per_worker;
  const ExactWork work = MeasureExactWork(query, options);
  t.estimated = work.estimated;
  for (int w = 1; w <= kCapacityMaxWorkers; w *= 2) {
    const CapacityRow row = Row(query, threaded, work, w, rates);
    if (row.fits_memo && row.seconds <= deadline_seconds && !t.enough_workers) {
      t.enough_workers = w;
    }
    if (row.fits_memo && row.seconds <= kExactShare * deadline_seconds && !t.auto_exact_workers) {
      t.auto_exact_workers = w;
    }
    t.rows.push_back(row);
  }
  t.summary = Summary(t);
  return t;
}

CapacityTable CapacityPastExact(int relations, double deadline_seconds, int threads_per_worker) {
  CapacityTable t;
  t.deadline_seconds = deadline_seconds;
  t.threads_per_worker = threads_per_worker;
  t.summary = absl::StrFormat(
      "%d relations: past the exact search's %d, so no pool runs it. auto returns the best of "
      "greedy%s, improved by idp (blocks searched exactly over the pool) until the deadline.",
      relations, kMaxRelations, relations <= kMaxLinearTierRelations ? " and linear" : "");
  return t;
}

absl::StatusOr<CapacityTable> PlanClusterCapacity(const Query& query, const SearchOptions& options,
                                                  double deadline_seconds, int threads_per_worker) {
  RETURN_IF_ERROR(CheckCapacityRequest(deadline_seconds, threads_per_worker));
  ASSIGN_OR_RETURN(const ClusterForecast f,
                   ForecastClusterSearch(query, options, kClusterForecastMaxSeconds));
  CapacityTable t;
  t.deadline_seconds = deadline_seconds;
  t.threads_per_worker = threads_per_worker;
  t.estimated = !f.measured;
  t.cluster_forecast = f.Describe();
  const int reach = options.cross_products ? kClusterExactReach : kClusterExactReachConnected;
  for (int w = 1; w <= kCapacityMaxWorkers; w *= 2) {
    CapacityRow row;
    row.workers = w;
    row.slices = ChooseSliceCount(query, options, w);
    row.seconds = f.seconds / std::min<double>(row.slices, w);
    if (row.seconds <= deadline_seconds && !t.enough_workers) t.enough_workers = w;
    // Auto gives the exact search half the time (docs/tiers.md).
    if (query.size() <= reach && row.seconds <= deadline_seconds / 2 && !t.auto_exact_workers) {
      t.auto_exact_workers = w;
    }
    t.rows.push_back(row);
  }
  t.summary = absl::StrCat("The cluster model's exact Pareto search ",
                           f.measured ? "ran whole: " : "is forecast at ", f.Describe(), ".");
  if (t.enough_workers) {
    absl::StrAppendFormat(&t.summary, " %d worker%s finish%s it within %.3g s", *t.enough_workers,
                          *t.enough_workers == 1 ? "" : "s", *t.enough_workers == 1 ? "es" : "",
                          deadline_seconds);
    if (t.auto_exact_workers) {
      absl::StrAppendFormat(&t.summary, "; auto runs it from %d worker%s (half the time)",
                            *t.auto_exact_workers, *t.auto_exact_workers == 1 ? "" : "s");
    }
    t.summary += *t.enough_workers > 1 ? ", if the slices share the work evenly" : "";
    t.summary += "; memory is not forecast.";
  } else {
    absl::StrAppendFormat(&t.summary,
                          " No pool of up to %d workers finishes it within %.3g s: auto returns "
                          "the anytime search's Pareto set, not proven.",
                          kCapacityMaxWorkers, deadline_seconds);
  }
  return t;
}

absl::StatusOr<CapacityTable> PlanCapacityFor(const WideQuery& query, const SearchOptions& options,
                                              double deadline_seconds, int threads_per_worker,
                                              MachineRates rates, bool own_rate_given) {
  if (query.size() > kMaxRelations) {
    if (!std::isfinite(deadline_seconds) || !(deadline_seconds > 0)) {
      return absl::InvalidArgumentError(
          absl::StrCat("deadline: must be a finite number of seconds > 0, got ", deadline_seconds));
    }
    return CapacityPastExact(query.size(), deadline_seconds, threads_per_worker);
  }
  ASSIGN_OR_RETURN(const Query exact, ToExactQuery(query));
  if (options.cost == CostModelKind::kCluster) {
    return PlanClusterCapacity(exact, options, deadline_seconds, threads_per_worker);
  }
  if (!own_rate_given) {
    ASSIGN_OR_RETURN(const MachineRates measured, CalibrateRates(exact, options));
    if (options.cross_products) {
      rates.dense_split_seconds = measured.dense_split_seconds;
    } else {
      rates.connected_set_seconds = measured.connected_set_seconds;
    }
  }
  return PlanCapacity(exact, options, deadline_seconds, threads_per_worker, rates);
}

}  // namespace sliceplan
