// Conversion of the capacity planner's table (core/capacity/capacity_table.h) to and
// from the coordinator's CapacityResponse. A reply is validated like a
// request: rows for 1, 2, 4, ... workers in order, slice counts powers of
// two, seconds and bytes finite and not negative, rates finite and > 0.
// Thread-safe.
#ifndef SLICEPLAN_WIRE_CAPACITY_PROTO_H_
#define SLICEPLAN_WIRE_CAPACITY_PROTO_H_

#include "absl/status/statusor.h"
#include "core/capacity/capacity_table.h"
#include "sliceplan.pb.h"

namespace sliceplan {

v1::CapacityResponse CapacityToProto(const CapacityTable& table);
// INVALID_ARGUMENT naming the field for a reply that breaks the rules above.
absl::StatusOr<CapacityTable> CapacityFromProto(const v1::CapacityResponse& m);

}  // namespace sliceplan

#endif  // SLICEPLAN_WIRE_CAPACITY_PROTO_H_
