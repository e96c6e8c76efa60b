#include "core/cost/pareto.h"

#include <algorithm>
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
  std::vector<size_t> out;
  for (size_t i : order) {
    bool beaten = false;
    for (size_t j : out) {  // kept ones come earlier in the order
      if (DominatesOrEquals(plans[j], plans[i], o)) {
        beaten = true;
        break;
      }
    }
    if (!beaten) out.push_back(i);
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
