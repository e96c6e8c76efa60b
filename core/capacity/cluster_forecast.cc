#include "core/capacity/cluster_forecast.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <optional>
#include <vector>

#include "absl/strings/str_format.h"
#include "core/capacity/rate_calibration.h"
#include "core/graph/join_graph.h"
#include "core/model/status_macros.h"
#include "core/slice_solver.h"

namespace sliceplan {
namespace {

// A part faster than this is timed three times, best kept: a ratio of two
// sub-millisecond times is mostly noise.
constexpr double kRepeatBelowSeconds = 0.005;
constexpr int kRepeats = 3;
// The work per split grows by at least 1 per relation (a larger set's
// frontiers are never smaller in the model's worst case).
constexpr double kMinGrowth = 1.0;

// Splits per added relation when the whole query's count did not finish
// and fewer than two parts did (a guess of ours: at least doubling).
constexpr double kSplitGrowthGuess = 2.0;

// The smallest part whose work per split guides the growth.
constexpr int kFirstGuide = 3;

using Clock = std::chrono::steady_clock;

// The relations in the order the parts grow: from relation 0, the
// lowest-numbered neighbour of what is taken first (the lowest untaken
// relation where none is: a cross product).
std::vector<RelSet> GrowthOrder(const Query& query) {
  const JoinGraph graph(query);
  std::vector<RelSet> parts;
  RelSet taken = 1;
  parts.push_back(taken);
  while (taken != query.all()) {
    const RelSet around = graph.Around(taken);
    taken |= LowestBit(around != 0 ? around : query.all() & ~taken);
    parts.push_back(taken);
  }
  return parts;
}

}  // namespace

double ClusterSplitCount(const Query& query, RelSet keep, const SearchOptions& options,
                         SearchControl& control) {
  const double k = Size(keep);
  if (options.cross_products) {
    return options.shape == PlanShape::kBushy ? (std::pow(3, k) - std::pow(2, k + 1) + 1) / 2
                                              : k * std::pow(2, k - 1) - k;
  }
  SearchOptions cout = options;
  cout.cost = CostModelKind::kCout;
  const auto result = SolveSlice(QueryPart(query, keep), cout, {0, 1}, control);
  if (absl::IsCancelled(result.status()) || absl::IsDeadlineExceeded(result.status())) return 0;
  return result.ok() ? std::max<double>(1, static_cast<double>(result->stats.splits)) : 1;
}

namespace {

// The cluster search of `part` (best of up to kRepeats runs where fast),
// or none when it did not finish by `end`.
absl::StatusOr<std::optional<double>> TimePart(const Query& part, const SearchOptions& options,
                                               Clock::time_point end, const SearchControl& outer) {
  double best = 0;
  for (int run = 0; run < kRepeats; ++run) {
    SearchControl control = outer;
    control.TightenDeadline(end);
    const Clock::time_point start = Clock::now();
    const auto result = SolveSlice(part, options, {0, 1}, control);
    const double t = SecondsBetween(start, Clock::now());
    if (absl::IsDeadlineExceeded(result.status()) &&
        !(outer.deadline() && Clock::now() >= *outer.deadline())) {
      return std::nullopt;
    }
    if (!result.ok()) return result.status();
    best = run == 0 ? t : std::min(best, t);
    if (best >= kRepeatBelowSeconds) break;
  }
  return best;
}

}  // namespace

std::string ClusterForecast::Describe() const {
  if (measured) {
    return absl::StrFormat("%.3g s on one slice (the whole query, measured)", seconds);
  }
  return absl::StrFormat(
      "about %.3g s on one slice (measured on %d of %d relations: %.3g s; %.3g times the "
      "splits, each x%.3g the work per relation)",
      seconds, probed, relations, probed_seconds, split_ratio, growth);
}

absl::StatusOr<ClusterForecast> ForecastClusterSearch(const Query& query,
                                                      const SearchOptions& options,
                                                      double budget_seconds,
                                                      const SearchControl& outer) {
  const Clock::time_point start = Clock::now();
  const Clock::time_point end =
      start + std::chrono::duration_cast<Clock::duration>(
                  std::chrono::duration<double>(std::max(budget_seconds, 0.0)));
  ClusterForecast f;
  f.relations = query.size();
  f.probed = 1;
  double before = 0;         // the previous part's time per split
  double probed_splits = 1;  // the largest finished part's splits
  double before_splits = 0;  // ... and the one before's
  bool ran_out = false;
  for (const RelSet keep : GrowthOrder(query)) {
    if (Size(keep) < 2) continue;
    const double left_at_start = SecondsBetween(Clock::now(), end);
    ASSIGN_OR_RETURN(const std::optional<double> t,
                     TimePart(QueryPart(query, keep), options, end, outer));
    if (!t) {
      // No part finished: the time it had, one relation short, is the
      // best known.
      if (f.probed < 2) f.probed_seconds = std::max(left_at_start, 0.0);
      ran_out = true;
      break;
    }
    SearchControl unbounded;  // a part that finished its cluster search counts fast
    const double splits = ClusterSplitCount(query, keep, options, unbounded);
    const double per_split = *t / splits;
    // Two relations are leaves joined once: their frontiers are no guide
    // to the growth, which is read from parts of three relations on.
    if (before > 0 && Size(keep) > kFirstGuide) f.growth = std::max(kMinGrowth, per_split / before);
    before = per_split;
    f.probed = Size(keep);
    f.probed_seconds = *t;
    before_splits = probed_splits;
    probed_splits = splits;
  }
  f.measured = f.probed == f.relations && !ran_out;
  if (f.relations < 2) f.measured = true;
  if (f.measured) {
    f.seconds = f.probed_seconds;
    return f;
  }
  // The whole query's count, within the outer control and one more budget:
  // a connected-only count of a large query is itself a search. Past
  // that, the last two parts' ratio per further relation.
  SearchControl count_control = outer;
  count_control.TightenDeadline(Clock::now() + (end - start));
  const double whole = ClusterSplitCount(query, query.all(), options, count_control);
  if (whole > 0) {
    f.split_ratio = whole / probed_splits;
  } else {
    const double per_relation =
        before_splits > 0 ? std::max(1.0, probed_splits / before_splits) : kSplitGrowthGuess;
    f.split_ratio = std::pow(per_relation, f.relations - f.probed);
  }
  // The work per split grows as the frontiers joined grow, and they
  // saturate: each further relation's growth is the square root of the
  // last one's (in all, at most growth^2).
  double work = 1;
  for (int k = f.probed + 1, i = 0; k <= f.relations; ++k, ++i) {
    work *= std::pow(f.growth, std::ldexp(1.0, -i));
  }
  f.seconds = f.probed_seconds * f.split_ratio * work;
  return f;
}

}  // namespace sliceplan
