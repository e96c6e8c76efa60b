#include "tiers/shared_subplans.h"

#include <cmath>
#include <random>

#include "core/cost/cout_model.h"
#include "core/cost/pareto.h"
#include "core/model/value_range.h"
#include "tiers/level_pruning.h"

namespace sliceplan {
namespace {

using Ptr = std::shared_ptr<const SubPlan>;

const ClusterCosts& CostsOfPtr(const Ptr& p) { return p->costs; }

// A candidate join before it is kept: indices into the children's lists.
struct Candidate {
  ClusterCosts costs;
  double rows = 0;
  uint32_t left = 0, right = 0;
  JoinStrategy strategy = JoinStrategy::kShuffle;
  int nodes = 0;
};

}  // namespace

SubPlanCache::SubPlanCache(const WideQuery& query, const ClusterSearchConfig& config, size_t cap)
    : query_(query),
      config_(config),
      cap_(cap),
      level_alpha_(std::pow(config.alpha, 1.0 / std::max(1, query.size()))) {
  std::mt19937_64 rng(0x5eed5eedULL);
  relation_keys_.resize(static_cast<size_t>(query.size()));
  for (Key& k : relation_keys_) k = {rng(), rng()};
}

SubPlanCache::Items SubPlanCache::Leaf(int32_t relation, double cardinality) {
  const Key& key = relation_keys_[static_cast<size_t>(relation)];
  if (auto it = sets_.find(key); it != sets_.end()) return it->second;
  const Relation& rel = query_.relation(relation);
  Items out;
  for (double rate : config_.params.sample_rates) {
    auto leaf = std::make_shared<SubPlan>();
    leaf->costs = {0, 0, rate};
    leaf->rows = IsSaturated(rel.rows) ? kValueCeiling : rel.rows * rate;
    leaf->cardinality = cardinality;
    leaf->relation = relation;
    leaf->sample_rate = rate;
    out.push_back(std::move(leaf));
  }
  cached_ += out.size();
  sets_.emplace(key, out);
  return out;
}

SubPlanCache::Items SubPlanCache::Join(const WideNode& node, const Items& left, const Items& right,
                                       double left_width, double right_width, bool left_leaf,
                                       bool right_leaf) {
  const ClusterParams& p = config_.params;
  std::vector<Candidate> all;
  all.reserve(left.size() * right.size() * 3 * p.node_counts.size());
  for (uint32_t a = 0; a < left.size(); ++a) {
    const SubPlan& l = *left[a];
    for (uint32_t b = 0; b < right.size(); ++b) {
      const SubPlan& r = *right[b];
      const double out = IsSaturated(node.cardinality)
                             ? kValueCeiling
                             : node.cardinality * (l.costs.completeness * r.costs.completeness);
      for (JoinStrategy s : kAllStrategies) {
        for (int m : p.node_counts) {
          const double t = StageSeconds(p, s, m, {l.rows, left_width, left_leaf},
                                        {r.rows, right_width, right_leaf}, out);
          all.push_back({JoinCosts(l.costs, r.costs, m, t), out, a, b, s, m});
        }
      }
    }
  }
  std::vector<Candidate> kept =
      ThinEvenly(PruneInLevels(std::move(all), config_.objectives, level_alpha_,
                               [](const Candidate& c) -> const ClusterCosts& { return c.costs; }),
                 cap_);
  Items out;
  out.reserve(kept.size());
  for (const Candidate& c : kept) {
    auto join = std::make_shared<SubPlan>();
    join->costs = c.costs;
    join->rows = c.rows;
    join->cardinality = node.cardinality;
    join->left = left[c.left];
    join->right = right[c.right];
    join->strategy = c.strategy;
    join->nodes = c.nodes;
    out.push_back(std::move(join));
  }
  return out;
}

SubPlanCache::Items SubPlanCache::Share(const Key& key, Items own) {
  auto it = sets_.find(key);
  if (it == sets_.end()) {
    if (cached_ + own.size() > kMaxCachedSubPlans) return own;  // full: new sets stay out
    cached_ += own.size();
    sets_.emplace(key, own);
    return own;
  }
  Items& cached = it->second;
  own.insert(own.end(), cached.begin(), cached.end());
  Items merged =
      ThinEvenly(PruneInLevels(std::move(own), config_.objectives, level_alpha_,
                               [](const Ptr& x) -> const ClusterCosts& { return CostsOfPtr(x); }),
                 cap_);
  cached_ = cached_ - cached.size() + merged.size();
  cached = merged;
  return merged;
}

std::vector<std::shared_ptr<const SubPlan>> SubPlanCache::Evaluate(const WidePlan& tree) {
  const size_t n = tree.nodes.size();
  std::vector<Items> items(n);
  std::vector<Key> keys(n);
  std::vector<double> width(n, 0);
  for (size_t i = 0; i < n; ++i) {
    const WideNode& node = tree.nodes[i];
    if (node.is_leaf()) {
      keys[i] = relation_keys_[static_cast<size_t>(node.relation)];
      width[i] = query_.relation(node.relation).row_bytes;
      items[i] = Leaf(node.relation, node.cardinality);
      continue;
    }
    const auto l = static_cast<size_t>(node.left), r = static_cast<size_t>(node.right);
    keys[i] = {keys[l].first ^ keys[r].first, keys[l].second ^ keys[r].second};
    width[i] = width[l] + width[r];
    Items own = Join(node, items[l], items[r], width[l], width[r], tree.nodes[l].is_leaf(),
                     tree.nodes[r].is_leaf());
    items[i] = Share(keys[i], std::move(own));
    // The children's lists are no longer needed: the kept sub-plans hold
    // what they use.
    items[l].clear();
    items[r].clear();
  }
  Items& top = items[n - 1];
  std::vector<ClusterCosts> costs;
  for (const Ptr& p : top) costs.push_back(p->costs);
  std::vector<std::shared_ptr<const SubPlan>> out;
  for (size_t k : FrontierIndices(costs, config_.objectives)) out.push_back(top[k]);
  return out;
}

FrontierPlan SubPlanCache::Flatten(const SubPlan& plan) {
  WidePlan tree;
  PhysicalPlan physical;
  // Post-order without recursion: (sub-plan, its children done).
  std::vector<std::pair<const SubPlan*, bool>> stack{{&plan, false}};
  std::vector<int32_t> done;  // node indices of finished children, as a stack
  while (!stack.empty()) {
    auto [p, expanded] = stack.back();
    stack.pop_back();
    if (!p->is_leaf() && !expanded) {
      stack.push_back({p, true});
      stack.push_back({p->right.get(), false});
      stack.push_back({p->left.get(), false});
      continue;
    }
    WideNode node;
    node.cardinality = p->cardinality;
    if (p->is_leaf()) {
      node.relation = p->relation;
    } else {
      node.right = done.back();
      done.pop_back();
      node.left = done.back();
      done.pop_back();
      node.cost = CoutJoin(node.cardinality, tree.nodes[static_cast<size_t>(node.left)].cost,
                           tree.nodes[static_cast<size_t>(node.right)].cost);
    }
    done.push_back(static_cast<int32_t>(tree.nodes.size()));
    tree.nodes.push_back(node);
    physical.strategy.push_back(p->strategy);
    physical.nodes.push_back(p->nodes);
    physical.sample_rate.push_back(p->sample_rate);
    physical.metrics.push_back(p->costs);
  }
  return {std::make_shared<const WidePlan>(std::move(tree)), std::move(physical)};
}

}  // namespace sliceplan
