#include "core/cost/cluster_range.h"

#include <algorithm>
#include <string>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "core/model/value_range.h"

namespace sliceplan {
namespace {

// A parameter the refusal may name: its two spellings and where it lives.
struct Knob {
  const char* field;  // the RPC's options.cluster field
  const char* flag;   // the CLI's
  double ClusterParams::*value;
};

constexpr Knob kKnobs[] = {
    {"stage_startup_s", "--stage-startup-s", &ClusterParams::stage_startup_s},
    {"cpu_rows_per_s", "--cpu-rows-per-s", &ClusterParams::cpu_rows_per_s},
    {"net_bytes_per_s", "--net-bytes-per-s", &ClusterParams::net_bytes_per_s},
    {"scan_bytes_per_s", "--scan-bytes-per-s", &ClusterParams::scan_bytes_per_s},
};

std::string Named(const Knob& k, const ClusterParams& params) {
  return absl::StrFormat("%s (%s) = %g", k.field, k.flag, params.*k.value);
}

}  // namespace

double CheapestStageSeconds(std::span<const Relation> relations, const ClusterParams& params) {
  double rows = kValueCeiling, width = kValueCeiling;
  for (const Relation& r : relations) {
    rows = std::min(rows, r.rows);
    width = std::min(width, r.row_bytes);
  }
  const double rate = *std::min_element(params.sample_rates.begin(), params.sample_rates.end());
  const int nodes = *std::max_element(params.node_counts.begin(), params.node_counts.end());
  const StageInput leaf{rows * rate, width, true};
  double best = kValueCeiling;
  for (JoinStrategy s :
       {JoinStrategy::kShuffle, JoinStrategy::kBroadcastRight, JoinStrategy::kBroadcastLeft}) {
    best = std::min(best, StageSeconds(params, s, nodes, leaf, leaf, 0));
  }
  return best;
}

absl::Status CheckClusterInRange(std::span<const Relation> relations, const ClusterParams& params) {
  if (relations.size() < 2 || !IsSaturated(CheapestStageSeconds(relations, params))) {
    return absl::OkStatus();
  }
  ClusterParams defaults;
  defaults.node_counts = params.node_counts;
  defaults.sample_rates = params.sample_rates;
  std::string cause;
  if (IsSaturated(CheapestStageSeconds(relations, defaults))) {
    double rows = kValueCeiling;
    for (const Relation& r : relations) rows = std::min(rows, r.rows);
    cause = absl::StrFormat(
        "its inputs: the smallest relation has %g rows; scale the row estimates down", rows);
  }
  for (const Knob& k : kKnobs) {
    if (!cause.empty()) break;
    ClusterParams fixed = params;
    fixed.*k.value = defaults.*k.value;
    if (!IsSaturated(CheapestStageSeconds(relations, fixed))) {
      cause = absl::StrCat(Named(k, params), "; bring it nearer its default");
    }
  }
  if (cause.empty()) {  // no one parameter alone: name every changed one
    for (const Knob& k : kKnobs) {
      if (params.*k.value != defaults.*k.value) {
        absl::StrAppend(&cause, cause.empty() ? "" : ", ", Named(k, params));
      }
    }
    absl::StrAppend(&cause, "; bring them nearer their defaults");
  }
  return absl::OutOfRangeError(absl::StrFormat(
      "every plan's latency_s and node_seconds reach %g, the largest value the engine "
      "represents: even the cheapest join stage a plan must run takes that long, because of %s",
      kValueCeiling, cause));
}

absl::Status ClusterPlansSaturated(std::span<const Relation> relations,
                                   const ClusterParams& params) {
  const ClusterParams defaults;
  std::string slower;
  for (const Knob& k : kKnobs) {
    const bool startup = k.value == &ClusterParams::stage_startup_s;
    if (startup ? params.*k.value > defaults.*k.value : params.*k.value < defaults.*k.value) {
      absl::StrAppend(&slower, slower.empty() ? "" : ", ", Named(k, params));
    }
  }
  std::string cause;
  if (!slower.empty()) {
    cause = absl::StrCat("the stages take that long with ", slower,
                         "; bring them nearer their defaults");
  } else {
    double rows = 0;
    for (const Relation& r : relations) rows = std::max(rows, r.rows);
    cause = absl::StrFormat(
        "the stages read that many rows (the largest relation has %g); scale the row "
        "estimates down",
        rows);
  }
  return absl::OutOfRangeError(absl::StrFormat(
      "every plan's latency_s and node_seconds reach %g, the largest value the engine "
      "represents: %s",
      kValueCeiling, cause));
}

}  // namespace sliceplan
