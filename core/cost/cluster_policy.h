// The cluster model as a search policy: per memo set a Pareto set of
// physical plans (a tree choice, a strategy and node count per join, a
// sample rate per leaf), pruned per completeness level with precision
// alpha^(1/n) (docs/cost-models.md, "Approximate Pareto sets"). Symmetric: an
// unordered split is offered once and every strategy, broadcasting either
// side, is tried, which covers both orders.
//
// Memory: in dense enumeration the sets' plan entries live in one arena,
// appended once per finished set (the set being built goes to a reused
// scratch buffer, so nothing is allocated per split); without cross
// products, where a set's splits arrive interleaved, each set keeps its
// own vector. Passing the memo limit stops the search, reported through
// exhausted(). Single-threaded.
#ifndef SLICEPLAN_CORE_COST_CLUSTER_POLICY_H_
#define SLICEPLAN_CORE_COST_CLUSTER_POLICY_H_

#include <cmath>
#include <cstdint>
#include <span>
#include <utility>
#include <vector>

#include "core/cost/cluster_config.h"
#include "core/cost/cluster_frontier.h"
#include "core/cost/cluster_model.h"
#include "core/cost/pareto.h"
#include "core/cost/plan_choice.h"
#include "core/model/cardinality.h"
#include "core/model/query.h"
#include "core/search/search_control.h"
#include "core/search/search_policy.h"

namespace sliceplan {

class ClusterPolicy {
 public:
  static constexpr bool kSymmetric = true;
  // Dense enumeration may run on several threads at once (Begin and Finish share one scratch
  // frontier).
  static constexpr bool kParallelDense = false;
  // Per slot: card, width, arena start and count, leaf flag (entries are
  // counted against the limit as they are made).
  static constexpr size_t kBytesPerSlot = 3 * sizeof(double) + sizeof(uint32_t) + 1;

  struct Acc {
    LevelFrontier* out;
    double card;
  };

  // `query` and `card` must outlive the policy and use the enumerator's
  // numbering. REQUIRES: ValidateClusterParams(config.params) passed.
  ClusterPolicy(const Query& query, const Cardinality& card, const ClusterSearchConfig& config,
                uint64_t memo_limit_bytes);

  void Resize(size_t slots);
  void InitLeaf(Slot s, RelationId r);
  Acc Begin(Slot s, RelSet set);
  Acc Offer(Acc a, Slot left, Slot right) const;
  Acc OfferLeafRight(Acc a, Slot left, RelationId right) const;
  void Finish(Slot s, RelSet set, const Acc& a);
  void InitSet(Slot s, RelSet set);
  void Relax(Slot s, Slot left, Slot right);
  void RelaxLeafRight(Slot s, Slot left, RelationId right);
  bool HasPlan(Slot s) const { return !Plans(s).empty(); }

  // The Pareto set of a finished slot. Valid until the next Finish.
  std::span<const ClusterEntry> Plans(Slot s) const {
    if (scattered_) return per_set_[s];
    return {arena_.data() + first_[s], size_[s]};
  }
  const ClusterEntry& LeafEntry(RelationId r, uint32_t rate_index) const {
    return leaves_[r.value][rate_index];
  }
  const ClusterSearchConfig& config() const { return config_; }
  // Largest Pareto set of any memo entry so far.
  size_t largest_set() const { return largest_; }
  bool exhausted() const { return exhausted_; }
  // The search's control, ticked inside the combination of two Pareto sets
  // (one memo entry's combinations can take minutes), so a deadline or a
  // cancel stops the search within one tick. Null (the default): never
  // ticked. `control` must outlive its use; the slice search sets it.
  void set_control(SearchControl* control) { control_ = control; }

 private:
  // One side of a combination: its Pareto set, the slot it is stored in
  // (kNoSlot for a relation's leaf entries), and what the stage time needs
  // of it: whether it is a leaf and its row width in bytes. Passed by
  // value: a reference was reloaded after every insert into the frontier.
  struct Operand {
    std::span<const ClusterEntry> plans;
    Slot slot;
    bool leaf;
    double width;
  };
  // A level run [first, second) of an operand's plans.
  using Run = std::pair<uint32_t, uint32_t>;
  // A strategy and node count for one level pair, with its stage time.
  struct StageOption {
    JoinStrategy strategy;
    size_t nodes_index;
    int nodes;
    double seconds;
  };
  // The last stage time made, with its row inputs (see StageTime).
  struct LastStage {
    double left_rows, right_rows, out_rows, seconds;
  };

  // The operand of finished slot s.
  Operand SlotOperand(Slot s) const { return {Plans(s), s, leaf_[s] != 0, width_of_[s]}; }
  // The operand of relation r's leaf entries, offered without a slot.
  Operand LeafOperand(RelationId r) const {
    return {leaves_[r.value], kNoSlot, true, query_.relation(r).row_bytes};
  }
  // Joins the two frontiers with every strategy and node count into out
  // (a LevelFrontier or a FlatFrontier): of each level pair, only the
  // combinations no other one can dominate (see the .cc), and none for a
  // pair out can already cover.
  template <class Out>
  void Combine(Out& out, double card, Operand left, Operand right) const;
  // Combine's parts below are its inner loop, always inlined into it: as
  // calls they cost 6% more instructions (pareto_bench, 9 relations).
  // One level pair, a of left and b of right, not covered at the start-up
  // floor: its combinations under each stage option worth trying, into
  // `level` (the out level of the pair). Returns how many were made.
  template <class Level>
  [[gnu::always_inline]] inline uint64_t CombineLevelPair(Level& level, double card, Operand left,
                                                          Run a, Operand right, Run b) const;
  // The level pair's combinations under option o that no other one can
  // dominate (see the .cc), into `level`. Returns how many were made.
  template <class Level>
  [[gnu::always_inline]] inline uint64_t InsertStaircases(Level& level, double card, Operand left,
                                                          Run a, Operand right, Run b,
                                                          const StageOption& o,
                                                          LastStage& last) const;
  // The combination of left entry i and right entry j under option o, for
  // a set of `card` rows.
  [[gnu::always_inline]] inline ClusterEntry MakeEntry(double card, Operand left, uint32_t i,
                                                       Operand right, uint32_t j,
                                                       const StageOption& o, LastStage& last) const;
  // The stage time of joining l and r into out_rows rows under option o:
  // last's when the row inputs are last's, else computed and kept in last.
  [[gnu::always_inline]] inline double StageTime(Operand left, const ClusterEntry& l, Operand right,
                                                 const ClusterEntry& r, double out_rows,
                                                 const StageOption& o, LastStage& last) const;
  // True when `level` (the out level of the level runs left[a0, a1) and
  // right[b0, b1)) already covers their best conceivable combination with
  // stage time t on `nodes` nodes: then it covers every one of them.
  template <class Level>
  bool PairCovered(const Level& level, std::span<const ClusterEntry> left, uint32_t a0, uint32_t a1,
                   std::span<const ClusterEntry> right, uint32_t b0, uint32_t b1, int nodes,
                   double t) const;
  // Fills options_ with the strategies and node counts worth trying for a
  // level pair whose first entries are l and r: for the exact frontier,
  // those no other one beats on both the stage time and its node-seconds
  // (see the .cc); with alpha > 1, all of them.
  void Options(const ClusterEntry& l, double left_width, bool left_leaf, const ClusterEntry& r,
               double right_width, bool right_leaf, double out_rows) const;
  void SetInfo(Slot s, RelSet set);
  // Appends a finished set's entries to the arena.
  void Store(Slot s, std::span<const ClusterEntry> plans);
  void Store(Slot s, const LevelFrontier& plans);
  // Accounts for slot s having grown in place from `before` entries.
  void Grown(Slot s, size_t before);

  const Query& query_;
  const Cardinality& card_;
  const ClusterSearchConfig config_;
  const double level_alpha_;
  const StaircaseRule rule_;
  const uint64_t max_entries_;
  std::vector<std::vector<ClusterEntry>> leaves_;  // relation -> one per rate
  std::vector<int64_t> rate_codes_;
  bool scattered_ = false;                          // InitSet/Relax in use
  std::vector<ClusterEntry> arena_;                 // dense: all sets' entries
  std::vector<uint64_t> first_;                     // dense: slot -> arena start
  std::vector<uint32_t> size_;                      // dense: slot -> entry count
  std::vector<std::vector<ClusterEntry>> per_set_;  // scattered: slot -> entries
  std::vector<double> card_of_;
  std::vector<double> width_of_;
  std::vector<uint8_t> leaf_;
  mutable LevelFrontier scratch_;
  mutable std::vector<Run> left_runs_, right_runs_;  // Combine's
  mutable std::vector<StageOption> options_;         // Combine's
  size_t largest_ = 0;
  uint64_t entries_ = 0;
  bool exhausted_ = false;
  SearchControl* control_ = nullptr;
};

static_assert(SearchPolicy<ClusterPolicy>);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_COST_CLUSTER_POLICY_H_
