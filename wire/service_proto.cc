#include "wire/service_proto.h"

#include <cmath>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_join.h"
#include "absl/strings/str_split.h"
#include "core/cost/pareto.h"
#include "core/cost/plan_choice.h"
#include "core/model/status_macros.h"
#include "core/model/value_range.h"
#include "wire/join_kind.h"
#include "wire/node_figures.h"

namespace sliceplan {

namespace {

absl::StatusOr<Metric> MetricFromProto(v1::Metric m, const std::string& at) {
  switch (m) {
    case v1::METRIC_LATENCY_S:
      return Metric::kLatency;
    case v1::METRIC_NODE_SECONDS:
      return Metric::kNodeSeconds;
    case v1::METRIC_COMPLETENESS:
      return Metric::kCompleteness;
    default:
      return absl::InvalidArgumentError(absl::StrCat(at, ": not a metric (", m, ")"));
  }
}

v1::Metric MetricToProto(Metric m) {
  switch (m) {
    case Metric::kLatency:
      return v1::METRIC_LATENCY_S;
    case Metric::kNodeSeconds:
      return v1::METRIC_NODE_SECONDS;
    case Metric::kCompleteness:
      return v1::METRIC_COMPLETENESS;
  }
  return v1::METRIC_UNSPECIFIED;
}

uint8_t ObjectiveBit(Metric m) {
  switch (m) {
    case Metric::kLatency:
      return Objectives::kLatency;
    case Metric::kNodeSeconds:
      return Objectives::kNodeSeconds;
    case Metric::kCompleteness:
      return Objectives::kCompleteness;
  }
  return 0;
}

absl::StatusOr<Objectives> ObjectivesFromProto(const google::protobuf::RepeatedField<int>& list) {
  Objectives out{0};
  for (int i = 0; i < list.size(); ++i) {
    const std::string at = absl::StrCat("options.objectives[", i, "]");
    ASSIGN_OR_RETURN(const Metric m, MetricFromProto(static_cast<v1::Metric>(list[i]), at));
    if (out.has(ObjectiveBit(m))) {
      return absl::InvalidArgumentError(absl::StrCat(at, ": ", MetricLabel(m), " is listed twice"));
    }
    out.mask |= ObjectiveBit(m);
  }
  return out;
}

absl::StatusOr<Bound> BoundFromProto(const v1::Bound& m, int i) {
  const std::string at = absl::StrCat("options.bounds[", i, "]");
  ASSIGN_OR_RETURN(const Metric metric, MetricFromProto(m.metric(), at + ".metric"));
  if (m.comparison() != v1::COMPARISON_AT_MOST && m.comparison() != v1::COMPARISON_AT_LEAST) {
    return absl::InvalidArgumentError(absl::StrCat(at, ".comparison: must be AT_MOST or AT_LEAST"));
  }
  if (!std::isfinite(m.value())) {
    return absl::InvalidArgumentError(absl::StrCat(at, ".value: must be finite, got ", m.value()));
  }
  return Bound{metric, m.comparison() == v1::COMPARISON_AT_MOST, m.value()};
}

absl::StatusOr<Preference> PreferenceFromProto(const v1::Preference& m) {
  if (m.kind_case() == v1::Preference::kBest) {
    ASSIGN_OR_RETURN(const Metric best, MetricFromProto(m.best(), "options.preference.best"));
    return Preference::Best(best);
  }
  if (m.kind_case() != v1::Preference::kWeights) {
    return absl::InvalidArgumentError("options.preference: neither best nor weights");
  }
  const v1::Weights& w = m.weights();
  for (const double v : {w.latency_s(), w.node_seconds(), w.incompleteness()}) {
    if (!(std::isfinite(v) && v >= 0)) {
      return absl::InvalidArgumentError(
          absl::StrCat("options.preference.weights: each must be finite and >= 0, got ", v));
    }
  }
  return Preference{w.latency_s(), w.node_seconds(), w.incompleteness()};
}

absl::StatusOr<PlanShape> ShapeFromProto(v1::PlanShape shape) {
  switch (shape) {
    case v1::PLAN_SHAPE_UNSPECIFIED:
    case v1::PLAN_SHAPE_BUSHY:
      return PlanShape::kBushy;
    case v1::PLAN_SHAPE_LEFT_DEEP:
      return PlanShape::kLeftDeep;
    default:
      return absl::InvalidArgumentError(absl::StrCat("options.shape: unknown plan shape ", shape));
  }
}

absl::StatusOr<CostModelKind> CostModelFromProto(v1::CostModel cost) {
  switch (cost) {
    case v1::COST_MODEL_UNSPECIFIED:
    case v1::COST_MODEL_COUT:
      return CostModelKind::kCout;
    case v1::COST_MODEL_CLUSTER:
      return CostModelKind::kCluster;
    default:
      return absl::InvalidArgumentError(absl::StrCat("options.cost: unknown cost model ", cost));
  }
}

// Overwrites the fields of `p` that `m` sets (node counts and sample rates
// when non-empty, each rate when present) and keeps the others; INVALID_
// ARGUMENT when a node count exceeds kMaxNodeCount.
absl::Status ClusterParamsFromProto(const v1::ClusterParams& m, ClusterParams& p) {
  for (int i = 0; i < m.node_counts_size(); ++i) {
    const uint32_t n = m.node_counts(i);
    if (n > static_cast<uint32_t>(kMaxNodeCount)) {  // before narrowing to int
      return absl::InvalidArgumentError(absl::StrCat("options.cluster.node_counts[", i,
                                                     "]: must be a whole number in 1..",
                                                     kMaxNodeCount, ", got ", n));
    }
    if (i == 0) p.node_counts.clear();
    p.node_counts.push_back(static_cast<int>(n));
  }
  if (m.sample_rates_size() > 0) {
    p.sample_rates.assign(m.sample_rates().begin(), m.sample_rates().end());
  }
  if (m.has_net_bytes_per_s()) p.net_bytes_per_s = m.net_bytes_per_s();
  if (m.has_cpu_rows_per_s()) p.cpu_rows_per_s = m.cpu_rows_per_s();
  if (m.has_scan_bytes_per_s()) p.scan_bytes_per_s = m.scan_bytes_per_s();
  if (m.has_stage_startup_s()) p.stage_startup_s = m.stage_startup_s();
  return absl::OkStatus();
}

// Reads the Pareto search's options of `m` (objectives, alpha, bounds,
// preference) into `out`, in that order, keeping the defaults of those `m`
// leaves unset. REQUIRES: out.cost is already read (alpha needs the cluster
// model). INVALID_ARGUMENT naming the first bad field.
absl::Status ParetoOptionsFromProto(const v1::SearchOptions& m, SearchOptions& out) {
  if (m.objectives_size() > 0) {
    ASSIGN_OR_RETURN(out.cluster.objectives, ObjectivesFromProto(m.objectives()));
  }
  if (m.alpha() != 0) {
    if (out.cost != CostModelKind::kCluster) {
      return absl::InvalidArgumentError(
          "options.alpha: only the cluster model's Pareto search takes a precision");
    }
    out.cluster.alpha = m.alpha();
  }
  for (int i = 0; i < m.bounds_size(); ++i) {
    ASSIGN_OR_RETURN(Bound b, BoundFromProto(m.bounds(i), i));
    out.cluster.choice.bounds.push_back(b);
  }
  if (m.has_preference()) {
    ASSIGN_OR_RETURN(out.cluster.choice.prefer, PreferenceFromProto(m.preference()));
  }
  return absl::OkStatus();
}

// A leaf's relation into node.relations, added to `leaves`; INVALID_ARGUMENT
// when the id is not the query's or the relation is already a leaf.
absl::Status ReadLeaf(const v1::PlanNode& in, const std::string& at, const Query& query,
                      RelSet& leaves, PlanNode& node) {
  if (in.relation() >= static_cast<uint32_t>(query.size())) {
    return absl::InvalidArgumentError(absl::StrCat(at, ".relation: unknown relation id ",
                                                   in.relation(), " (the query has ", query.size(),
                                                   ")"));
  }
  node.relations = Singleton(RelationId{static_cast<uint8_t>(in.relation())});
  if (leaves & node.relations) {
    return absl::InvalidArgumentError(
        absl::StrCat(at, ".relation: relation ", in.relation(), " appears twice"));
  }
  leaves |= node.relations;
  return absl::OkStatus();
}

// Node i's join: its children and the union of their relations; INVALID_
// ARGUMENT unless the children are two distinct nodes before i in `plan`.
absl::Status ReadJoin(const v1::PlanNode& in, const std::string& at, int i, const Plan& plan,
                      PlanNode& node) {
  const uint32_t l = in.join().left(), r = in.join().right();
  if (l >= static_cast<uint32_t>(i) || r >= static_cast<uint32_t>(i) || l == r) {
    return absl::InvalidArgumentError(
        absl::StrCat(at, ".join: children must be distinct earlier nodes, got ", l, " and ", r));
  }
  node.left = static_cast<int>(l);
  node.right = static_cast<int>(r);
  ASSIGN_OR_RETURN(node.type, JoinTypeFromProto(in.join(), at));
  node.relations = plan.nodes[l].relations | plan.nodes[r].relations;
  return absl::OkStatus();
}

// Node i of a plan reply, read against the nodes before it in `plan` (a
// leaf's relation is added to `leaves`); INVALID_ARGUMENT naming the first
// bad field of the node.
absl::StatusOr<PlanNode> NodeFromProto(const v1::PlanNode& in, int i, const Query& query,
                                       CostModelKind model, const Plan& plan, RelSet& leaves) {
  const std::string at = absl::StrCat("plan.nodes[", i, "]");
  PlanNode node;
  if (in.kind_case() == v1::PlanNode::kRelation) {
    RETURN_IF_ERROR(ReadLeaf(in, at, query, leaves, node));
  } else if (in.kind_case() == v1::PlanNode::kJoin) {
    RETURN_IF_ERROR(ReadJoin(in, at, i, plan, node));
  } else {
    return absl::InvalidArgumentError(absl::StrCat(at, ": neither relation nor join"));
  }
  RETURN_IF_ERROR(wire_node::ReadFigures(in, at, model, node));
  return node;
}

}  // namespace

absl::StatusOr<SearchOptions> SearchOptionsFromProto(const v1::SearchOptions& m) {
  SearchOptions out;
  ASSIGN_OR_RETURN(out.shape, ShapeFromProto(m.shape()));
  ASSIGN_OR_RETURN(out.cost, CostModelFromProto(m.cost()));
  out.cross_products = !m.has_cross_products() || m.cross_products();
  if (m.memo_limit_bytes() != 0) out.memo_limit_bytes = m.memo_limit_bytes();
  RETURN_IF_ERROR(ClusterParamsFromProto(m.cluster(), out.cluster.params));
  RETURN_IF_ERROR(ParetoOptionsFromProto(m, out));
  if (auto s = ValidateSearchOptions(out); !s.ok()) {
    return absl::InvalidArgumentError(absl::StrCat("options.cluster.", s.message()));
  }
  return out;
}

v1::SearchOptions SearchOptionsToProto(const SearchOptions& options) {
  v1::SearchOptions m;
  m.set_shape(options.shape == PlanShape::kBushy ? v1::PLAN_SHAPE_BUSHY : v1::PLAN_SHAPE_LEFT_DEEP);
  m.set_cost(v1::COST_MODEL_COUT);
  m.set_cross_products(options.cross_products);
  m.set_memo_limit_bytes(options.memo_limit_bytes);
  if (options.cost == CostModelKind::kCluster) {
    m.set_cost(v1::COST_MODEL_CLUSTER);
    const ClusterParams& p = options.cluster.params;
    v1::ClusterParams* c = m.mutable_cluster();
    for (int n : p.node_counts) c->add_node_counts(static_cast<uint32_t>(n));
    for (double f : p.sample_rates) c->add_sample_rates(f);
    c->set_net_bytes_per_s(p.net_bytes_per_s);
    c->set_cpu_rows_per_s(p.cpu_rows_per_s);
    c->set_scan_bytes_per_s(p.scan_bytes_per_s);
    c->set_stage_startup_s(p.stage_startup_s);
    for (Metric o : {Metric::kLatency, Metric::kNodeSeconds, Metric::kCompleteness}) {
      if (options.cluster.objectives.has(ObjectiveBit(o))) m.add_objectives(MetricToProto(o));
    }
    m.set_alpha(options.cluster.alpha);
    for (const Bound& b : options.cluster.choice.bounds) {
      v1::Bound* out = m.add_bounds();
      out->set_metric(MetricToProto(b.metric));
      out->set_comparison(b.at_most ? v1::COMPARISON_AT_MOST : v1::COMPARISON_AT_LEAST);
      out->set_value(b.value);
    }
    const Preference& prefer = options.cluster.choice.prefer;
    v1::Weights* w = m.mutable_preference()->mutable_weights();
    w->set_latency_s(prefer.latency);
    w->set_node_seconds(prefer.node_seconds);
    w->set_incompleteness(prefer.incompleteness);
  }
  return m;
}

v1::Plan PlanToProto(const Plan& plan, CostModelKind model) {
  v1::Plan m;
  for (const PlanNode& node : plan.nodes) {
    v1::PlanNode* out = m.add_nodes();
    if (node.is_leaf()) {
      out->set_relation(Lowest(node.relations).value);
    } else {
      out->mutable_join()->set_left(static_cast<uint32_t>(node.left));
      out->mutable_join()->set_right(static_cast<uint32_t>(node.right));
      out->mutable_join()->set_kind(static_cast<v1::JoinKind>(node.type));
    }
    wire_node::WriteFigures(node, model, *out);
  }
  return m;
}

absl::StatusOr<Plan> PlanFromProto(const v1::Plan& m, const Query& query, CostModelKind model) {
  Plan plan;
  RelSet leaves = 0;
  for (int i = 0; i < m.nodes_size(); ++i) {
    ASSIGN_OR_RETURN(PlanNode node, NodeFromProto(m.nodes(i), i, query, model, plan, leaves));
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
  m.set_subsets(r.stats.memo_entries);
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
  for (const Plan& p : r.frontier) *m.add_frontier() = PlanToProto(p, model);
  m.set_largest_set(r.largest_set);
  return m;
}

absl::StatusOr<SliceResult> SliceResultFromProto(const v1::SolveSliceResponse& m,
                                                 const Query& query, CostModelKind model,
                                                 SliceSpec slice) {
  SliceResult r{slice, std::nullopt, SliceStatsFromProto(m.stats()), {}, 0};
  if (m.has_plan()) {
    ASSIGN_OR_RETURN(Plan plan, PlanFromProto(m.plan(), query, model));
    r.plan = std::move(plan);
  }
  for (const v1::Plan& p : m.frontier()) {
    ASSIGN_OR_RETURN(Plan plan, PlanFromProto(p, query, model));
    r.frontier.push_back(std::move(plan));
  }
  r.largest_set = m.largest_set();
  return r;
}

v1::OptimizeResponse OutcomeToProto(const ScheduleOutcome& outcome, CostModelKind model) {
  const OptimizeResult& res = outcome.result;
  v1::OptimizeResponse m = OutcomeStatsToProto(outcome);
  *m.mutable_plan() = PlanToProto(res.plan, model);
  for (const Plan& p : res.frontier) *m.add_frontier() = PlanToProto(p, model);
  m.set_chosen(res.chosen ? static_cast<int32_t>(*res.chosen) : -1);
  return m;
}

v1::OptimizeResponse OutcomeStatsToProto(const ScheduleOutcome& outcome) {
  const OptimizeResult& res = outcome.result;
  v1::OptimizeResponse m;
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

ScheduleOutcome OutcomeStatsFromProto(const v1::OptimizeResponse& m) {
  ScheduleOutcome out;
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

absl::StatusOr<ScheduleOutcome> OutcomeFromProto(const v1::OptimizeResponse& m, const Query& query,
                                                 CostModelKind model) {
  ScheduleOutcome out = OutcomeStatsFromProto(m);
  ASSIGN_OR_RETURN(out.result.plan, PlanFromProto(m.plan(), query, model));
  for (const v1::Plan& p : m.frontier()) {
    ASSIGN_OR_RETURN(Plan plan, PlanFromProto(p, query, model));
    out.result.frontier.push_back(std::move(plan));
  }
  if (m.chosen() >= 0 && static_cast<size_t>(m.chosen()) < out.result.frontier.size()) {
    out.result.chosen = static_cast<size_t>(m.chosen());
  }
  return out;
}

}  // namespace sliceplan
