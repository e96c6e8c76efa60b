#include "core/cost/pareto.h"

#include <algorithm>
#include <map>
#include <numeric>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_join.h"
#include "absl/strings/str_split.h"

namespace sliceplan {

absl::StatusOr<Objectives> ParseObjectives(const std::string& text) {
  Objectives out{0};
  for (absl::string_view part : absl::StrSplit(text, ',')) {
    uint8_t bit = 0;
    if (part == "latency_s")
      bit = Objectives::kLatency;
    else if (part == "node_seconds")
      bit = Objectives::kNodeSeconds;
    else if (part == "completeness")
      bit = Objectives::kCompleteness;
    else {
      return absl::InvalidArgumentError(
          absl::StrCat("objectives: unknown objective \"", part,
                       "\" (use latency_s, node_seconds, completeness)"));
    }
    if (out.has(bit)) {
      return absl::InvalidArgumentError(absl::StrCat("objectives: \"", part, "\" listed twice"));
    }
    out.mask |= bit;
  }
  if (out.mask == 0) return absl::InvalidArgumentError("objectives: empty");
  return out;
}

std::string ObjectivesString(Objectives o) {
  std::vector<std::string> names;
  if (o.has(Objectives::kLatency)) names.push_back("latency_s");
  if (o.has(Objectives::kNodeSeconds)) names.push_back("node_seconds");
  if (o.has(Objectives::kCompleteness)) names.push_back("completeness");
  return absl::StrJoin(names, ",");
}

bool DominatesOrEquals(const ClusterCosts& p, const ClusterCosts& q, Objectives o) {
  // Completeness is a product of sample rates taken in tree order, so equal
  // levels differ in the last places; closer than kCompletenessTolerance
  // counts as equal.
  return (!o.has(Objectives::kLatency) || p.latency_s <= q.latency_s) &&
         (!o.has(Objectives::kNodeSeconds) || p.node_seconds <= q.node_seconds) &&
         (!o.has(Objectives::kCompleteness) ||
          p.completeness >= q.completeness * (1 - kCompletenessTolerance));
}

std::vector<size_t> FrontierIndices(std::span<const ClusterCosts> plans, Objectives o) {
  std::vector<size_t> order(plans.size());
  std::iota(order.begin(), order.end(), size_t{0});
  // Selected objectives first, so that a dominator always sorts before
  // what it dominates; the unselected ones only break ties.
  const auto less = [&](const ClusterCosts& x, const ClusterCosts& y, bool selected) {
    const uint8_t m = selected ? o.mask : static_cast<uint8_t>(~o.mask);
    if ((m & Objectives::kLatency) && x.latency_s != y.latency_s) return x.latency_s < y.latency_s;
    if ((m & Objectives::kNodeSeconds) && x.node_seconds != y.node_seconds) {
      return x.node_seconds < y.node_seconds;
    }
    if ((m & Objectives::kCompleteness) && x.completeness != y.completeness) {
      return x.completeness > y.completeness;
    }
    return false;
  };
  std::stable_sort(order.begin(), order.end(), [&](size_t a, size_t b) {
    if (less(plans[a], plans[b], true)) return true;
    if (less(plans[b], plans[a], true)) return false;
    return less(plans[a], plans[b], false);
  });
  // In that order every kept plan is at least as good on the first
  // selected objective, so a plan is beaten when some kept plan is at
  // least as good on the other two: a staircase of the kept plans over
  // those two (b and c, lower is better) answers that in O(log n), where
  // a scan of the kept plans made the filter quadratic (seconds at 18,000
  // plans).
  const bool lat = o.has(Objectives::kLatency), ns = o.has(Objectives::kNodeSeconds);
  const bool comp = o.has(Objectives::kCompleteness);
  const int first = lat ? 0 : ns ? 1 : 2;
  // b: node-seconds after latency, else latency never (0); c: completeness
  // (negated; its tolerance as slack) unless it is the first.
  const auto b_of = [&](const ClusterCosts& x) { return first == 0 && ns ? x.node_seconds : 0.0; };
  const auto c_of = [&](const ClusterCosts& x) {
    return first < 2 && comp ? -x.completeness : 0.0;
  };
  const auto slack_of = [&](const ClusterCosts& x) {
    return first < 2 && comp ? x.completeness * kCompletenessTolerance : 0.0;
  };
  std::map<double, double> stairs;  // b -> c, c falling as b rises
  std::vector<size_t> out;
  for (size_t i : order) {
    const double b = b_of(plans[i]), c = c_of(plans[i]);
    auto at = stairs.upper_bound(b);
    if (at != stairs.begin() && std::prev(at)->second <= c + slack_of(plans[i])) continue;
    // Drop what the new plan covers on both, then add it.
    for (at = stairs.lower_bound(b); at != stairs.end() && at->second >= c;) at = stairs.erase(at);
    stairs[b] = c;
    out.push_back(i);
  }
  // Present the frontier by increasing latency_s whatever the objectives.
  std::stable_sort(out.begin(), out.end(), [&](size_t a, size_t b) {
    if (plans[a].latency_s != plans[b].latency_s) return plans[a].latency_s < plans[b].latency_s;
    if (plans[a].node_seconds != plans[b].node_seconds) {
      return plans[a].node_seconds < plans[b].node_seconds;
    }
    return plans[a].completeness > plans[b].completeness;
  });
  return out;
}

}  // namespace sliceplan
