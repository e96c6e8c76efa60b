// Measuring the capacity model's rates on this machine (docs/tiers.md):
// a short run of the same engine the workers run, well under a second,
// measuring the one rate the request's search uses:
//   - dense_split_seconds: an unsliced cross-product search of a synthetic
//     chain sized to about 2e7 splits in the request's plan shape, best of
//     seven runs, over the closed-form split count;
//   - connected_set_seconds: the connected-only search of a connected part
//     of the query itself (grown from relation 0 one neighbour at a time
//     until about 20,000 connected sets), over its connected-set count. The time per set grows
//     with the graph's density, so measuring on the query's own graph beats
//     a rate from other shapes.
//
// Not pure: it reads the clock. Thread-safe.
#ifndef SLICEPLAN_CORE_CAPACITY_RATE_CALIBRATION_H_
#define SLICEPLAN_CORE_CAPACITY_RATE_CALIBRATION_H_

#include "absl/status/statusor.h"
#include "core/capacity/capacity_model.h"
#include "core/model/query.h"
#include "core/search_options.h"

namespace sliceplan {

// The rates for `query` under `options` (plan shape, cross products): the
// rate that search uses is measured, the others keep their defaults (so
// does the connected rate where the query's part has no connected plan). Errors: those of the dense
// search (none expected).
absl::StatusOr<MachineRates> CalibrateRates(const Query& query, const SearchOptions& options);

// The query restricted to relations grown from relation 0, adding the
// lowest-numbered neighbour each step, until it has `min_sets` connected
// sets (or is the whole component), its predicates those wholly inside.
// Exposed for tests.
Query ConnectedPart(const Query& query, uint64_t min_sets);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_CAPACITY_RATE_CALIBRATION_H_
