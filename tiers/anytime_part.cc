#include "tiers/anytime_part.h"

#include <algorithm>
#include <chrono>
#include <cmath>

#include "absl/strings/str_cat.h"
#include "core/cost/cluster_model.h"
#include "core/model/value_range.h"
#include "tiers/anytime_frontier.h"
#include "tiers/physical_frontier.h"

namespace sliceplan {
namespace {

constexpr double kAnswerTolerance = 1e-9;

bool Close(double got, double want) {
  return got == want ||
         std::fabs(got - want) <= kAnswerTolerance * std::fmax(std::fabs(got), std::fabs(want));
}

template <typename List, typename Value>
bool Offered(const List& list, Value v) {
  return std::find(list.begin(), list.end(), v) != list.end();
}

// Node i of `plan` recomputed (its cardinality from `costed`, the same
// tree costed afresh) against what it says; DATA_LOSS naming the figure.
absl::Status CheckNode(const WidePlan& plan, const WidePlan& costed, size_t i,
                       const ClusterParams& params, std::vector<ClusterCosts>& metrics,
                       std::vector<double>& rows, std::vector<double>& width,
                       const WideQuery& query) {
  const WideNode& node = plan.nodes[i];
  const auto fault = [&](const std::string& what) {
    return absl::DataLossError(absl::StrCat("node ", i, ": ", what));
  };
  if (!Close(node.cardinality, costed.nodes[i].cardinality)) {
    return fault(absl::StrCat("cardinality ", node.cardinality, ", recomputed ",
                              costed.nodes[i].cardinality));
  }
  if (node.is_leaf()) {
    if (!Offered(params.sample_rates, node.sample_rate)) {
      return fault(absl::StrCat("sample rate ", node.sample_rate, " is not offered"));
    }
    const Relation& rel = query.relation(node.relation);
    width[i] = rel.row_bytes;
    rows[i] = IsSaturated(rel.rows) ? kValueCeiling : rel.rows * node.sample_rate;
    metrics[i] = {0, 0, node.sample_rate};
  } else {
    if (!Offered(params.node_counts, node.nodes)) {
      return fault(absl::StrCat(node.nodes, " nodes is not a count offered"));
    }
    const auto l = static_cast<size_t>(node.left), r = static_cast<size_t>(node.right);
    width[i] = width[l] + width[r];
    const double card = costed.nodes[i].cardinality;
    rows[i] = IsSaturated(card) ? kValueCeiling
                                : card * (metrics[l].completeness * metrics[r].completeness);
    const double t = StageSeconds(params, node.strategy, node.nodes,
                                  {rows[l], width[l], plan.nodes[l].is_leaf()},
                                  {rows[r], width[r], plan.nodes[r].is_leaf()}, rows[i]);
    metrics[i] = JoinCosts(metrics[l], metrics[r], node.nodes, t);
  }
  const ClusterCosts& m = metrics[i];
  if (!Close(node.cost, m.latency_s)) {
    return fault(absl::StrCat("cost ", node.cost, ", where the latency is ", m.latency_s));
  }
  if (!Close(node.metrics.latency_s, m.latency_s) ||
      !Close(node.metrics.node_seconds, m.node_seconds) ||
      !Close(node.metrics.completeness, m.completeness)) {
    return fault(absl::StrCat("metrics (", node.metrics.latency_s, ", ", node.metrics.node_seconds,
                              ", ", node.metrics.completeness, "), recomputed (", m.latency_s, ", ",
                              m.node_seconds, ", ", m.completeness, ")"));
  }
  return absl::OkStatus();
}

absl::Status CheckPlan(const WideQuery& query, const SearchOptions& options, const WidePlan& plan) {
  const bool left_deep = options.shape == PlanShape::kLeftDeep;
  if (auto s = CheckWidePlan(plan, query.size(), left_deep); !s.ok()) {
    return absl::DataLossError(s.message());
  }
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    // The anytime search reorders inner joins only: a join labelled
    // otherwise is made up (and would hide a cross product).
    if (plan.nodes[i].type != JoinType::kInner) {
      return absl::DataLossError(absl::StrCat("node ", i, ": a ", JoinTypeName(plan.nodes[i].type),
                                              " join, where every join is inner"));
    }
  }
  if (!options.cross_products && HasCrossProduct(plan, query)) {
    return absl::DataLossError("a cross product, which the request excludes");
  }
  WidePlan costed = plan;
  CostWidePlan(costed, query);
  std::vector<ClusterCosts> metrics(plan.nodes.size());
  std::vector<double> rows(plan.nodes.size()), width(plan.nodes.size());
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    if (auto s = CheckNode(plan, costed, i, options.cluster.params, metrics, rows, width, query);
        !s.ok()) {
      return s;
    }
  }
  return absl::OkStatus();
}

}  // namespace

size_t AnytimeMaxPlans(int relations, uint64_t memory_bytes) {
  const uint64_t per_plan = (2 * static_cast<uint64_t>(std::max(relations, 1)) - 1) * 64;
  return static_cast<size_t>(std::clamp<uint64_t>(memory_bytes / per_plan, 16, 1000));
}

absl::Status ValidateAnytimePart(const AnytimePartSpec& spec) {
  if (spec.parts < 1 || spec.parts > kMaxAnytimeParts) {
    return absl::InvalidArgumentError(
        absl::StrCat("anytime.parts: must lie in 1..", kMaxAnytimeParts, ", got ", spec.parts));
  }
  if (spec.part >= spec.parts) {
    return absl::InvalidArgumentError(
        absl::StrCat("anytime.part: must be less than parts (", spec.parts, "), got ", spec.part));
  }
  return absl::OkStatus();
}

AnytimeAnswer RunAnytimePart(const WideQuery& query, const SearchOptions& options,
                             const AnytimePartSpec& spec, SearchControl& control,
                             std::function<void(size_t plans, uint64_t trees)> on_progress,
                             uint64_t max_moves) {
  const auto start = std::chrono::steady_clock::now();
  AnytimeFrontierOptions o;
  o.shape = options.shape;
  o.cross_products = options.cross_products;
  o.seed = uint64_t{spec.part} + 1;
  o.cap_per_node = query.size() <= 16 ? 32 : 8;
  o.max_plans = AnytimeMaxPlans(query.size(), options.memo_limit_bytes);
  o.share_subplans = query.size() <= kShareSubplansUpTo;
  o.max_moves = max_moves;
  o.on_progress = std::move(on_progress);
  const AnytimeFrontierResult r = AnytimeFrontier(query, options.cluster, o, control);
  AnytimeAnswer out;
  out.trees = r.trees;
  out.frontier.reserve(r.frontier.size());
  for (const FrontierPlan& p : r.frontier) {
    out.frontier.push_back(WithPhysicalChoices(*p.tree, p.physical));
  }
  out.seconds = SecondsBetween(start, std::chrono::steady_clock::now());
  return out;
}

absl::Status CheckAnytimeAnswer(const WideQuery& query, const SearchOptions& options,
                                const AnytimeAnswer& answer) {
  for (size_t k = 0; k < answer.frontier.size(); ++k) {
    if (auto s = CheckPlan(query, options, answer.frontier[k]); !s.ok()) {
      return absl::DataLossError(absl::StrCat("anytime plan ", k, ": ", s.message()));
    }
  }
  return absl::OkStatus();
}

}  // namespace sliceplan
