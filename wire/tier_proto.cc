#include "wire/tier_proto.h"

#include "absl/strings/str_cat.h"
#include "core/model/status_macros.h"
#include "core/model/value_range.h"
#include "wire/join_kind.h"
#include "wire/node_figures.h"
#include "wire/query_proto.h"
#include "wire/service_proto.h"

namespace sliceplan {

v1::Tier TierToProto(SearchTier tier) {
  switch (tier) {
    case SearchTier::kAuto:
      return v1::TIER_AUTO;
    case SearchTier::kExact:
      return v1::TIER_EXACT;
    case SearchTier::kIdp:
      return v1::TIER_IDP;
    case SearchTier::kLinear:
      return v1::TIER_LINEAR;
    case SearchTier::kGreedy:
      return v1::TIER_GREEDY;
    case SearchTier::kAnytime:
      return v1::TIER_ANYTIME;
  }
  return v1::TIER_AUTO;
}

absl::StatusOr<SearchTier> TierFromProto(int tier) {
  switch (tier) {
    case v1::TIER_UNSPECIFIED:
    case v1::TIER_AUTO:
      return SearchTier::kAuto;
    case v1::TIER_EXACT:
      return SearchTier::kExact;
    case v1::TIER_IDP:
      return SearchTier::kIdp;
    case v1::TIER_LINEAR:
      return SearchTier::kLinear;
    case v1::TIER_GREEDY:
      return SearchTier::kGreedy;
    case v1::TIER_ANYTIME:
      return SearchTier::kAnytime;
    default:
      return absl::InvalidArgumentError(absl::StrCat("tier: unknown value ", tier));
  }
}

v1::Plan WidePlanToProto(const WidePlan& plan, CostModelKind model) {
  v1::Plan m;
  for (const WideNode& node : plan.nodes) {
    v1::PlanNode* out = m.add_nodes();
    if (node.is_leaf()) {
      out->set_relation(static_cast<uint32_t>(node.relation));
    } else {
      out->mutable_join()->set_left(static_cast<uint32_t>(node.left));
      out->mutable_join()->set_right(static_cast<uint32_t>(node.right));
      out->mutable_join()->set_kind(static_cast<v1::JoinKind>(node.type));
    }
    wire_node::WriteFigures(node, model, *out);
  }
  return m;
}

absl::StatusOr<WidePlan> WidePlanFromProto(const v1::Plan& m, const WideQuery& query,
                                           CostModelKind model) {
  if (m.nodes_size() != 2 * query.size() - 1) {
    return absl::InvalidArgumentError(absl::StrCat("plan: ", m.nodes_size(), " nodes; ",
                                                   query.size(), " relations need ",
                                                   2 * query.size() - 1));
  }
  WidePlan plan;
  plan.nodes.reserve(static_cast<size_t>(m.nodes_size()));
  for (int i = 0; i < m.nodes_size(); ++i) {
    const v1::PlanNode& in = m.nodes(i);
    const std::string at = absl::StrCat("plan.nodes[", i, "]");
    WideNode node;
    if (in.kind_case() == v1::PlanNode::kRelation) {
      if (in.relation() >= static_cast<uint32_t>(query.size())) {
        return absl::InvalidArgumentError(
            absl::StrCat(at, ".relation: unknown relation id ", in.relation()));
      }
      node.relation = static_cast<int32_t>(in.relation());
    } else if (in.kind_case() == v1::PlanNode::kJoin) {
      if (in.join().left() >= static_cast<uint32_t>(i) ||
          in.join().right() >= static_cast<uint32_t>(i)) {
        return absl::InvalidArgumentError(absl::StrCat(at, ".join: children must be earlier"));
      }
      node.left = static_cast<int32_t>(in.join().left());
      node.right = static_cast<int32_t>(in.join().right());
      ASSIGN_OR_RETURN(node.type, JoinTypeFromProto(in.join(), at));
    } else {
      return absl::InvalidArgumentError(absl::StrCat(at, ": neither relation nor join"));
    }
    RETURN_IF_ERROR(wire_node::ReadFigures(in, at, model, node));
    plan.nodes.push_back(node);
  }
  if (auto s = CheckWidePlan(plan, query.size()); !s.ok()) {
    return absl::InvalidArgumentError(s.message());
  }
  return plan;
}

v1::OptimizeResponse TieredToProto(const TieredOutcome& outcome, CostModelKind model) {
  // The answer's plans in the form of any size (the schedule's are the
  // exact engine's, at most 64 relations, and may be none).
  v1::OptimizeResponse m = OutcomeStatsToProto(outcome.schedule);
  *m.mutable_plan() = WidePlanToProto(outcome.plan, model);
  for (const WidePlan& p : outcome.frontier) *m.add_frontier() = WidePlanToProto(p, model);
  m.set_chosen(outcome.chosen ? static_cast<int32_t>(*outcome.chosen) : -1);
  m.set_proven_optimal(outcome.proven_optimal);
  m.set_coverage(outcome.coverage);
  m.set_wall_seconds(outcome.wall_seconds);
  m.set_tier(TierToProto(outcome.tier));
  m.set_tier_reason(outcome.reason);
  return m;
}

namespace {

// Plans of any size from `list`, each named by its index on error.
absl::StatusOr<std::vector<WidePlan>> WidePlansFromProto(
    const google::protobuf::RepeatedPtrField<v1::Plan>& list, const WideQuery& query,
    CostModelKind model) {
  std::vector<WidePlan> out;
  out.reserve(static_cast<size_t>(list.size()));
  for (int i = 0; i < list.size(); ++i) {
    auto plan = WidePlanFromProto(list[i], query, model);
    if (!plan.ok()) {
      return absl::InvalidArgumentError(
          absl::StrCat("frontier[", i, "].", plan.status().message()));
    }
    out.push_back(*std::move(plan));
  }
  return out;
}

}  // namespace

absl::StatusOr<TieredOutcome> TieredFromProto(const v1::OptimizeResponse& m, const WideQuery& query,
                                              CostModelKind model) {
  TieredOutcome out;
  ASSIGN_OR_RETURN(out.tier, TierFromProto(m.tier()));
  if (out.tier == SearchTier::kAuto) {
    return absl::InvalidArgumentError("tier: the answer must name the tier that ran");
  }
  out.proven_optimal = m.proven_optimal();
  out.coverage = m.coverage();
  out.wall_seconds = m.wall_seconds();
  out.reason = m.tier_reason();
  out.schedule = OutcomeStatsFromProto(m);
  ASSIGN_OR_RETURN(out.plan, WidePlanFromProto(m.plan(), query, model));
  ASSIGN_OR_RETURN(out.frontier, WidePlansFromProto(m.frontier(), query, model));
  if (m.chosen() >= 0 && static_cast<size_t>(m.chosen()) < out.frontier.size()) {
    out.chosen = static_cast<size_t>(m.chosen());
  }
  if (query.size() <= kMaxRelations) {  // the exact engine's form too
    out.schedule.result.plan = ToExactPlan(out.plan);
    for (const WidePlan& p : out.frontier) out.schedule.result.frontier.push_back(ToExactPlan(p));
    out.schedule.result.chosen = out.chosen;
  }
  out.exact_ran = out.tier == SearchTier::kExact && m.slice_count() != 0;
  return out;
}

v1::SolveSliceRequest AnytimeTaskToProto(const AnytimeTask& task) {
  v1::SolveSliceRequest m;
  *m.mutable_query() = WideQueryToProto(*task.query);
  *m.mutable_options() = SearchOptionsToProto(task.options);
  m.mutable_anytime()->set_part(task.part.part);
  m.mutable_anytime()->set_parts(task.part.parts);
  return m;
}

absl::StatusOr<AnytimePartSpec> AnytimePartFromProto(const v1::SolveSliceRequest& m) {
  const AnytimePartSpec spec{m.anytime().part(), m.anytime().parts()};
  RETURN_IF_ERROR(ValidateAnytimePart(spec));
  return spec;
}

v1::SolveSliceResponse AnytimeAnswerToProto(const AnytimeAnswer& answer) {
  v1::SolveSliceResponse m;
  for (const WidePlan& p : answer.frontier) {
    *m.add_frontier() = WidePlanToProto(p, CostModelKind::kCluster);
  }
  m.set_trees(answer.trees);
  m.mutable_stats()->set_seconds(answer.seconds);
  return m;
}

absl::StatusOr<AnytimeAnswer> AnytimeAnswerFromProto(const v1::SolveSliceResponse& m,
                                                     const WideQuery& query) {
  AnytimeAnswer out;
  ASSIGN_OR_RETURN(out.frontier, WidePlansFromProto(m.frontier(), query, CostModelKind::kCluster));
  out.trees = m.trees();
  out.seconds = m.stats().seconds();
  return out;
}

}  // namespace sliceplan
