// The embedded mode: an in-process coordinator that solves all slices of a
// query on a pool of worker threads and merges them, with no servers.
//
// Each thread takes the next unsolved slice until none is left (so fast
// threads take more). Thread-safe: a call owns its pool.
#ifndef SLICEPLAN_CORE_EMBEDDED_POOL_H_
#define SLICEPLAN_CORE_EMBEDDED_POOL_H_

#include "absl/status/statusor.h"
#include "core/merge.h"
#include "core/query.h"
#include "core/slice_solver.h"

namespace sliceplan {

// Solves slices 0..slice_count-1 on `workers` threads and merges them.
// Errors: the first failing slice's status (by slice index); the other
// slices are cancelled. Errors of the slice count itself (ValidateSlice)
// come before any thread starts. REQUIRES: workers >= 1.
absl::StatusOr<OptimizeResult> OptimizeEmbedded(const Query& query,
                                                const SearchOptions& options,
                                                uint32_t slice_count,
                                                int workers);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_EMBEDDED_POOL_H_
