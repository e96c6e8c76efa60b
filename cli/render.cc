#include "cli/render.h"

#include <algorithm>
#include <optional>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "core/cost/pareto.h"
#include "core/graph/connected_sets.h"

namespace sliceplan::cli {
namespace {

const char* ShapeName(PlanShape shape) {
  return shape == PlanShape::kBushy ? "bushy" : "left-deep";
}

// "join" for an inner join, "left join", "semi join", ... for the others.
std::string JoinLabel(JoinType type) {
  return type == JoinType::kInner ? "join" : absl::StrCat(JoinTypeName(type), " join");
}

std::string NodeLabel(const WideNode& node, const WideQuery& query) {
  return node.is_leaf() ? query.relation(node.relation).name : JoinLabel(node.type);
}

// The cluster model's physical choice at a node.
std::string PhysicalLabel(const WideNode& node, const WideQuery& query) {
  if (node.is_leaf()) {
    return node.sample_rate < 1
               ? absl::StrFormat("%s (sample %g)", NodeLabel(node, query), node.sample_rate)
               : NodeLabel(node, query);
  }
  return absl::StrFormat("%s %s, %d nodes", StrategyName(node.strategy), JoinLabel(node.type),
                         node.nodes);
}

// A join strategy in a few letters, for one-line plans.
std::string StrategyShort(JoinStrategy s) {
  switch (s) {
    case JoinStrategy::kShuffle:
      return "shuffle";
    case JoinStrategy::kBroadcastRight:
      return "bcast-r";
    case JoinStrategy::kBroadcastLeft:
      return "bcast-l";
  }
  return "?";
}

}  // namespace

std::string PhysicalTreeString(const WidePlan& plan, const WideQuery& query) {
  return WriteTree(
      plan,
      [&](const WideNode& leaf, std::string& out) {
        out += NodeLabel(leaf, query);
        if (leaf.sample_rate < 1) absl::StrAppendFormat(&out, "@%g", leaf.sample_rate);
      },
      [](const WideNode& join, std::string& out) {
        absl::StrAppendFormat(
            &out, " [%s %d]%s ", StrategyShort(join.strategy), join.nodes,
            join.type == JoinType::kInner ? "" : absl::StrCat(" ", JoinTypeKeyword(join.type)));
      });
}

namespace {

// The plan as indented lines, children under their join, each labelled
// by `label`; built without recursion (a left-deep plan of thousands is
// thousands deep).
std::vector<std::pair<std::string, const WideNode*>> IndentedLines(
    const WidePlan& plan, absl::FunctionRef<std::string(const WideNode&)> label) {
  std::vector<std::pair<std::string, const WideNode*>> lines;
  std::vector<std::pair<int32_t, int>> stack{{static_cast<int32_t>(plan.nodes.size()) - 1, 0}};
  while (!stack.empty()) {
    const auto [i, depth] = stack.back();
    stack.pop_back();
    const WideNode& node = plan.nodes[i];
    lines.push_back({std::string(2 * depth, ' ') + label(node), &node});
    if (node.is_leaf()) continue;
    stack.push_back({node.right, depth + 1});
    stack.push_back({node.left, depth + 1});
  }
  return lines;
}

size_t HeadWidth(const std::vector<std::pair<std::string, const WideNode*>>& lines) {
  size_t width = 0;
  for (const auto& l : lines) width = std::max(width, l.first.size());
  return width;
}

// The cluster plan, one line per node with its physical choice, figures
// aligned.
void AppendClusterTree(const WidePlan& plan, const WideQuery& query, std::string& out) {
  const auto lines =
      IndentedLines(plan, [&](const WideNode& node) { return PhysicalLabel(node, query); });
  const size_t width = HeadWidth(lines);
  absl::StrAppendFormat(&out, "%-*s  %12s  %10s  %12s  %12s\n", width, "node", "rows", "latency_s",
                        "node_seconds", "completeness");
  for (const auto& [head, node] : lines) {
    const ClusterCosts& m = node->metrics;
    absl::StrAppendFormat(&out, "%-*s  %12.4g  %10.4g  %12.4g  %12.4g\n", width, head,
                          node->cardinality * m.completeness, m.latency_s, m.node_seconds,
                          m.completeness);
  }
}

// The cout plan as an indented table, children under their join.
void AppendWideTree(const WidePlan& plan, const WideQuery& query, std::string& out) {
  const auto lines =
      IndentedLines(plan, [&](const WideNode& node) { return NodeLabel(node, query); });
  const size_t width = HeadWidth(lines);
  absl::StrAppendFormat(&out, "%-*s  %12s  %12s\n", width, "node", "card", "cost");
  for (const auto& [head, node] : lines) {
    absl::StrAppendFormat(&out, "%-*s  %12.4g  %12.4g\n", width, head, node->cardinality,
                          node->cost);
  }
}

// Above this many relations the text output gives the tree string only.
constexpr int kMaxTextTableRelations = 64;

}  // namespace

SliceBalance Balance(const OptimizeResult& result) {
  SliceBalance b;
  double total = 0, most = 0;
  for (const SliceResult& s : result.slices) {
    const double splits = static_cast<double>(s.stats.splits);
    total += splits;
    most = std::max(most, splits);
    if (s.stats.seconds >= b.slowest_seconds) {
      b.slowest_seconds = s.stats.seconds;
      b.slowest = s.slice.index;
    }
  }
  const double mean = total / static_cast<double>(std::max<size_t>(1, result.slices.size()));
  b.max_over_mean_splits = mean > 0 ? most / mean : 1;
  return b;
}

namespace {

// How many of the engine's listed estimates the answer used: those the
// exact search held in its memo (every listed set with cross products,
// the connected ones without) when it ran, else those among the returned
// plan's nodes. Null when none are listed.
struct ListedUse {
  size_t listed = 0;
  uint64_t used = 0;
};
std::optional<ListedUse> ListedUsed(const TieredOutcome& outcome, const RunInfo& info) {
  if (info.exact == nullptr || info.exact->listed() == nullptr) return std::nullopt;
  const ListedRows& listed = *info.exact->listed();
  ListedUse use{listed.size(), 0};
  if (outcome.exact_ran) {
    use.used = info.search.cross_products ? listed.size() : CountListedConnected(*info.exact);
    return use;
  }
  for (const RelSet set : WideNodeSets(outcome.plan)) use.used += listed.Find(set) ? 1 : 0;
  return use;
}

// The cluster model's report: the Pareto frontier, one line per plan, and
// the chosen plan's tree (or why there is none). Past
// kMaxTextTableRelations the trees are left to --format=json but the
// chosen plan's line.
void AppendFrontierReport(const TieredOutcome& outcome, const RunInfo& info, std::string& out) {
  const WideQuery& query = *info.query;
  const bool wide = query.size() > kMaxTextTableRelations;
  // The exact search's set is the frontier (within alpha); the anytime
  // search's is the best found so far, not proven.
  const std::string what =
      outcome.tier == SearchTier::kAnytime
          ? "Pareto set found by the anytime search (not proven: an approximation of the frontier)"
          : absl::StrFormat("Pareto frontier (alpha %g)", info.search.cluster.alpha);
  absl::StrAppendFormat(
      &out, "%s of %s plans of %d relations (cross products %s), objectives %s: %d plans\n\n", what,
      ShapeName(info.search.shape), query.size(),
      info.search.cross_products ? "allowed" : "excluded",
      ObjectivesString(info.search.cluster.objectives), static_cast<int>(outcome.frontier.size()));
  absl::StrAppendFormat(&out, "  %4s  %12s  %14s  %12s  %s\n", "plan", "latency_s", "node_seconds",
                        "completeness", wide ? "" : "tree");
  for (size_t i = 0; i < outcome.frontier.size(); ++i) {
    const ClusterCosts& m = outcome.frontier[i].root().metrics;
    absl::StrAppendFormat(&out, "%s %4d  %12.4g  %14.4g  %12.4g  %s\n",
                          outcome.chosen == i ? "*" : " ", static_cast<int>(i), m.latency_s,
                          m.node_seconds, m.completeness,
                          wide ? "" : PhysicalTreeString(outcome.frontier[i], query));
  }
  if (wide) {
    absl::StrAppendFormat(&out,
                          "\n  (the trees are shown up to %d relations; --format=json has every "
                          "plan's tree and nodes)\n",
                          kMaxTextTableRelations);
  }
  out +=
      "\n  (name@r: a leaf sampled at rate r; [strategy n]: a join's strategy, shuffle or\n"
      "  broadcast of the right or left side, on n rented nodes)\n";
  if (!outcome.chosen) {
    out += "\nno plan of the frontier meets the bounds\n";
    return;
  }
  absl::StrAppendFormat(&out, "\nchosen: plan %d (* above)\n\n", static_cast<int>(*outcome.chosen));
  if (wide) {
    out += PhysicalTreeString(outcome.plan, query) + "\n";
  } else {
    AppendClusterTree(outcome.plan, query, out);
  }
}

// A single-cost model's report: the best plan's cost, the tier that found
// it, its tree string and (up to kMaxTextTableRelations) its node table.
void AppendBestPlanReport(const TieredOutcome& outcome, const RunInfo& info, std::string& out) {
  const WideQuery& wide = *info.query;
  absl::StrAppendFormat(&out, "best %s plan of %d relations (cross products %s): %s %.6g\n",
                        ShapeName(info.search.shape), wide.size(),
                        info.search.cross_products ? "allowed" : "excluded",
                        MetricName(info.search.cost), outcome.plan.cost());
  absl::StrAppendFormat(&out, "tier: %s, %s; %s\n\n", TierName(outcome.tier),
                        outcome.proven_optimal ? "proven optimal" : "not proven optimal",
                        outcome.reason);
  if (outcome.tier == SearchTier::kExact && !outcome.proven_optimal) {
    absl::StrAppendFormat(&out,
                          "NOT PROVEN OPTIMAL: the deadline passed with %.0f%% of the slices "
                          "solved; this is the best plan found so far\n\n",
                          100 * outcome.coverage);
  }
  if (const auto use = ListedUsed(outcome, info)) {
    absl::StrAppendFormat(&out, "engine estimates: %u of %u listed sets used (%s)\n\n", use->used,
                          use->listed,
                          outcome.exact_ran ? "held by the exact search"
                                            : "nodes of this plan; the tier searched on the model");
  }
  out += WideTreeString(outcome.plan, wide) + "\n\n";
  if (wide.size() <= kMaxTextTableRelations) {
    AppendWideTree(outcome.plan, wide, out);
  } else {
    absl::StrAppendFormat(&out,
                          "(the node table is shown up to %d relations; --format=json "
                          "has every figure)\n",
                          kMaxTextTableRelations);
  }
}

// The exact search's slice table: one line per slice, the slowest slice and
// the balance, and the re-dispatched and hedged counts when there were any.
// REQUIRES: the exact search ran.
void AppendSliceTable(const TieredOutcome& outcome, const RunInfo& info, std::string& out) {
  const OptimizeResult& result = outcome.schedule.result;
  const SliceBalance b = Balance(result);
  absl::StrAppendFormat(&out, "\nslices: %u (%s), workers: %d, wall time %.3f s\n",
                        result.slice_count,
                        info.slices_chosen ? "chosen by the coordinator" : "as requested",
                        info.workers, outcome.wall_seconds);
  absl::StrAppendFormat(&out, "  %-6s %14s %16s %10s\n", "slice", "subsets", "splits", "seconds");
  for (const SliceResult& s : result.slices) {
    absl::StrAppendFormat(&out, "  %-6u %14u %16u %10.4f%s\n", s.slice.index, s.stats.memo_entries,
                          s.stats.splits, s.stats.seconds,
                          s.slice.index == result.best_slice ? "  <- best plan" : "");
  }
  absl::StrAppendFormat(&out, "slowest slice: %u (%.4f s); balance (max/mean splits): %.3f\n",
                        b.slowest, b.slowest_seconds, b.max_over_mean_splits);
  if (outcome.schedule.retries > 0 || outcome.schedule.hedges > 0) {
    absl::StrAppendFormat(&out, "re-dispatched slices: %u, hedged slices: %u\n",
                          outcome.schedule.retries, outcome.schedule.hedges);
  }
}

// How the run went, after either report: the IDP summary when IDP ran (or
// slices were solved outside the exact tier), the wall time alone when the
// exact search did not run, else the slice table.
void AppendRunSummary(const TieredOutcome& outcome, const RunInfo& info, std::string& out) {
  const OptimizeResult& result = outcome.schedule.result;
  if (outcome.tier == SearchTier::kIdp || (!outcome.exact_ran && !result.slices.empty())) {
    absl::StrAppendFormat(&out,
                          "\nidp: %d blocks searched exactly (largest %d relations), %d met "
                          "again, %d improved the plan, %d passes, %u slices solved; wall time "
                          "%.3f s\n",
                          outcome.idp.blocks, outcome.idp.largest_block, outcome.idp.reused,
                          outcome.idp.improved, outcome.idp.passes,
                          static_cast<unsigned>(result.slices.size()), outcome.wall_seconds);
    return;
  }
  if (!outcome.exact_ran) {
    absl::StrAppendFormat(&out, "\nwall time %.3f s\n", outcome.wall_seconds);
    return;
  }
  AppendSliceTable(outcome, info, out);
}

}  // namespace

std::string PlanNodesJson(const WidePlan& plan, const WideQuery& query) {
  std::string out = "[";
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    const WideNode& n = plan.nodes[i];
    absl::StrAppend(&out, i ? ", " : "");
    if (n.is_leaf()) {
      absl::StrAppend(&out, "{\"relation\": ", JsonString(query.relation(n.relation).name),
                      ", \"cardinality\": ", JsonNumber(n.cardinality), "}");
    } else {
      absl::StrAppend(&out, "{\"type\": \"", JoinTypeName(n.type), "\", \"left\": ", n.left,
                      ", \"right\": ", n.right, ", \"cardinality\": ", JsonNumber(n.cardinality),
                      "}");
    }
  }
  return out + "]";
}

std::string RenderText(const TieredOutcome& outcome, const RunInfo& info) {
  std::string out;
  if (info.search.cost == CostModelKind::kCluster) {
    AppendFrontierReport(outcome, info, out);
  } else {
    AppendBestPlanReport(outcome, info, out);
  }
  AppendRunSummary(outcome, info, out);
  return out;
}

std::string RenderJson(const TieredOutcome& outcome, const RunInfo& info) {
  const OptimizeResult& result = outcome.schedule.result;
  std::string out = "{\n  \"plans\": [\n";
  if (info.search.cost == CostModelKind::kCluster) {
    const WideQuery& query = *info.query;
    for (size_t i = 0; i < outcome.frontier.size(); ++i) {
      const WidePlan& plan = outcome.frontier[i];
      const ClusterCosts& m = plan.root().metrics;
      absl::StrAppend(&out, "    {\"tree\": ", JsonString(WideTreeString(plan, query)),
                      ", \"nodes\": ", PlanNodesJson(plan, query),
                      ", \"physical\": ", JsonString(PhysicalTreeString(plan, query)),
                      ", \"costs\": {\"latency_s\": ", JsonNumber(m.latency_s),
                      ", \"node_seconds\": ", JsonNumber(m.node_seconds),
                      ", \"completeness\": ", JsonNumber(m.completeness), "}}",
                      i + 1 < outcome.frontier.size() ? ",\n" : "\n");
    }
    absl::StrAppend(&out, "  ],\n  \"chosen\": ",
                    outcome.chosen ? absl::StrCat(*outcome.chosen) : std::string("null"), ",\n");
  } else {
    absl::StrAppend(&out, "    {\"tree\": ", JsonString(WideTreeString(outcome.plan, *info.query)),
                    ", \"nodes\": ", PlanNodesJson(outcome.plan, *info.query), ", \"costs\": {",
                    JsonString(MetricName(info.search.cost)), ": ", JsonNumber(outcome.plan.cost()),
                    "}, \"cardinality\": ", JsonNumber(outcome.plan.root().cardinality));
    if (outcome.exact_ran) absl::StrAppend(&out, ", \"slice\": ", result.best_slice);
    out += "}\n  ],\n";
  }
  absl::StrAppend(&out, "  \"shape\": \"", ShapeName(info.search.shape),
                  "\",\n  \"cross_products\": ", info.search.cross_products ? "true" : "false",
                  ",\n  \"tier\": ", JsonString(TierName(outcome.tier)),
                  ",\n  \"proven_optimal\": ", outcome.proven_optimal ? "true" : "false",
                  ",\n  \"coverage\": ", JsonNumber(outcome.coverage),
                  ",\n  \"tier_reason\": ", JsonString(outcome.reason), ",\n");
  absl::StrAppend(&out, "  \"stats\": {\n    \"slice_count\": ", result.slice_count,
                  ",\n    \"workers\": ", info.workers,
                  ",\n    \"wall_seconds\": ", JsonNumber(outcome.wall_seconds),
                  ",\n    \"retries\": ", outcome.schedule.retries,
                  ",\n    \"hedges\": ", outcome.schedule.hedges);
  if (const auto use = ListedUsed(outcome, info)) {
    absl::StrAppend(&out, ",\n    \"cardinalities\": {\"listed\": ", use->listed,
                    ", \"used\": ", use->used, "}");
  }
  if (outcome.idp.blocks > 0) {
    absl::StrAppend(&out, ",\n    \"idp\": {\"blocks\": ", outcome.idp.blocks,
                    ", \"reused\": ", outcome.idp.reused, ", \"improved\": ", outcome.idp.improved,
                    ", \"largest_block\": ", outcome.idp.largest_block,
                    ", \"passes\": ", outcome.idp.passes,
                    ", \"start_cost\": ", JsonNumber(outcome.idp.start_cost), "}");
  }
  out += ",\n    \"slices\": [\n";
  for (size_t i = 0; i < result.slices.size(); ++i) {
    const SliceResult& s = result.slices[i];
    absl::StrAppend(
        &out, "      {\"index\": ", s.slice.index, ", \"subsets\": ", s.stats.memo_entries,
        ", \"splits\": ", s.stats.splits, ", \"seconds\": ", JsonNumber(s.stats.seconds),
        ", \"memo_bytes\": ", s.stats.memo_bytes, "}", i + 1 < result.slices.size() ? ",\n" : "\n");
  }
  out += "    ]\n  }\n}\n";
  return out;
}

std::string RenderDot(const TieredOutcome& outcome, const RunInfo& info) {
  std::string out = "digraph plan {\n  node [shape=box, fontname=\"Helvetica\"];\n";
  const WidePlan& plan = outcome.plan;
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    const WideNode& node = plan.nodes[i];
    absl::StrAppendFormat(
        &out, "  n%d [label=\"%s\\ncard %.4g\\ncost %.4g\"%s];\n", i,
        node.is_leaf() ? info.query->relation(node.relation).name : JoinLabel(node.type),
        node.cardinality, node.cost, node.is_leaf() ? ", shape=ellipse" : "");
    if (!node.is_leaf()) {
      absl::StrAppendFormat(&out, "  n%d -> n%d [label=\"L\"];\n  n%d -> n%d [label=\"R\"];\n", i,
                            node.left, i, node.right);
    }
  }
  return out + "}\n";
}

}  // namespace sliceplan::cli
