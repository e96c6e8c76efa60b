// One slice's search for one policy: picks the enumerator (dense memo with
// cross products, connected-sets memo without; bushy or left-deep), owns the
// memo and answers questions about the finished memo. Internal to
// slice_solver.cc and the tests; single-threaded, single use.
#ifndef SLICEPLAN_CORE_SLICE_SEARCH_H_
#define SLICEPLAN_CORE_SLICE_SEARCH_H_

#include <chrono>
#include <cmath>
#include <optional>
#include <span>
#include <type_traits>

#include "absl/status/status.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "core/cost/cluster_policy.h"
#include "core/cost/count_policy.h"
#include "core/cost/cout_policy.h"
#include "core/graph/join_conflicts.h"
#include "core/graph/join_graph.h"
#include "core/memo/connected_memo.h"
#include "core/memo/memo_allocator.h"
#include "core/model/cardinality.h"
#include "core/model/plan.h"
#include "core/search/connected_left_deep.h"
#include "core/search/connected_pull.h"
#include "core/search/connected_push.h"
#include "core/search/connected_strategy.h"
#include "core/search/dense_bushy.h"
#include "core/search/dense_left_deep.h"
#include "core/search/search_control.h"
#include "core/search/search_stats.h"
#include "core/search_options.h"
#include "core/slicing/dense_layout.h"
#include "core/slicing/search_estimate.h"
#include "core/slicing/slice_constraints.h"

namespace sliceplan {

// RESOURCE_EXHAUSTED, naming the memo size, the limit and the smallest slice
// count that would fit, when a dense slice memo of `bytes_per_slot` entries
// passes `limit` bytes or 2^32 slots. Checked before anything is allocated.
absl::Status CheckDenseMemo(int n, PlanShape shape, int k, size_t bytes_per_slot, uint64_t limit);

// How each policy is built from the search's own query and cardinality.
template <class Policy>
Policy MakePolicy(const Query& working, const Cardinality& card, const SearchOptions& options);
template <>
inline CoutPolicy MakePolicy(const Query&, const Cardinality& card, const SearchOptions&) {
  return CoutPolicy(card);
}
template <>
inline CountPolicy MakePolicy(const Query&, const Cardinality& card, const SearchOptions&) {
  return CountPolicy(card);
}
template <>
inline ClusterPolicy MakePolicy(const Query& working, const Cardinality& card,
                                const SearchOptions& options) {
  return ClusterPolicy(working, card, options.cluster, options.memo_limit_bytes);
}

template <SearchPolicy Policy>
class SliceSearch {
 public:
  // REQUIRES: CheckDenseMemo passed when options.cross_products.
  SliceSearch(const Query& query, const SearchOptions& options, SliceConstraints constraints)
      : options_(options),
        constraints_(std::move(constraints)),
        dense_(options_.cross_products && !query.has_joins()),
        layout_(MakeLayout(query)),
        working_(layout_ ? query.Permuted(layout_->perm()) : query),
        connected_constraints_(layout_ && !dense_ ? constraints_.Renumbered(layout_->perm())
                                                  : constraints_),
        card_(working_),
        policy_(MakePolicy<Policy>(working_, card_, options_)) {
    if (working_.has_joins()) conflicts_.emplace(working_);
  }

  absl::Status Run(const SearchControl& outer) {
    const auto start = std::chrono::steady_clock::now();
    SearchControl control = outer;
    constexpr bool kCanExhaust = requires(const Policy& p) { p.exhausted(); };
    if constexpr (kCanExhaust) {
      control.set_cancel_check([this] { return policy_.exhausted(); });
    }
    constexpr bool kTicksInside = requires(Policy & p) { p.set_control(&control); };
    if constexpr (kTicksInside) policy_.set_control(&control);
    absl::Status status = dense_       ? RunDense(control)
                          : conflicts_ ? RunWithJoins(control)
                                       : RunConnected(control);
    if constexpr (kTicksInside) policy_.set_control(nullptr);
    stats_.seconds =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    if constexpr (kCanExhaust) {
      if (policy_.exhausted()) {
        return absl::ResourceExhaustedError(absl::StrCat(
            "the Pareto sets passed the memo limit of ", options_.memo_limit_bytes,
            " bytes; raise the limit, use a larger alpha or fewer sample rates and node counts"));
      }
    }
    return status;
  }

  // The slot of the whole query, if the slice holds a plan for it.
  std::optional<Slot> RootSlot() const {
    const RelSet all = working_.all();
    if (dense_) {
      const Slot slot = layout_->SlotOf(all);
      if (!policy_.HasPlan(slot)) return std::nullopt;
      return slot;
    }
    if (!memo_) return std::nullopt;
    const auto slot = memo_->Find(all);
    if (!slot || !policy_.HasPlan(*slot)) return std::nullopt;
    return slot;
  }

  // The best plan, in original relation ids. REQUIRES: RootSlot() and a
  // policy with BestLeft (a cost model). A memo entry below the root
  // without a best split is an engine bug: INTERNAL naming the set, never
  // a walk through an empty back-pointer.
  absl::StatusOr<Plan> ExtractPlan() const {
    RelSet broken = 0;
    Plan plan = BuildPlan(
        working_.all(),
        [&](RelSet set) {
          const Slot left = policy_.BestLeft(SlotOf(set));
          if (left != kNoSlot) return SetOf(left);
          if (broken == 0) broken = set;
          return LowestBit(set);  // any proper split, so the walk ends
        },
        card_);
    if (broken != 0) {
      return absl::InternalError(absl::StrCat("memo entry of ", Size(broken),
                                              " relations has no best split below the root"));
    }
    if (conflicts_) LabelJoins(plan);
    if (layout_) RenumberPlan(plan, layout_->inverse_perm());
    return plan;
  }

  // The type of the join of `left` and `right` (the search's numbering):
  // inner unless the query has non-inner joins.
  JoinType JoinTypeOf(RelSet left, RelSet right) const {
    return conflicts_ ? conflicts_->Fit(left, right, options_.cross_products).type
                      : JoinType::kInner;
  }

  const Policy& policy() const { return policy_; }
  const SearchStats& stats() const { return stats_; }
  // The query in the search's own numbering, and the way back to the
  // caller's ids (empty when the numbering is the caller's).
  const Query& working() const { return working_; }
  const Cardinality& cardinality() const { return card_; }
  std::span<const RelationId> to_original() const {
    if (!layout_) return {};
    return layout_->inverse_perm();
  }

  Slot SlotOf(RelSet set) const { return dense_ ? layout_->SlotOf(set) : *memo_->Find(set); }
  RelSet SetOf(Slot slot) const { return dense_ ? layout_->SetOf(slot) : memo_->SetOf(slot); }
  // How the connected-only search ran (unset with cross products).
  std::optional<ConnectedMethod> connected_method() const { return method_; }
  // Tests: run the connected-only search with `method` where the limits
  // allow it (ChooseConnectedStrategy). Call before Run.
  void want_connected_method(ConnectedMethod method) { wanted_ = method; }

 private:
  // Policy bytes per set of a connected-sets memo (the policy's own and a
  // cached cardinality for scattered relaxation).
  static constexpr size_t kPolicyBytesPerSet = Policy::kBytesPerSlot + sizeof(double);
  static constexpr size_t kHashBytesPerSet = kPolicyBytesPerSet + HashMemo::kBytesPerSet;

  // The dense search's memo layout; a sliced connected-only search takes
  // only its numbering (the constrained relations on the top bits), so the
  // sets no plan of the slice holds fill whole blocks of a direct memo that
  // the search never touches (docs/slicing.md, "Connected-only slices").
  std::optional<DenseLayout> MakeLayout(const Query& query) const {
    if (!dense_ && constraints_.constraints().empty()) return std::nullopt;
    return DenseLayout(query.size(), constraints_);
  }

  absl::Status RunDense(SearchControl& control) {
    const uint64_t slots = layout_->slot_count();
    policy_.Resize(slots);
    stats_.memo_entries = slots;
    stats_.memo_bytes = slots * Policy::kBytesPerSlot;
    // The enumerators see the renumbered constraints through the layout.
    if (options_.shape == PlanShape::kLeftDeep) {
      return RunDenseLeftDeep(*layout_, policy_, control, stats_);
    }
    if constexpr (Policy::kParallelDense) {
      if (Threaded(slots)) {
        return RunDenseBushyThreaded(*layout_, policy_, control, stats_, options_.threads);
      }
    }
    return RunDenseBushy(*layout_, policy_, control, stats_);
  }

  // Threads pay for their start and the level barriers from this many sets.
  static constexpr uint64_t kThreadedFromSets = uint64_t{1} << 14;
  bool Threaded(uint64_t sets) const {
    return options_.threads > 1 && sets >= kThreadedFromSets &&
           (!dense_ || layout_->free_bits() > 0);
  }

  absl::Status RunConnected(SearchControl& control) {
    return RunConnectedOn(working_, nullptr, std::nullopt, control);
  }

  // The connected-sets search over the graph of `graph_query`'s predicates
  // (the query's own, or with non-inner joins every predicate), each split
  // through `joins` when given; `method` forced, else chosen by
  // ChooseConnectedStrategy.
  absl::Status RunConnectedOn(const Query& graph_query, const JoinFilter* joins,
                              std::optional<ConnectedMethod> method, SearchControl& control) {
    const JoinGraph graph(graph_query);
    ConnectedStrategy strategy;
    if (method) {
      strategy.method = *method;
    } else {
      strategy = ChooseConnectedStrategy(graph_query, graph, options_.shape, kPolicyBytesPerSet,
                                         options_.memo_limit_bytes, wanted_);
    }
    method_ = strategy.method;
    const bool pulled = strategy.method == ConnectedMethod::kPullEverySplit ||
                        strategy.method == ConnectedMethod::kPullSetCcps;
    // The set ccp walk tests connectivity in a copy of the connected
    // sets: the memo loses the sets this slice has no plan for.
    std::optional<DirectMemo> graph_sets;
    std::optional<SetCcpWalk> walk;
    if (strategy.method == ConnectedMethod::kPullSetCcps) {
      walk.emplace(working_.size(), graph, graph_sets.emplace(*strategy.connected));
    }
    absl::Status status;
    if (strategy.method == ConnectedMethod::kPushHashed) {
      memo_.emplace(HashMemo(options_.memo_limit_bytes / kHashBytesPerSet));
    } else {
      memo_.emplace(strategy.connected ? std::move(*strategy.connected)
                                       : DirectMemo(working_.size()));
    }
    // Every split tested reads the sets in mask order; the ccp walks and
    // the left-deep searches take cardinalities from operands
    // (connected_pull.h).
    if constexpr (ScatteredLayout<Policy>) {
      if (strategy.method != ConnectedMethod::kPullEverySplit ||
          options_.shape == PlanShape::kLeftDeep) {
        policy_.UseScatteredLayout();
      }
    }
    constexpr bool kCanLeaveUnfilled = requires(Policy & p) { p.LeaveUnfilled(); };
    if constexpr (kCanLeaveUnfilled) {
      if (pulled && joins == nullptr) policy_.LeaveUnfilled();
    }
    memo_->Visit([&]<class Memo>(Memo& memo) {
      // A slice's direct memo is touched in its admissible blocks only
      // (MakeLayout): no huge page may make the others resident.
      TouchedRuns admitted;
      std::optional<TouchedRunsScope> admitted_pages;
      if constexpr (std::is_same_v<Memo, DirectMemo>) {
        if (layout_) admitted_pages.emplace(admitted = AdmittedBlocks());
      }
      if constexpr (!Memo::kGrows) policy_.Resize(memo.slot_count());
      if constexpr (std::is_same_v<Memo, DirectMemo>) {
        if (pulled) {
          status = RunPulled(graph, memo, control, walk ? &*walk : nullptr, joins);
          return;
        }
      }
      status = RunPushed(graph, memo, control, joins);
    });
    stats_.memo_entries = memo_->size();
    // (The walk's copy of the connected sets' bits counts too.)
    stats_.memo_bytes = memo_->direct() ? DirectBytes() + (graph_sets ? graph_sets->bytes() : 0)
                                        : memo_->size() * kHashBytesPerSet;
    if (absl::IsResourceExhausted(status)) {
      return absl::ResourceExhaustedError(absl::StrCat(status.message(), " (memo limit ",
                                                       options_.memo_limit_bytes, " bytes at ",
                                                       kHashBytesPerSet, " bytes per entry)"));
    }
    return status;
  }

  // The blocks of 2^f sets (slot = set) whose high pattern the slice
  // admits: the only entries of a sliced direct memo the pull searches
  // touch. Tested per block, with no table (8^k bytes at k triples).
  TouchedRuns AdmittedBlocks() const {
    const int f = layout_->free_bits();
    const DenseLayout* layout = &*layout_;
    return {f, [layout, f](uint64_t b) { return layout->Admissible(RelSet{b} << f); }};
  }

  // A direct memo's bytes: the presence bits, and the policy's entries of
  // the blocks whose high pattern the slice admits (the others are never
  // touched, so never resident).
  uint64_t DirectBytes() const {
    const int n = working_.size();
    const uint64_t slots = layout_ ? layout_->slot_count() : uint64_t{1} << n;
    return slots * kPolicyBytesPerSet + DirectMemo::BitmapBytes(n);
  }

  // Sets pulled in mask order: every split tested (left-deep: every
  // (S \ {r}, r)), or (walk given) each set's csg-cmp pairs walked.
  absl::Status RunPulled(const JoinGraph& graph, DirectMemo& memo, SearchControl& control,
                         const SetCcpWalk* walk, const JoinFilter* joins = nullptr) {
    if (options_.shape == PlanShape::kLeftDeep) {
      return RunConnectedLeftDeepPull(graph, connected_constraints_, policy_, memo, control, stats_,
                                      joins);
    }
    if constexpr (Policy::kParallelDense) {
      if (working_.size() >= 7 && Threaded(memo.slot_count())) {
        return RunConnectedPullThreaded(working_.size(), connected_constraints_, policy_, memo,
                                        control, stats_, options_.threads, walk, joins);
      }
    }
    return RunConnectedPull(connected_constraints_, policy_, memo, control, stats_, walk, joins);
  }

  // DPhyp (with non-inner joins, for either shape: the filter keeps
  // left-deep pairs), or the left-deep push.
  template <class Memo>
  absl::Status RunPushed(const JoinGraph& graph, Memo& memo, SearchControl& control,
                         const JoinFilter* joins = nullptr) {
    if (options_.shape == PlanShape::kBushy || joins != nullptr) {
      return ConnectedPush<Policy, Memo>(working_.size(), graph, card_, connected_constraints_,
                                         policy_, memo, control, stats_, joins)
          .Run();
    }
    return RunConnectedLeftDeep(working_.size(), graph, card_, connected_constraints_, policy_,
                                memo, control, stats_);
  }

  // A query with non-inner joins: the connected-sets search over the graph
  // of all predicates (with cross products, over the complete graph), each
  // split joined as the conflict detector says (docs/joins.md).
  absl::Status RunWithJoins(SearchControl& control) {
    const int n = working_.size();
    std::vector<Predicate> edges(working_.predicates().begin(), working_.predicates().end());
    for (const JoinOp& op : working_.joins()) edges.push_back({op.predicate, 1.0});
    if (options_.cross_products) {
      for (int u = 0; u < n; ++u) {
        for (int v = u + 1; v < n; ++v) edges.push_back({(RelSet{1} << u) | (RelSet{1} << v), 1.0});
      }
    }
    std::vector<Relation> rels(working_.relations().begin(), working_.relations().end());
    auto walk_query = Query::Create(std::move(rels), std::move(edges));
    if (!walk_query.ok()) return walk_query.status();
    const JoinFilter filter{&*conflicts_, options_.cross_products,
                            options_.shape == PlanShape::kLeftDeep};
    // With cross products, DPhyp over the complete graph (direct memo when
    // it fits); connected-only, the inner search's own strategies.
    std::optional<ConnectedMethod> method;
    if (options_.cross_products) {
      method =
          TakesDirectMemo(n, std::ldexp(1.0, n), kPolicyBytesPerSet, options_.memo_limit_bytes, 1)
              ? ConnectedMethod::kPushDirect
              : ConnectedMethod::kPushHashed;
    }
    return RunConnectedOn(*walk_query, &filter, method, control);
  }

  // Gives every join of `plan` (the search's numbering) its type, with
  // the preserved input on the left.
  void LabelJoins(Plan& plan) const {
    for (PlanNode& node : plan.nodes) {
      if (node.is_leaf()) continue;
      const RelSet l = plan.nodes[node.left].relations, r = plan.nodes[node.right].relations;
      const JoinFit fit = conflicts_->Fit(l, r, options_.cross_products);
      node.type = fit.type;
      if (!fit.forward && fit.backward) std::swap(node.left, node.right);
    }
  }

  SearchOptions options_;
  SliceConstraints constraints_;
  // The dense memo with cross products (not for non-inner joins).
  bool dense_;
  // Set for the dense search, and for a sliced connected-only one (its
  // numbering only).
  std::optional<DenseLayout> layout_;
  Query working_;  // renumbered by the layout, else the query itself
  // The constraints in working_'s numbering (connected-only search).
  SliceConstraints connected_constraints_;
  Cardinality card_;
  Policy policy_;
  std::optional<JoinConflicts> conflicts_;  // set when the query has non-inner joins
  std::optional<ConnectedMemo> memo_;       // set by a connected-only run
  std::optional<ConnectedMethod> method_;
  std::optional<ConnectedMethod> wanted_;
  SearchStats stats_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SLICE_SEARCH_H_
