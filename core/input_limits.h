// Limits on what a request may ask for, checked at the edge before anything
// is allocated for it. Each has a flag on the servers and the CLI; each
// refusal names the limit and the value (RESOURCE_EXHAUSTED for sizes,
// INVALID_ARGUMENT for values outside their domain). Plain value type.
#ifndef SLICEPLAN_CORE_INPUT_LIMITS_H_
#define SLICEPLAN_CORE_INPUT_LIMITS_H_

#include <cstdint>

namespace sliceplan {

struct InputLimits {
  int64_t max_relations = 10000;    // per query (the exact search takes 64)
  int64_t max_predicates = 100000;  // per query, before merging equal ones
  int64_t max_query_bytes = int64_t{16} << 20;  // a query file or request
  int64_t max_node_counts = 16;     // cluster model: node counts to try
  int64_t max_sample_rates = 16;    // cluster model: sample rates to try
  double max_deadline_seconds = 3600;  // a longer or absent deadline is cut to it
};

// Bounds on single values, so no input is near double's range by itself.
inline constexpr double kMaxRowBytes = 1e12;

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_INPUT_LIMITS_H_
