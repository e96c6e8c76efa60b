#include "core/search_options.h"

#include <cmath>

#include "absl/strings/str_cat.h"
#include "core/model/status_macros.h"

namespace sliceplan {

std::string MetricName(CostModelKind model) {
  switch (model) {
    case CostModelKind::kCout:
      return "cout";
    case CostModelKind::kCluster:
      return "latency_s";
  }
  return "unknown";
}

absl::Status ValidateSearchOptions(const SearchOptions& options) {
  if (options.threads < 1 || options.threads > kMaxSearchThreads) {
    return absl::InvalidArgumentError(
        absl::StrCat("threads: must be 1 to ", kMaxSearchThreads, ", got ", options.threads));
  }
  if (options.cost != CostModelKind::kCluster) {
    if (options.cluster.alpha != 1) {
      return absl::InvalidArgumentError(
          "alpha: only the cluster model's Pareto search takes a precision");
    }
    return absl::OkStatus();
  }
  RETURN_IF_ERROR(ValidateClusterParams(options.cluster.params));
  const double alpha = options.cluster.alpha;
  if (!(std::isfinite(alpha) && alpha >= 1)) {
    return absl::InvalidArgumentError(
        absl::StrCat("alpha: must be a finite number >= 1 (1 is exact), got ", alpha));
  }
  if (options.cluster.objectives.mask == 0) {
    return absl::InvalidArgumentError("objectives: empty");
  }
  return absl::OkStatus();
}

absl::Status CheckOptionLimits(const SearchOptions& options, const InputLimits& limits) {
  if (options.cost != CostModelKind::kCluster) return absl::OkStatus();
  const ClusterParams& p = options.cluster.params;
  if (static_cast<int64_t>(p.node_counts.size()) > limits.max_node_counts) {
    return absl::ResourceExhaustedError(absl::StrCat(
        "node_counts: ", p.node_counts.size(), " given; the limit is ", limits.max_node_counts));
  }
  if (static_cast<int64_t>(p.sample_rates.size()) > limits.max_sample_rates) {
    return absl::ResourceExhaustedError(absl::StrCat(
        "sample_rates: ", p.sample_rates.size(), " given; the limit is ", limits.max_sample_rates));
  }
  return absl::OkStatus();
}

}  // namespace sliceplan
