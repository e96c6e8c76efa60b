#include "tiers/physical_frontier.h"

#include <algorithm>
#include <cmath>

#include "core/cost/pareto.h"
#include "core/model/value_range.h"
#include "tiers/level_pruning.h"

namespace sliceplan {
namespace {

// One physical sub-plan of a node: its metrics, the rows it outputs and
// how it was made.
struct Entry {
  ClusterCosts costs;
  double rows = 0;
  int32_t left = -1;  // entry indices in the children's lists (joins)
  int32_t right = -1;
  JoinStrategy strategy = JoinStrategy::kShuffle;
  int nodes = 0;
  double rate = 1;  // leaves
};

}  // namespace

std::vector<PhysicalPlan> PhysicalFrontier(const WideQuery& query, const WidePlan& tree,
                                           const ClusterSearchConfig& config,
                                           const PhysicalFrontierOptions& options) {
  const ClusterParams& p = config.params;
  const double level_alpha = std::pow(config.alpha, 1.0 / std::max(1, query.size()));
  const size_t n = tree.nodes.size();
  std::vector<std::vector<Entry>> entries(n);
  std::vector<double> width(n, 0);
  for (size_t i = 0; i < n; ++i) {
    const WideNode& node = tree.nodes[i];
    if (node.is_leaf()) {
      const Relation& rel = query.relation(node.relation);
      width[i] = rel.row_bytes;
      for (double rate : p.sample_rates) {
        Entry e;
        e.costs = {0, 0, rate};
        e.rows = IsSaturated(rel.rows) ? kValueCeiling : rel.rows * rate;
        e.rate = rate;
        entries[i].push_back(e);
      }
      continue;
    }
    const auto l = static_cast<size_t>(node.left), r = static_cast<size_t>(node.right);
    width[i] = width[l] + width[r];
    const bool left_leaf = tree.nodes[l].is_leaf(), right_leaf = tree.nodes[r].is_leaf();
    std::vector<Entry> all;
    for (size_t a = 0; a < entries[l].size(); ++a) {
      const Entry& le = entries[l][a];
      for (size_t b = 0; b < entries[r].size(); ++b) {
        const Entry& re = entries[r][b];
        const double out = IsSaturated(node.cardinality)
                               ? kValueCeiling
                               : node.cardinality * (le.costs.completeness * re.costs.completeness);
        for (JoinStrategy s : kAllStrategies) {
          for (int m : p.node_counts) {
            const double t = StageSeconds(p, s, m, {le.rows, width[l], left_leaf},
                                          {re.rows, width[r], right_leaf}, out);
            Entry e;
            e.costs = JoinCosts(le.costs, re.costs, m, t);
            e.rows = out;
            e.left = static_cast<int32_t>(a);
            e.right = static_cast<int32_t>(b);
            e.strategy = s;
            e.nodes = m;
            all.push_back(e);
          }
        }
      }
    }
    entries[i] =
        ThinEvenly(PruneInLevels(std::move(all), config.objectives, level_alpha,
                                 [](const Entry& e) -> const ClusterCosts& { return e.costs; }),
                   options.cap);
  }
  // The root's entries, exactly non-dominated across levels.
  const std::vector<Entry>& top = entries[n - 1];
  std::vector<ClusterCosts> costs;
  for (const Entry& e : top) costs.push_back(e.costs);
  std::vector<PhysicalPlan> out;
  for (size_t k : FrontierIndices(costs, config.objectives)) {
    PhysicalPlan plan;
    plan.strategy.assign(n, JoinStrategy::kShuffle);
    plan.nodes.assign(n, 0);
    plan.sample_rate.assign(n, 1);
    plan.metrics.assign(n, {});
    // Children after parents when walking down from the root.
    std::vector<std::pair<size_t, int32_t>> stack{{n - 1, static_cast<int32_t>(k)}};
    while (!stack.empty()) {
      const auto [i, at] = stack.back();
      stack.pop_back();
      const Entry& e = entries[i][static_cast<size_t>(at)];
      plan.metrics[i] = e.costs;
      const WideNode& node = tree.nodes[i];
      if (node.is_leaf()) {
        plan.sample_rate[i] = e.rate;
        continue;
      }
      plan.strategy[i] = e.strategy;
      plan.nodes[i] = e.nodes;
      stack.push_back({static_cast<size_t>(node.left), e.left});
      stack.push_back({static_cast<size_t>(node.right), e.right});
    }
    out.push_back(std::move(plan));
  }
  return out;
}

WidePlan WithPhysicalChoices(const WidePlan& tree, const PhysicalPlan& choices) {
  WidePlan plan = tree;
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    WideNode& node = plan.nodes[i];
    node.metrics = choices.metrics[i];
    node.cost = node.metrics.latency_s;
    if (node.is_leaf()) {
      node.sample_rate = choices.sample_rate[i];
    } else {
      node.strategy = choices.strategy[i];
      node.nodes = choices.nodes[i];
    }
  }
  return plan;
}

}  // namespace sliceplan
