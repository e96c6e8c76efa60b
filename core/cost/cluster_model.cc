#include "core/cost/cluster_model.h"

#include <algorithm>
#include <cmath>

#include "absl/strings/str_cat.h"
#include "core/model/value_range.h"

namespace sliceplan {
namespace {

absl::Status Positive(const char* field, double v) {
  if (std::isfinite(v) && v > 0) return absl::OkStatus();
  return absl::InvalidArgumentError(absl::StrCat(field, ": must be a finite number > 0, got ", v));
}

// The formulas as written; inf when an input is past double range.
double StageSecondsUnsaturated(const ClusterParams& p, JoinStrategy strategy, int m,
                               const StageInput& left, const StageInput& right, double out_rows) {
  const double nodes = m;
  const double b_l = left.rows * left.width, b_r = right.rows * right.width;
  const double scanned = (left.leaf ? b_l : 0) + (right.leaf ? b_r : 0);
  const double scan_s = scanned / (nodes * p.scan_bytes_per_s);
  const double base = p.stage_startup_s + scan_s;
  switch (strategy) {
    case JoinStrategy::kShuffle:
      return base + (b_l + b_r) / (nodes * p.net_bytes_per_s) +
             (left.rows + right.rows + out_rows) / (nodes * p.cpu_rows_per_s);
    case JoinStrategy::kBroadcastRight:
      return base + b_r / p.net_bytes_per_s +
             (left.rows / nodes + right.rows + out_rows / nodes) / p.cpu_rows_per_s;
    case JoinStrategy::kBroadcastLeft:
      return base + b_l / p.net_bytes_per_s +
             (right.rows / nodes + left.rows + out_rows / nodes) / p.cpu_rows_per_s;
  }
  return base;
}

}  // namespace

absl::Status ValidateClusterParams(const ClusterParams& p) {
  if (p.node_counts.empty()) return absl::InvalidArgumentError("node_counts: empty");
  for (size_t i = 0; i < p.node_counts.size(); ++i) {
    if (p.node_counts[i] < 1 || p.node_counts[i] > kMaxNodeCount) {
      return absl::InvalidArgumentError(absl::StrCat("node_counts[", i,
                                                     "]: must be a whole number in 1..",
                                                     kMaxNodeCount, ", got ", p.node_counts[i]));
    }
    if (std::count(p.node_counts.begin(), p.node_counts.end(), p.node_counts[i]) > 1) {
      return absl::InvalidArgumentError(
          absl::StrCat("node_counts[", i, "]: ", p.node_counts[i], " is listed twice"));
    }
  }
  if (p.sample_rates.empty()) return absl::InvalidArgumentError("sample_rates: empty");
  for (size_t i = 0; i < p.sample_rates.size(); ++i) {
    const double f = p.sample_rates[i];
    if (!(f > 0 && f <= 1)) {
      return absl::InvalidArgumentError(
          absl::StrCat("sample_rates[", i, "]: must lie in (0, 1], got ", f));
    }
    if (std::count(p.sample_rates.begin(), p.sample_rates.end(), f) > 1) {
      return absl::InvalidArgumentError(
          absl::StrCat("sample_rates[", i, "]: ", f, " is listed twice"));
    }
  }
  if (auto s = Positive("net_bytes_per_s", p.net_bytes_per_s); !s.ok()) return s;
  if (auto s = Positive("cpu_rows_per_s", p.cpu_rows_per_s); !s.ok()) return s;
  if (auto s = Positive("scan_bytes_per_s", p.scan_bytes_per_s); !s.ok()) return s;
  if (!(std::isfinite(p.stage_startup_s) && p.stage_startup_s >= 0)) {
    return absl::InvalidArgumentError(
        absl::StrCat("stage_startup_s: must be a finite number >= 0, got ", p.stage_startup_s));
  }
  return absl::OkStatus();
}

std::string StrategyName(JoinStrategy s) {
  switch (s) {
    case JoinStrategy::kShuffle:
      return "shuffle";
    case JoinStrategy::kBroadcastRight:
      return "broadcast-right";
    case JoinStrategy::kBroadcastLeft:
      return "broadcast-left";
  }
  return "?";
}

double StageSeconds(const ClusterParams& p, JoinStrategy strategy, int m, const StageInput& left,
                    const StageInput& right, double out_rows) {
  // A saturated row count stands for an unknown larger one: a time
  // derived from it would be a wrong finite number, so it saturates too.
  if (IsSaturated(left.rows) || IsSaturated(right.rows) || IsSaturated(out_rows)) {
    return kValueCeiling;
  }
  return Saturate(StageSecondsUnsaturated(p, strategy, m, left, right, out_rows));
}

ClusterCosts JoinCosts(const ClusterCosts& left, const ClusterCosts& right, int m,
                       double stage_seconds) {
  return {Saturate(std::max(left.latency_s, right.latency_s) + stage_seconds),
          Saturate(left.node_seconds + right.node_seconds + m * stage_seconds),
          left.completeness * right.completeness};
}

}  // namespace sliceplan
