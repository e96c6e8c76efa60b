#include "core/service_proto.h"

#include "absl/strings/str_cat.h"
#include "core/status_macros.h"

namespace sliceplan {

absl::StatusOr<SearchOptions> SearchOptionsFromProto(const v1::SearchOptions& m) {
  SearchOptions out;
  switch (m.shape()) {
    case v1::PLAN_SHAPE_UNSPECIFIED:
    case v1::PLAN_SHAPE_BUSHY: out.shape = PlanShape::kBushy; break;
    case v1::PLAN_SHAPE_LEFT_DEEP: out.shape = PlanShape::kLeftDeep; break;
    default:
      return absl::InvalidArgumentError(
          absl::StrCat("options.shape: unknown plan shape ", m.shape()));
  }
  switch (m.cost()) {
    case v1::COST_MODEL_UNSPECIFIED:
    case v1::COST_MODEL_COUT: out.cost = CostModelKind::kCout; break;
    case v1::COST_MODEL_CLUSTER:
      return absl::UnimplementedError(
          "options.cost: the cluster cost model is not in this build yet");
    default:
      return absl::InvalidArgumentError(
          absl::StrCat("options.cost: unknown cost model ", m.cost()));
  }
  out.cross_products = !m.has_cross_products() || m.cross_products().value();
  if (m.memo_limit_bytes() != 0) out.memo_limit_bytes = m.memo_limit_bytes();
  return out;
}

v1::SearchOptions SearchOptionsToProto(const SearchOptions& options) {
  v1::SearchOptions m;
  m.set_shape(options.shape == PlanShape::kBushy ? v1::PLAN_SHAPE_BUSHY
                                                  : v1::PLAN_SHAPE_LEFT_DEEP);
  m.set_cost(v1::COST_MODEL_COUT);
  m.mutable_cross_products()->set_value(options.cross_products);
  m.set_memo_limit_bytes(options.memo_limit_bytes);
  return m;
}

v1::Plan PlanToProto(const Plan& plan, CostModelKind model) {
  v1::Plan m;
  for (const PlanNode& node : plan.nodes) {
    v1::PlanNode* out = m.add_nodes();
    if (node.is_leaf()) {
      out->set_relation(Lowest(node.relations).value);
      out->set_operator_("scan");
    } else {
      out->mutable_join()->set_left(static_cast<uint32_t>(node.left));
      out->mutable_join()->set_right(static_cast<uint32_t>(node.right));
      out->set_operator_("join");
    }
    out->set_cardinality(node.cardinality);
    (*out->mutable_costs())[MetricName(model)] = node.cost;
  }
  return m;
}

absl::StatusOr<Plan> PlanFromProto(const v1::Plan& m, const Query& query,
                                   CostModelKind model) {
  Plan plan;
  RelSet leaves = 0;
  for (int i = 0; i < m.nodes_size(); ++i) {
    const v1::PlanNode& in = m.nodes(i);
    const std::string at = absl::StrCat("plan.nodes[", i, "]");
    PlanNode node;
    if (in.kind_case() == v1::PlanNode::kRelation) {
      if (in.relation() >= static_cast<uint32_t>(query.size())) {
        return absl::InvalidArgumentError(absl::StrCat(
            at, ".relation: unknown relation id ", in.relation(), " (the query has ",
            query.size(), ")"));
      }
      node.relations = Singleton(RelationId{static_cast<uint8_t>(in.relation())});
      if (leaves & node.relations) {
        return absl::InvalidArgumentError(absl::StrCat(
            at, ".relation: relation ", in.relation(), " appears twice"));
      }
      leaves |= node.relations;
    } else if (in.kind_case() == v1::PlanNode::kJoin) {
      const uint32_t l = in.join().left(), r = in.join().right();
      if (l >= static_cast<uint32_t>(i) || r >= static_cast<uint32_t>(i) || l == r) {
        return absl::InvalidArgumentError(absl::StrCat(
            at, ".join: children must be distinct earlier nodes, got ", l, " and ", r));
      }
      node.left = static_cast<int>(l);
      node.right = static_cast<int>(r);
      node.relations = plan.nodes[l].relations | plan.nodes[r].relations;
    } else {
      return absl::InvalidArgumentError(absl::StrCat(at, ": neither relation nor join"));
    }
    node.cardinality = in.cardinality();
    const auto cost = in.costs().find(MetricName(model));
    if (cost == in.costs().end()) {
      return absl::InvalidArgumentError(
          absl::StrCat(at, ".costs: no \"", MetricName(model), "\" entry"));
    }
    node.cost = cost->second;
    plan.nodes.push_back(node);
  }
  if (plan.nodes.empty() || plan.root().relations != query.all() ||
      static_cast<int>(plan.nodes.size()) != 2 * query.size() - 1) {
    return absl::InvalidArgumentError(
        "plan: not a tree joining every relation of the query exactly once");
  }
  return plan;
}

v1::SliceStats SliceStatsToProto(const SliceResult& r) {
  v1::SliceStats m;
  m.set_index(r.slice.index);
  m.set_subsets(r.stats.subsets);
  m.set_splits(r.stats.splits);
  m.set_seconds(r.stats.seconds);
  m.set_memo_bytes(r.stats.memo_bytes);
  return m;
}

SearchStats SliceStatsFromProto(const v1::SliceStats& m) {
  return {m.subsets(), m.splits(), m.memo_bytes(), m.seconds()};
}

v1::SolveSliceResponse SliceResultToProto(const SliceResult& r, CostModelKind model) {
  v1::SolveSliceResponse m;
  if (r.plan) *m.mutable_plan() = PlanToProto(*r.plan, model);
  *m.mutable_stats() = SliceStatsToProto(r);
  return m;
}

absl::StatusOr<SliceResult> SliceResultFromProto(const v1::SolveSliceResponse& m,
                                                 const Query& query,
                                                 CostModelKind model,
                                                 SliceSpec slice) {
  SliceResult r{slice, std::nullopt, SliceStatsFromProto(m.stats()), {}, 0};
  if (m.has_plan()) {
    ASSIGN_OR_RETURN(Plan plan, PlanFromProto(m.plan(), query, model));
    r.plan = std::move(plan);
  }
  return r;
}

v1::OptimizeResponse OutcomeToProto(const ScheduleOutcome& outcome, CostModelKind model) {
  const OptimizeResult& res = outcome.result;
  v1::OptimizeResponse m;
  *m.mutable_plan() = PlanToProto(res.plan, model);
  m.set_slice_count(res.slice_count);
  m.set_best_slice(res.best_slice);
  for (size_t i = 0; i < res.slices.size(); ++i) {
    v1::SliceStats* s = m.add_slices();
    *s = SliceStatsToProto(res.slices[i]);
    if (i < outcome.slice_workers.size()) s->set_worker(outcome.slice_workers[i]);
  }
  m.set_proven_optimal(outcome.proven_optimal);
  m.set_coverage(outcome.coverage);
  m.set_wall_seconds(res.wall_seconds);
  m.set_retries(outcome.retries);
  m.set_hedges(outcome.hedges);
  m.set_workers_used(outcome.workers_used);
  return m;
}

absl::StatusOr<ScheduleOutcome> OutcomeFromProto(const v1::OptimizeResponse& m,
                                                 const Query& query,
                                                 CostModelKind model) {
  ScheduleOutcome out;
  ASSIGN_OR_RETURN(out.result.plan, PlanFromProto(m.plan(), query, model));
  out.result.slice_count = m.slice_count();
  out.result.best_slice = m.best_slice();
  out.result.wall_seconds = m.wall_seconds();
  for (const v1::SliceStats& s : m.slices()) {
    out.result.slices.push_back(
        SliceResult{{s.index(), m.slice_count()}, std::nullopt, SliceStatsFromProto(s), {}, 0});
    out.slice_workers.push_back(s.worker());
  }
  out.proven_optimal = m.proven_optimal();
  out.coverage = m.coverage();
  out.retries = m.retries();
  out.hedges = m.hedges();
  out.workers_used = m.workers_used();
  return out;
}

}  // namespace sliceplan
