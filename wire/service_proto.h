// Conversion between the core types and the service messages of
// proto/sliceplan.proto (protobuf messages only: no gRPC here). Every
// field a caller sets is validated, and errors (INVALID_ARGUMENT) name it.
// Thread-safe.
#ifndef SLICEPLAN_WIRE_SERVICE_PROTO_H_
#define SLICEPLAN_WIRE_SERVICE_PROTO_H_

#include "absl/status/statusor.h"
#include "core/merge.h"
#include "core/model/query.h"
#include "core/slice_solver.h"
#include "schedule/slice_scheduler.h"
#include "sliceplan.pb.h"

namespace sliceplan {

// The slice fields of the RPC messages, as ValidateSlice names them.
inline constexpr SliceFieldNames kRpcSliceFields = {"slice_count", "slice_index"};

// Errors: an unknown enum value ("options.shape", "options.cost");
// UNIMPLEMENTED for a cost model this build lacks.
absl::StatusOr<SearchOptions> SearchOptionsFromProto(const v1::SearchOptions& m);
v1::SearchOptions SearchOptionsToProto(const SearchOptions& options);

v1::Plan PlanToProto(const Plan& plan, CostModelKind model);
// Rebuilds a plan and checks it is a tree over the query: every relation
// id known ("plan.nodes[i].relation: unknown relation id 7"), children
// before parents, each relation once, the root covering the query.
absl::StatusOr<Plan> PlanFromProto(const v1::Plan& m, const Query& query, CostModelKind model);

v1::SliceStats SliceStatsToProto(const SliceResult& r);
SearchStats SliceStatsFromProto(const v1::SliceStats& m);

v1::SolveSliceResponse SliceResultToProto(const SliceResult& r, CostModelKind model);
absl::StatusOr<SliceResult> SliceResultFromProto(const v1::SolveSliceResponse& m,
                                                 const Query& query, CostModelKind model,
                                                 SliceSpec slice);

// The coordinator's answer. `slice_workers` may be empty.
v1::OptimizeResponse OutcomeToProto(const ScheduleOutcome& outcome, CostModelKind model);
// The same without the plans (plan, frontier, chosen): the slice table and
// the run's figures, for an answer whose plans are written in another form.
v1::OptimizeResponse OutcomeStatsToProto(const ScheduleOutcome& outcome);
absl::StatusOr<ScheduleOutcome> OutcomeFromProto(const v1::OptimizeResponse& m, const Query& query,
                                                 CostModelKind model);
// The answer's figures alone (slice count and stats, workers, retries,
// hedges, proven_optimal, coverage); no plan is read.
ScheduleOutcome OutcomeStatsFromProto(const v1::OptimizeResponse& m);

}  // namespace sliceplan

#endif  // SLICEPLAN_WIRE_SERVICE_PROTO_H_
