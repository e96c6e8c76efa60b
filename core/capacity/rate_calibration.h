// Measuring the capacity model's rates on this machine (docs/tiers.md):
// a short run of the same engine the workers run, well under a second,
// measuring the one rate the request's search uses:
//   - dense_split_seconds: an unsliced cross-product search of a synthetic
//     chain sized to about 2e7 splits in the request's plan shape, best of
//     seven runs, over the closed-form split count;
//   - connected_set_seconds: the connected-only search of two connected
//     parts of the query itself (grown from relation 0 one neighbour at a
//     time until about 10,000 and 80,000 connected sets), each run with the
//     method the whole query would run (connected_strategy.h), best of
//     three; the time per set is extrapolated to the whole query's set
//     count as a power of the set count fitted through the two parts (a
//     set's pairs grow with the sets around it). The time per set depends on
//     the graph's density, so measuring on the query's own graph beats a
//     rate from other shapes.
//
// Not pure: it reads the clock. Thread-safe.
#ifndef SLICEPLAN_CORE_CAPACITY_RATE_CALIBRATION_H_
#define SLICEPLAN_CORE_CAPACITY_RATE_CALIBRATION_H_

#include "absl/status/statusor.h"
#include "core/capacity/capacity_model.h"
#include "core/model/query.h"
#include "core/search/search_control.h"
#include "core/search_options.h"

namespace sliceplan {

// The rates for `query` under `options` (plan shape, cross products): the
// rate that search uses is measured, the others keep their defaults (so
// does the connected rate where the query's part has no connected plan).
// Errors: CANCELLED or DEADLINE_EXCEEDED from `control` (each timed run
// is under it), else none expected.
absl::StatusOr<MachineRates> CalibrateRates(const Query& query, const SearchOptions& options,
                                            const SearchControl& control = {});

// CalibrateRates with the dense rate measured once per process and plan
// shape (it does not depend on the query) and kept; the connected rate is
// the query's own, measured per call. Thread-safe.
absl::StatusOr<MachineRates> CalibrateRatesOnce(const Query& query, const SearchOptions& options,
                                                const SearchControl& control = {});

// The query restricted to the relations of `keep` (renumbered in order),
// with the predicates wholly inside; non-inner joins are dropped.
// REQUIRES: keep non-empty, within the query.
Query QueryPart(const Query& query, RelSet keep);

// The query restricted to relations grown from relation 0, adding the
// lowest-numbered neighbour each step, until it has `min_sets` connected
// sets (or is the whole component), its predicates those wholly inside.
// Exposed for tests.
Query ConnectedPart(const Query& query, uint64_t min_sets);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_CAPACITY_RATE_CALIBRATION_H_
