#include "core/slice_solver.h"

#include <algorithm>
#include <cmath>
#include <type_traits>

#include "core/cost/count_policy.h"
#include "core/cost/cout_model.h"
#include "core/cost/cout_policy.h"
#include "core/cost/pareto.h"
#include "core/model/status_macros.h"
#include "core/model/user_text.h"
#include "core/model/value_range.h"
#include "core/slice_search.h"

namespace sliceplan {

absl::Status CheckDenseMemo(int n, PlanShape shape, int k, size_t bytes_per_slot, uint64_t limit) {
  const double slots = DenseSlots(n, shape, k);
  const double bytes = slots * static_cast<double>(bytes_per_slot);
  if (bytes <= static_cast<double>(limit) && slots < static_cast<double>(kNoSlot)) {
    return absl::OkStatus();
  }
  const auto fits = [&](double s) {
    return s * static_cast<double>(bytes_per_slot) <= static_cast<double>(limit) &&
           s < static_cast<double>(kNoSlot);
  };
  std::string advice;
  for (int more = k + 1; more <= MaxSliceBits(n, shape) && advice.empty(); ++more) {
    const double s = DenseSlots(n, shape, more);
    if (fits(s)) {
      advice = absl::StrFormat(
          "use at least %d slices (a slice then needs %.4g bytes), or raise "
          "the memo limit",
          uint64_t{1} << more, s * static_cast<double>(bytes_per_slot));
    }
  }
  if (advice.empty()) {
    const int most = std::max(k, MaxSliceBits(n, shape));
    const double most_slots = DenseSlots(n, shape, most);
    if (most_slots >= static_cast<double>(kNoSlot)) {  // a memo limit cannot help
      advice = absl::StrFormat(
          "even %d slices have %.4g sets each, past the 2^32 a slice can index; search "
          "without cross products or with the idp tier",
          uint64_t{1} << most, most_slots);
    } else if (most == k) {
      advice = absl::StrFormat(
          "no slice count brings it under (%d slices is the most this query takes); raise the "
          "memo limit",
          uint64_t{1} << k);
    } else {
      advice = absl::StrFormat(
          "more slices do not bring it under: even %d slices need %.4g bytes each; raise the "
          "memo limit",
          uint64_t{1} << most, most_slots * static_cast<double>(bytes_per_slot));
    }
  }
  return absl::ResourceExhaustedError(absl::StrFormat(
      "a slice's memo needs %.4g bytes (%.4g sets x %d bytes), over the memo limit of %d "
      "bytes%s; %s",
      bytes, slots, static_cast<int>(bytes_per_slot), limit,
      slots >= static_cast<double>(kNoSlot) ? " or past 2^32 sets" : "", advice));
}

namespace {

// OUT_OF_RANGE for a join of all relations that saturates, naming the
// largest relations.
absl::Status AllRelationsSaturate(std::span<const Relation> relations) {
  std::vector<size_t> by_rows(relations.size());
  for (size_t i = 0; i < by_rows.size(); ++i) by_rows[i] = i;
  const size_t shown = std::min<size_t>(3, by_rows.size());
  std::partial_sort(by_rows.begin(), by_rows.begin() + static_cast<std::ptrdiff_t>(shown),
                    by_rows.end(),
                    [&](size_t a, size_t b) { return relations[a].rows > relations[b].rows; });
  std::string largest;
  for (size_t i = 0; i < shown; ++i) {
    const Relation& rel = relations[by_rows[i]];
    absl::StrAppend(&largest, i == 0 ? "" : ", ", ShortName(rel.name), " ",
                    absl::StrFormat("%g", rel.rows));
  }
  return absl::OutOfRangeError(absl::StrFormat(
      "the join of all %d relations has at least %g rows (the largest value the engine "
      "represents), so every plan's cost passes it; the largest relations: %s rows; "
      "scale the row estimates down",
      relations.size(), kValueCeiling, largest));
}

}  // namespace

absl::Status CheckCoutInRange(const Query& query) {
  const double card = Cardinality(query).Of(query.all());
  if (!IsSaturated(card)) return absl::OkStatus();
  return AllRelationsSaturate(query.relations());
}

absl::Status CheckCoutInRange(const WideQuery& query) {
  if (query.size() <= kMaxRelations) {
    ASSIGN_OR_RETURN(const Query exact, ToExactQuery(query));
    return CheckCoutInRange(exact);
  }
  // Every predicate lies inside the whole query: its log cardinality is the
  // sum of the logs of every row count and selectivity.
  double log_card = 0;
  for (const Relation& rel : query.relations()) log_card += std::log(rel.rows);
  for (const WidePredicate& p : query.predicates()) log_card += std::log(p.selectivity);
  if (log_card < std::log(kValueCeiling)) return absl::OkStatus();
  return AllRelationsSaturate(query.relations());
}

namespace {

template <SearchPolicy Policy>
absl::Status Prepare(const Query& query, const SearchOptions& options, SliceSpec slice,
                     std::optional<SliceConstraints>& out) {
  RETURN_IF_ERROR(ValidateSearchOptions(options));
  ASSIGN_OR_RETURN(SliceConstraints constraints,
                   SliceConstraints::ForSlice(query, options.shape, slice, options.cross_products));
  // Only a cost can pass the ceiling: counting plans needs no check.
  if constexpr (std::is_same_v<Policy, CoutPolicy>) RETURN_IF_ERROR(CheckCoutInRange(query));
  if (options.cross_products) {
    RETURN_IF_ERROR(CheckDenseMemo(query.size(), options.shape, slice.bits(), Policy::kBytesPerSlot,
                                   options.memo_limit_bytes));
  }
  out.emplace(std::move(constraints));
  return absl::OkStatus();
}

// Rebuilds one physical plan of the cluster search from its back-pointers,
// in the search's numbering.
class ClusterPlanBuilder {
 public:
  explicit ClusterPlanBuilder(const SliceSearch<ClusterPolicy>& search) : search_(search) {}

  Plan Build(RelSet root, const ClusterEntry& e) {
    Plan plan;
    Add(plan, root, e);
    return plan;
  }

 private:
  int Add(Plan& plan, RelSet set, const ClusterEntry& e) {
    const ClusterPolicy& policy = search_.policy();
    const ClusterParams& params = policy.config().params;
    PlanNode node;
    node.relations = set;
    node.cardinality = search_.cardinality().Of(set);
    node.metrics = e.costs;
    node.cost = e.costs.latency_s;
    if (Size(set) == 1) {
      node.sample_rate = params.sample_rates[e.left_index];
    } else {
      const RelSet left = search_.SetOf(e.left_slot);
      const RelSet right = set & ~left;
      const ClusterEntry& le = policy.Plans(e.left_slot)[e.left_index];
      const ClusterEntry& re = e.right_slot == kNoSlot
                                   ? policy.LeafEntry(Lowest(right), e.right_index)
                                   : policy.Plans(e.right_slot)[e.right_index];
      node.left = Add(plan, left, le);
      node.right = Add(plan, right, re);
      node.type = search_.JoinTypeOf(left, right);
      node.strategy = e.strategy;
      node.nodes = params.node_counts[e.nodes_index];
    }
    plan.nodes.push_back(node);
    return static_cast<int>(plan.nodes.size()) - 1;
  }

  const SliceSearch<ClusterPolicy>& search_;
};

absl::StatusOr<SliceResult> SolveClusterSlice(const Query& query, const SearchOptions& options,
                                              SliceSpec slice, SearchControl& control) {
  std::optional<SliceConstraints> constraints;
  RETURN_IF_ERROR(Prepare<ClusterPolicy>(query, options, slice, constraints));
  SliceSearch<ClusterPolicy> search(query, options, *std::move(constraints));
  RETURN_IF_ERROR(search.Run(control));
  SliceResult result{slice, std::nullopt, search.stats(), {}, 0};
  result.largest_set = search.policy().largest_set();
  const auto root = search.RootSlot();
  if (!root) return result;
  const std::span<const ClusterEntry> entries = search.policy().Plans(*root);
  std::vector<ClusterCosts> costs;
  for (const ClusterEntry& e : entries) costs.push_back(e.costs);
  ClusterPlanBuilder builder(search);
  for (size_t i : FrontierIndices(costs, options.cluster.objectives)) {
    Plan plan = builder.Build(search.working().all(), entries[i]);
    if (!search.to_original().empty()) RenumberPlan(plan, search.to_original());
    result.frontier.push_back(std::move(plan));
  }
  result.plan = result.frontier.front();
  return result;
}

}  // namespace

absl::StatusOr<SliceResult> SolveSlice(const Query& query, const SearchOptions& options,
                                       SliceSpec slice, SearchControl& control) {
  if (options.cost == CostModelKind::kCluster) {
    return SolveClusterSlice(query, options, slice, control);
  }
  std::optional<SliceConstraints> constraints;
  RETURN_IF_ERROR(Prepare<CoutPolicy>(query, options, slice, constraints));
  SliceSearch<CoutPolicy> search(query, options, *std::move(constraints));
  RETURN_IF_ERROR(search.Run(control));
  SliceResult result{slice, std::nullopt, search.stats(), {}, 0};
  if (search.RootSlot()) {
    ASSIGN_OR_RETURN(result.plan, search.ExtractPlan());
    CostWithCout(*result.plan);
  }
  return result;
}

absl::StatusOr<SliceCount> CountSlicePlans(const Query& query, const SearchOptions& options,
                                           SliceSpec slice) {
  std::optional<SliceConstraints> constraints;
  RETURN_IF_ERROR(Prepare<CountPolicy>(query, options, slice, constraints));
  SliceSearch<CountPolicy> search(query, options, *std::move(constraints));
  SearchControl control;
  RETURN_IF_ERROR(search.Run(control));
  const auto root = search.RootSlot();
  return SliceCount{slice, root ? search.policy().Count(*root) : 0, search.stats()};
}

}  // namespace sliceplan
