#include "tiers/idp.h"

#include <algorithm>
#include <bit>
#include <chrono>
#include <deque>
#include <optional>
#include <queue>
#include <string>
#include <utility>
#include <vector>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/str_cat.h"
#include "core/model/value_range.h"

namespace sliceplan {
namespace {

// A cheaper block answer must beat the old one by more than rounding (the
// block's cardinalities are the same products taken in another order).
constexpr double kImprovement = 1e-9;

// A block query as numbers: its relations' rows, then each predicate's
// relations and selectivity, bit for bit. The exact search's answer is a
// function of these alone.
using BlockKey = std::vector<uint64_t>;

BlockKey KeyOf(const Query& block) {
  BlockKey key;
  key.reserve(1 + block.size() + 2 * block.predicates().size());
  key.push_back(static_cast<uint64_t>(block.size()));
  for (const Relation& r : block.relations()) key.push_back(std::bit_cast<uint64_t>(r.rows));
  for (const Predicate& p : block.predicates()) {
    key.push_back(p.relations);
    key.push_back(std::bit_cast<uint64_t>(p.selectivity));
  }
  return key;
}

std::vector<int32_t> SubtreeSizes(const WidePlan& plan) {
  std::vector<int32_t> size(plan.nodes.size(), 1);
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    const WideNode& n = plan.nodes[i];
    if (!n.is_leaf()) size[i] = size[n.left] + size[n.right];
  }
  return size;
}

// The units of the block rooted at v: the unit with the most relations is
// split until there are k (or only leaves are left).
std::vector<int32_t> Cut(const WidePlan& plan, const std::vector<int32_t>& size, int32_t v, int k) {
  const auto larger = [&](int32_t a, int32_t b) { return size[a] < size[b]; };
  std::priority_queue<int32_t, std::vector<int32_t>, decltype(larger)> frontier(larger);
  frontier.push(v);
  std::vector<int32_t> leaves;
  while (!frontier.empty() && static_cast<int>(frontier.size() + leaves.size()) < k) {
    const int32_t u = frontier.top();
    frontier.pop();
    const WideNode& n = plan.nodes[u];
    if (n.is_leaf()) {
      leaves.push_back(u);
      continue;
    }
    frontier.push(n.left);
    frontier.push(n.right);
  }
  while (!frontier.empty()) {
    leaves.push_back(frontier.top());
    frontier.pop();
  }
  return leaves;
}

// Renumbers the nodes reachable from the root (nodes[last]) in post-order,
// dropping the rest. Returns old index -> new index (-1: dropped).
std::vector<int32_t> Compact(WidePlan& plan, int32_t root) {
  std::vector<int32_t> mapping(plan.nodes.size(), -1);
  std::vector<WideNode> out;
  out.reserve(plan.nodes.size());
  std::vector<std::pair<int32_t, bool>> stack{{root, false}};
  while (!stack.empty()) {
    const auto [i, expanded] = stack.back();
    stack.pop_back();
    const WideNode& n = plan.nodes[i];
    if (n.is_leaf() || expanded) {
      WideNode copy = n;
      if (!n.is_leaf()) {
        copy.left = mapping[n.left];
        copy.right = mapping[n.right];
      }
      mapping[i] = static_cast<int32_t>(out.size());
      out.push_back(copy);
      continue;
    }
    stack.push_back({i, true});
    stack.push_back({n.right, false});
    stack.push_back({n.left, false});
  }
  plan.nodes = std::move(out);
  return mapping;
}

class BlockImprover {
 public:
  BlockImprover(const WideQuery& query, const IdpConfig& config, const BlockSearch& search)
      : query_(query), config_(config), search_(search), unit_of_(query.size(), -1) {}

  IdpResult Run(WidePlan plan) {
    IdpResult result;
    answers_.clear();
    result.stats.start_cost = CostWidePlan(plan, query_);
    int k = std::clamp(config_.block, 3, kMaxRelations);
    int idle_passes = 0;
    while (idle_passes < 2 && result.stats.passes < config_.max_passes && !OutOfTime()) {
      const int pass_k = result.stats.passes % 2 == 0 ? k : std::max(3, 2 * k / 3);
      const int before = result.stats.improved;
      k = Pass(plan, pass_k, result.stats, k);
      ++result.stats.passes;
      idle_passes = result.stats.improved > before ? 0 : idle_passes + 1;
    }
    result.plan = std::move(plan);
    return result;
  }

 private:
  bool OutOfTime() const { return config_.out_of_time && config_.out_of_time(); }

  // One top-down pass of disjoint blocks of (about) pass_k units. Returns
  // the block size the capacity model asks for next.
  int Pass(WidePlan& plan, int pass_k, IdpStats& stats, int k) {
    std::deque<int32_t> queue{static_cast<int32_t>(plan.nodes.size()) - 1};
    std::vector<int32_t> size = SubtreeSizes(plan);
    while (!queue.empty() && !OutOfTime()) {
      const int32_t v = queue.front();
      queue.pop_front();
      std::vector<int32_t> units = Cut(plan, size, v, pass_k);
      if (units.size() >= 3) {
        const auto start = std::chrono::steady_clock::now();
        bool searched = false;
        std::optional<std::vector<int32_t>> mapping = TryBlock(plan, v, units, stats, searched);
        const double seconds =
            std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
        if (mapping) {
          for (int32_t& q : queue) q = (*mapping)[q];
          for (int32_t& u : units) u = (*mapping)[u];
          size = SubtreeSizes(plan);
        }
        // A reused answer took no search time: it says nothing of k.
        if (config_.next_block && searched) {
          const int next =
              std::clamp(config_.next_block(static_cast<int>(units.size()), seconds, stats.blocks),
                         3, kMaxRelations);
          pass_k = pass_k == k ? next : std::max(3, 2 * next / 3);
          k = next;
        }
      }
      for (const int32_t u : units) {
        if (size[u] >= 3) queue.push_back(u);
      }
    }
    return k;
  }

  // Searches the block at v (or reuses the answer to the same block met
  // before; `searched` says which); on a cheaper answer splices it in,
  // re-costs the plan and returns the renumbering.
  std::optional<std::vector<int32_t>> TryBlock(WidePlan& plan, int32_t v,
                                               const std::vector<int32_t>& units, IdpStats& stats,
                                               bool& searched) {
    std::optional<Query> block = BlockQuery(plan, units);
    if (!block) return std::nullopt;
    BlockKey key = KeyOf(*block);
    auto known = config_.reuse_answers ? answers_.find(key) : answers_.end();
    if (known == answers_.end()) {
      ++stats.blocks;
      stats.largest_block = std::max(stats.largest_block, static_cast<int>(units.size()));
      searched = true;
      absl::StatusOr<Plan> found = search_(*block);
      // An error (a deadline) is not an answer: the block may be tried again.
      if (!found.ok()) {
        ++stats.failed;
        stats.last_failure = std::string(found.status().message());
        return std::nullopt;
      }
      known = answers_.insert_or_assign(std::move(key), *std::move(found)).first;
    } else {
      ++stats.reused;
    }
    const Plan* answer = &known->second;
    if (answer->nodes.empty()) return std::nullopt;
    double old_top = plan.nodes[v].cost;
    for (const int32_t u : units) old_top -= plan.nodes[u].cost;
    if (!(answer->root().cost < old_top * (1 - kImprovement))) return std::nullopt;
    ++stats.improved;
    std::vector<int32_t> mapping = Splice(plan, v, units, *answer);
    CostWidePlan(plan, query_);
    if (config_.on_improved) config_.on_improved(plan);
    return mapping;
  }

  // The block as a query of its units; none when a unit's cardinality is
  // not a usable row count, or (without cross products) the units are not
  // connected.
  std::optional<Query> BlockQuery(const WidePlan& plan, const std::vector<int32_t>& units) {
    std::vector<Relation> relations;
    std::vector<int32_t> members;  // relations under the units
    for (size_t u = 0; u < units.size(); ++u) {
      const double rows = plan.nodes[units[u]].cardinality;
      if (!(rows > 0) || IsSaturated(rows)) return std::nullopt;
      relations.push_back({absl::StrCat("u", u), rows, kDefaultRowBytes});
      std::vector<int32_t> stack{units[u]};
      while (!stack.empty()) {
        const WideNode& n = plan.nodes[stack.back()];
        stack.pop_back();
        if (n.is_leaf()) {
          unit_of_[n.relation] = static_cast<int32_t>(u);
          members.push_back(n.relation);
        } else {
          stack.push_back(n.left);
          stack.push_back(n.right);
        }
      }
    }
    std::vector<Predicate> predicates;
    for (const int32_t r : members) {
      for (const int32_t p : query_.incident(r)) {
        const WidePredicate& pred = query_.predicates()[p];
        if (pred.relations[0] != r) continue;  // each predicate once
        RelSet mask = 0;
        bool inside = true;
        for (const int32_t x : pred.relations) {
          inside &= unit_of_[x] >= 0;
          if (unit_of_[x] >= 0) mask |= Singleton(RelationId{uint8_t(unit_of_[x])});
        }
        if (inside && Size(mask) >= 2) predicates.push_back({mask, pred.selectivity});
      }
    }
    for (const int32_t r : members) unit_of_[r] = -1;
    if (!config_.cross_products && !Connected(units.size(), predicates)) return std::nullopt;
    absl::StatusOr<Query> block = Query::Create(std::move(relations), std::move(predicates));
    if (!block.ok()) return std::nullopt;
    return *std::move(block);
  }

  static bool Connected(size_t n, const std::vector<Predicate>& predicates) {
    RelSet reached = 1;
    for (bool grew = true; grew;) {
      grew = false;
      for (const Predicate& p : predicates) {
        if ((p.relations & reached) != 0 && !IsSubset(p.relations, reached)) {
          reached |= p.relations;
          grew = true;
        }
      }
    }
    return reached == FullSet(static_cast<int>(n));
  }

  // Replaces the joins between v and its units by the block's plan: its
  // joins are appended, its root overwrites v, then the tree is compacted.
  static std::vector<int32_t> Splice(WidePlan& plan, int32_t v, const std::vector<int32_t>& units,
                                     const Plan& block) {
    const auto root = static_cast<int32_t>(plan.nodes.size()) - 1;  // v may be it
    std::vector<int32_t> at(block.nodes.size());
    for (size_t i = 0; i < block.nodes.size(); ++i) {
      const PlanNode& b = block.nodes[i];
      if (b.is_leaf()) {
        at[i] = units[Lowest(b.relations).value];
      } else if (i + 1 < block.nodes.size()) {
        at[i] = AddJoin(plan, at[b.left], at[b.right]);
      } else {
        plan.nodes[v].left = at[b.left];
        plan.nodes[v].right = at[b.right];
        at[i] = v;
      }
    }
    return Compact(plan, root);
  }

  const WideQuery& query_;
  const IdpConfig& config_;
  const BlockSearch& search_;
  std::vector<int32_t> unit_of_;
  // Every block query searched in this run and its answer.
  absl::flat_hash_map<BlockKey, Plan> answers_;
};

}  // namespace

IdpResult ImproveByBlocks(const WideQuery& query, WidePlan start, const IdpConfig& config,
                          const BlockSearch& search) {
  return BlockImprover(query, config, search).Run(std::move(start));
}

}  // namespace sliceplan
