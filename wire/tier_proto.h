// Conversion of the tiers' answers (schedule/tiered_search.h) to and from
// the coordinator's messages: the tier enum, plans over queries of any
// size, and the OptimizeResponse of a tiered run. Replies are validated
// like requests: a plan must be a tree over the query's relations, each
// once, with numbers in [0, 1e300]. Thread-safe.
#ifndef SLICEPLAN_WIRE_TIER_PROTO_H_
#define SLICEPLAN_WIRE_TIER_PROTO_H_

#include "absl/status/statusor.h"
#include "core/model/search_tier.h"
#include "core/model/wide_query.h"
#include "core/search_options.h"
#include "schedule/tiered_search.h"
#include "sliceplan.pb.h"
#include "tiers/wide_plan.h"

namespace sliceplan {

v1::Tier TierToProto(SearchTier tier);
// TIER_UNSPECIFIED is auto; a value outside the enum is INVALID_ARGUMENT.
absl::StatusOr<SearchTier> TierFromProto(int tier);

// A cout plan: leaves by relation id, costs {"cout": C_out}.
v1::Plan WidePlanToProto(const WidePlan& plan);
absl::StatusOr<WidePlan> WidePlanFromProto(const v1::Plan& m, const WideQuery& query);

v1::OptimizeResponse TieredToProto(const TieredOutcome& outcome, CostModelKind model);
// REQUIRES for the cluster model: the query has at most 64 relations.
absl::StatusOr<TieredOutcome> TieredFromProto(const v1::OptimizeResponse& m, const WideQuery& query,
                                              CostModelKind model);

}  // namespace sliceplan

#endif  // SLICEPLAN_WIRE_TIER_PROTO_H_
