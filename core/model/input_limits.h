// Limits on what a request may ask for, checked at the edge before anything
// is allocated for it. Each has a flag on the servers and the CLI; each
// refusal names the limit and the value (RESOURCE_EXHAUSTED for sizes,
// INVALID_ARGUMENT for values outside their domain). Plain value type.
#ifndef SLICEPLAN_CORE_MODEL_INPUT_LIMITS_H_
#define SLICEPLAN_CORE_MODEL_INPUT_LIMITS_H_

#include <chrono>
#include <cstddef>
#include <cstdint>

#include "absl/status/statusor.h"

namespace sliceplan {

struct InputLimits {
  int64_t max_relations = 10000;                // per query (the exact search takes 64)
  int64_t max_predicates = 100000;              // per query, before merging equal ones
  int64_t max_cardinalities = 1000000;          // the engine's listed estimates per query
  int64_t max_query_bytes = int64_t{16} << 20;  // a query file or request
  int64_t max_node_counts = 16;                 // cluster model: node counts to try
  int64_t max_sample_rates = 16;                // cluster model: sample rates to try
  double max_deadline_seconds = 3600;           // a longer or absent deadline is cut to it
  int64_t max_frontier_plans = 10000;           // plans of a merged Pareto set returned
};

// Bounds on single values, so no input is near double's range by itself.
inline constexpr double kMaxRowBytes = 1e12;
inline constexpr size_t kMaxNameBytes = 256;  // a relation name

// The time a search may take, from a request's deadline_seconds (0: none
// given) and the server's maximum: min(requested, max_seconds); infinity or
// a huge value mean "as long as the server allows". NaN or a negative value
// is INVALID_ARGUMENT naming `field`.
absl::StatusOr<double> AllowedSeconds(double requested, double max_seconds,
                                      const char* field = "deadline_seconds");

// now + seconds on the steady clock, without overflowing its integer
// ticks. REQUIRES: seconds >= 0 and not NaN.
std::chrono::steady_clock::time_point SteadyAfter(double seconds);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MODEL_INPUT_LIMITS_H_
