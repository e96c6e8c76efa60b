#include "tiers/anytime_frontier.h"

#include <algorithm>
#include <chrono>
#include <random>
#include <utility>

#include "core/cost/pareto.h"
#include "tiers/greedy.h"
#include "tiers/shared_subplans.h"

namespace sliceplan {
namespace {

using Clock = std::chrono::steady_clock;

// A tree as child arrays (any node order), for moves.
struct Links {
  std::vector<int32_t> left, right, relation;
  int32_t root = -1;
};

Links LinksOf(const WidePlan& plan) {
  Links t;
  for (const WideNode& n : plan.nodes) {
    t.left.push_back(n.left);
    t.right.push_back(n.right);
    t.relation.push_back(n.relation);
  }
  t.root = static_cast<int32_t>(plan.nodes.size()) - 1;
  return t;
}

// Children before parents, iteratively (a deep tree does not recurse).
WidePlan PlanOf(const Links& t) {
  WidePlan plan;
  std::vector<int32_t> made(t.left.size(), -1);
  std::vector<std::pair<int32_t, bool>> stack{{t.root, false}};
  while (!stack.empty()) {
    const auto [v, expanded] = stack.back();
    stack.pop_back();
    if (t.left[v] < 0) {
      made[v] = AddLeaf(plan, t.relation[v]);
    } else if (expanded) {
      made[v] = AddJoin(plan, made[t.left[v]], made[t.right[v]]);
    } else {
      stack.push_back({v, true});
      stack.push_back({t.right[v], false});
      stack.push_back({t.left[v], false});
    }
  }
  return plan;
}

// A rotation or exchange at a random join with a join child: v = (X Y)
// with X = (A B) becomes A (B Y) or (A Y) B; mirrored when Y is the join.
bool MoveBushy(Links& t, std::mt19937_64& rng) {
  std::vector<int32_t> candidates;
  for (int32_t v = 0; v < static_cast<int32_t>(t.left.size()); ++v) {
    if (t.left[v] >= 0 && (t.left[t.left[v]] >= 0 || t.left[t.right[v]] >= 0)) {
      candidates.push_back(v);
    }
  }
  if (candidates.empty()) return false;
  const int32_t v = candidates[rng() % candidates.size()];
  bool use_left = t.left[t.left[v]] >= 0;
  if (use_left && t.left[t.right[v]] >= 0) use_left = rng() % 2 == 0;
  const bool rotate = rng() % 2 == 0;
  // Mirror so that the join child is on the left: v = (X Y), X = (A B).
  int32_t& x_slot = use_left ? t.left[v] : t.right[v];
  int32_t& y_slot = use_left ? t.right[v] : t.left[v];
  const int32_t x = x_slot, y = y_slot, a = t.left[x], b = t.right[x];
  if (rotate) {  // A (B Y): x now holds (B Y)
    t.left[x] = b;
    t.right[x] = y;
    x_slot = a;
    y_slot = x;
  } else {  // (A Y) B: x now holds (A Y)
    t.right[x] = y;
    y_slot = b;
  }
  return true;
}

// Two relations of a left-deep order swapped.
bool MoveLeftDeep(Links& t, std::mt19937_64& rng) {
  std::vector<int32_t> leaves;
  for (int32_t v = 0; v < static_cast<int32_t>(t.left.size()); ++v) {
    if (t.left[v] < 0) leaves.push_back(v);
  }
  if (leaves.size() < 2) return false;
  // Two different leaves: b from the others.
  const size_t i = rng() % leaves.size(), j = (i + 1 + rng() % (leaves.size() - 1)) % leaves.size();
  std::swap(t.relation[leaves[i]], t.relation[leaves[j]]);
  return true;
}

class Search {
 public:
  Search(const WideQuery& query, const ClusterSearchConfig& config,
         const AnytimeFrontierOptions& options)
      : query_(query),
        config_(config),
        options_(options),
        rng_(options.seed),
        cache_(query, config, options.cap_per_node) {}

  AnytimeFrontierResult Run(SearchControl& control) {
    const auto start = Clock::now();
    last_report_ = start;
    size_t added = 0;
    std::shared_ptr<const WidePlan> current = Evaluate(GreedyPlan(query_, options_.shape), added);
    Report(true);  // the seed's set at once: a caller pooling parts has counts before 1 s
    uint64_t moves = 0;
    while ((options_.max_moves == 0 || moves < options_.max_moves) &&
           !control.Tick(SearchControl::kTickWork)) {
      ++moves;
      Report(false);  // first: a refused move skips the rest of the loop
      Links links = LinksOf(*current);
      const bool moved =
          options_.shape == PlanShape::kBushy ? MoveBushy(links, rng_) : MoveLeftDeep(links, rng_);
      if (!moved) break;  // two relations: one tree
      WidePlan next = PlanOf(links);
      if (!options_.cross_products && HasCrossProduct(next, query_)) {
        ++result_.moves_refused;
        continue;
      }
      auto tree = Evaluate(std::move(next), added);
      if (added > 0) {
        current = std::move(tree);
      } else if (rng_() % 8 == 0 && !archive_.empty()) {
        current = archive_[rng_() % archive_.size()].tree;  // a restart
      }
    }
    Report(true);
    std::vector<ClusterCosts> costs;
    for (const FrontierPlan& p : archive_) costs.push_back(p.physical.costs());
    for (size_t k : FrontierIndices(costs, config_.objectives)) {
      result_.frontier.push_back(archive_[k]);
    }
    return std::move(result_);
  }

 private:
  // The tree costed, its physical Pareto set put into the archive;
  // `added`: how many of those plans entered it.
  std::shared_ptr<const WidePlan> Evaluate(WidePlan tree, size_t& added) {
    CostWidePlan(tree, query_);
    auto shared = std::make_shared<const WidePlan>(std::move(tree));
    ++result_.trees;
    added = 0;
    if (options_.share_subplans) {
      // Plans may take sub-trees cached from earlier trees: each is built
      // as a tree of its own, once it is known to enter.
      for (const auto& plan : cache_.Evaluate(*shared)) {
        added += Insert(plan->costs, [&] { return SubPlanCache::Flatten(*plan); });
      }
      return shared;
    }
    for (PhysicalPlan& p : PhysicalFrontier(query_, *shared, config_, {options_.cap_per_node})) {
      const ClusterCosts c = p.costs();
      added += Insert(c, [&] { return FrontierPlan{shared, std::move(p)}; });
    }
    return shared;
  }

  // Keeps the archive non-dominated (a plan equal to one there does not
  // enter); past max_plans only a plan that dominates one enters. `make`
  // builds the plan of costs `c`, only when it enters.
  template <typename Make>
  bool Insert(const ClusterCosts& c, Make make) {
    for (const FrontierPlan& q : archive_) {
      if (DominatesOrEquals(q.physical.costs(), c, config_.objectives)) return false;
    }
    const size_t before = archive_.size();
    std::erase_if(archive_, [&](const FrontierPlan& q) {
      return DominatesOrEquals(c, q.physical.costs(), config_.objectives);
    });
    if (archive_.size() == before && archive_.size() >= options_.max_plans) return false;
    archive_.push_back(make());
    return true;
  }

  void Report(bool last) {
    if (!options_.on_progress) return;
    const auto now = Clock::now();
    if (!last && now - last_report_ < std::chrono::seconds(1)) return;
    last_report_ = now;
    options_.on_progress(archive_.size(), result_.trees);
  }

  const WideQuery& query_;
  const ClusterSearchConfig& config_;
  const AnytimeFrontierOptions& options_;
  std::mt19937_64 rng_;
  std::vector<FrontierPlan> archive_;
  SubPlanCache cache_;
  AnytimeFrontierResult result_;
  Clock::time_point last_report_;
};

}  // namespace

AnytimeFrontierResult AnytimeFrontier(const WideQuery& query, const ClusterSearchConfig& config,
                                      const AnytimeFrontierOptions& options,
                                      SearchControl& control) {
  return Search(query, config, options).Run(control);
}

}  // namespace sliceplan
