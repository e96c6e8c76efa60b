// Pareto-optimal sub-plans shared across the join trees the anytime search
// evaluates (our design after the plan cache of Trummer and Koch, "A fast
// randomized algorithm for multi-objective query optimization", SIGMOD
// 2016): for every relation set met as a node of some tree, the physical
// sub-plans of that set no other kept one alpha-covers within its
// completeness level (as PhysicalFrontier prunes), at most `cap` of them.
// Evaluating a tree joins, at each node, the node's own sub-plans with the
// set's cached ones, so a plan found later may take a better sub-tree
// found earlier in another tree, and the cache takes the node's best.
//
// Sound because a set's cardinality, row width and base-relation flag are
// functions of the set alone (inner joins only: the anytime search takes
// no `joins`): a sub-plan of set S costs the same wherever S appears. A
// sub-plan cached from a left-deep tree is left-deep, and one from a tree
// without cross products has none, so the trees it enters keep their
// shape and their freedom from cross products. Sets are keyed by two
// independent 64-bit hashes of their relations (XOR of per-relation random
// words); the plans built are checked whole by CheckWidePlan all the same.
//
// Bounded: past kMaxCachedSubPlans sub-plans no new set is cached (the
// sets already there still serve). Thread-compatible.
#ifndef SLICEPLAN_TIERS_SHARED_SUBPLANS_H_
#define SLICEPLAN_TIERS_SHARED_SUBPLANS_H_

#include <cstdint>
#include <memory>
#include <unordered_map>
#include <utility>
#include <vector>

#include "core/cost/cluster_config.h"
#include "core/model/wide_query.h"
#include "tiers/physical_frontier.h"
#include "tiers/wide_plan.h"

namespace sliceplan {

inline constexpr size_t kMaxCachedSubPlans = size_t{1} << 20;

// A physical sub-plan, shared by every larger plan built on it.
struct SubPlan {
  ClusterCosts costs;
  double rows = 0;         // cardinality x completeness
  double cardinality = 0;  // the set's
  int32_t relation = -1;   // leaves
  std::shared_ptr<const SubPlan> left, right;
  JoinStrategy strategy = JoinStrategy::kShuffle;
  int nodes = 0;
  double sample_rate = 1;
  bool is_leaf() const { return relation >= 0; }
};

class SubPlanCache {
 public:
  // REQUIRES: config's parameters valid; the query has no `joins`.
  SubPlanCache(const WideQuery& query, const ClusterSearchConfig& config, size_t cap);

  // The non-dominated plans (selected objectives) over all relations that
  // `tree`'s nodes allow, each node's own sub-plans joined with its set's
  // cached ones; the cache updated. REQUIRES: `tree` costed (CostWidePlan)
  // over the query.
  std::vector<std::shared_ptr<const SubPlan>> Evaluate(const WidePlan& tree);

  // The plan as a tree (children before parents, cout costs from its own
  // cardinalities) with its physical choices.
  static FrontierPlan Flatten(const SubPlan& plan);

  size_t cached_subplans() const { return cached_; }

 private:
  using Key = std::pair<uint64_t, uint64_t>;
  struct KeyHash {
    size_t operator()(const Key& k) const { return k.first ^ (k.second * 0x9E3779B97F4A7C15ULL); }
  };
  using Items = std::vector<std::shared_ptr<const SubPlan>>;
  Items Leaf(int32_t relation, double cardinality);
  Items Join(const WideNode& node, const Items& left, const Items& right, double left_width,
             double right_width, bool left_leaf, bool right_leaf);
  // `own` joined with the set's cached sub-plans, pruned; the cache updated.
  Items Share(const Key& key, Items own);

  const WideQuery& query_;
  const ClusterSearchConfig& config_;
  const size_t cap_;
  const double level_alpha_;
  std::vector<Key> relation_keys_;
  std::unordered_map<Key, Items, KeyHash> sets_;
  size_t cached_ = 0;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_TIERS_SHARED_SUBPLANS_H_
