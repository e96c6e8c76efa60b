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
#include "schedule/slice_worker.h"
#include "schedule/tiered_search.h"
#include "sliceplan.pb.h"
#include "tiers/anytime_part.h"
#include "tiers/wide_plan.h"

namespace sliceplan {

v1::Tier TierToProto(SearchTier tier);
// TIER_UNSPECIFIED is auto; a value outside the enum is INVALID_ARGUMENT.
absl::StatusOr<SearchTier> TierFromProto(int tier);

// A plan of any size: leaves by relation id, children by node index,
// costs {"cout": C_out} or the cluster model's three metrics with its
// physical choices (wire/node_figures.h). Reading checks the tree
// (CheckWidePlan) and every figure's range.
v1::Plan WidePlanToProto(const WidePlan& plan, CostModelKind model = CostModelKind::kCout);
absl::StatusOr<WidePlan> WidePlanFromProto(const v1::Plan& m, const WideQuery& query,
                                           CostModelKind model = CostModelKind::kCout);

// The answer's plan, and for the cluster model its Pareto set and choice,
// travel in the form of any size.
v1::OptimizeResponse TieredToProto(const TieredOutcome& outcome, CostModelKind model);
absl::StatusOr<TieredOutcome> TieredFromProto(const v1::OptimizeResponse& m, const WideQuery& query,
                                              CostModelKind model);

// An anytime part's call (schedule/slice_worker.h: the query of any size,
// the options, the part) and its answer (its set as plans of any size,
// the trees, its seconds). Reading the answer checks each plan as
// WidePlanFromProto does and names it ("frontier[3].plan.nodes[7]...");
// the figures themselves are checked against the query by the caller
// (CheckAnytimeAnswer).
v1::SolveSliceRequest AnytimeTaskToProto(const AnytimeTask& task);
// The part of a request that asks for one (REQUIRES: has_anytime()),
// validated (ValidateAnytimePart).
absl::StatusOr<AnytimePartSpec> AnytimePartFromProto(const v1::SolveSliceRequest& m);
v1::SolveSliceResponse AnytimeAnswerToProto(const AnytimeAnswer& answer);
absl::StatusOr<AnytimeAnswer> AnytimeAnswerFromProto(const v1::SolveSliceResponse& m,
                                                     const WideQuery& query);

}  // namespace sliceplan

#endif  // SLICEPLAN_WIRE_TIER_PROTO_H_
