// What a search is asked to do: plan shape, cross products, cost model and
// its parameters, memo limit. The one options type every client (CLI,
// coordinator, worker, the wire conversion) uses; it names no memo
// internals. Plain values, copyable.
#ifndef SLICEPLAN_CORE_SEARCH_OPTIONS_H_
#define SLICEPLAN_CORE_SEARCH_OPTIONS_H_

#include <cstdint>
#include <string>

#include "absl/status/status.h"
#include "core/cost/cluster_config.h"
#include "core/cost/pareto.h"
#include "core/cost/plan_choice.h"
#include "core/model/input_limits.h"
#include "core/slicing/slice_spec.h"

namespace sliceplan {

enum class CostModelKind { kCout, kCluster };

// The primary metric's name, as the JSON result spells it ("cout";
// "latency_s" for the cluster model).
std::string MetricName(CostModelKind model);

inline constexpr uint64_t kDefaultMemoLimitBytes = uint64_t{8} << 30;
// The most threads one slice's search takes.
inline constexpr int kMaxSearchThreads = 256;

struct SearchOptions {
  PlanShape shape = PlanShape::kBushy;
  bool cross_products = true;
  CostModelKind cost = CostModelKind::kCout;
  uint64_t memo_limit_bytes = kDefaultMemoLimitBytes;  // per slice
  ClusterSearchConfig cluster;                         // for CostModelKind::kCluster
  // Threads solving one slice, sharing its memo: the solving process's own
  // setting (a worker's --threads), never sent over the wire.
  int threads = 1;
};

// INVALID_ARGUMENT naming the field for bad cluster parameters, alpha < 1,
// an alpha other than 1 with a model that has no Pareto search, or threads
// outside [1, kMaxSearchThreads].
absl::Status ValidateSearchOptions(const SearchOptions& options);

// RESOURCE_EXHAUSTED naming the limit: more node counts or sample rates
// than `limits` allow (each multiplies the cluster search's work). The
// edges check it with their configured limits; the solver does not.
absl::Status CheckOptionLimits(const SearchOptions& options, const InputLimits& limits);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SEARCH_OPTIONS_H_
