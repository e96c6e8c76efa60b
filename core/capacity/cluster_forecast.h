// How long the cluster model's exact Pareto search would take, measured
// before it starts (docs/tiers.md, "Forecasting the cluster search").
//
// No closed form counts its work: the frontiers' sizes depend on the
// data and the physical choices. So the same search runs first on growing
// parts of the query (2, 3, ... relations, grown from relation 0 along
// the join graph, the lowest-numbered neighbour first) within a small
// budget. The time is splits times the work per split: the whole query's
// splits are counted (in closed form with cross products, by the cout
// search without). The work per split grows with the frontiers joined:
// its ratio over the last two parts is taken for the next relation, its
// square root for the one after, and so on (the frontiers saturate, so
// in all at most the ratio squared; an assumption of ours, measured
// against the search in bench/cluster_forecast_bench, docs/tiers.md).
//
// Not pure: it reads the clock. Thread-safe.
#ifndef SLICEPLAN_CORE_CAPACITY_CLUSTER_FORECAST_H_
#define SLICEPLAN_CORE_CAPACITY_CLUSTER_FORECAST_H_

#include <string>

#include "absl/status/statusor.h"
#include "core/model/query.h"
#include "core/search/search_control.h"
#include "core/search_options.h"

namespace sliceplan {

struct ClusterForecast {
  int relations = 0;          // the query's
  int probed = 0;             // relations of the largest part that finished
  double probed_seconds = 0;  // its time (best of up to three runs)
  double split_ratio = 1;     // the whole query's splits over the part's
  double growth = 1;          // work per split, ratio per added relation
  double seconds = 0;         // the whole search, one slice on one thread
  bool measured = false;      // the whole query finished: seconds is its time

  // "about 4.1e+03 s on one slice (measured on 4 of 6 relations: 0.31 s,
  // x21 per relation)".
  std::string Describe() const;
};

// The forecast for `query` under `options` (cost: cluster), spending at
// most about `budget_seconds` on the parts. Errors: CANCELLED /
// DEADLINE_EXCEEDED from `outer`; a part's own refusal (the memo limit).
absl::StatusOr<ClusterForecast> ForecastClusterSearch(const Query& query,
                                                      const SearchOptions& options,
                                                      double budget_seconds,
                                                      const SearchControl& outer = {});

// The splits the search over the relations `keep` of `query` offers,
// where only ratios matter: with cross products in closed form (bushy:
// 3^k - 2^(k+1) + 1, the ordered splits of every set of k relations;
// left-deep: k 2^(k-1) - k, a set's relations on the right), else the
// cout search's count over that part (connected-only, one slice, under
// `control`: 0 when it stopped it). Exposed for tests.
double ClusterSplitCount(const Query& query, RelSet keep, const SearchOptions& options,
                         SearchControl& control);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_CAPACITY_CLUSTER_FORECAST_H_
