// Pareto sets of the cluster model's sub-plans, as its search policy keeps
// them (cluster_policy.h): entries grouped by completeness level, each
// level a staircase (latency rising, node-seconds falling), because no
// entry of a level dominates another. Insertion keeps that shape with
// precision alpha (docs/cost-models.md, "Approximate Pareto sets").
//
// Two containers share the rule: a flat vector sorted by (level,
// latency), which is what a finished set's plans are (a span the
// enumerators and plan extraction read), and a LevelFrontier, a set under
// construction with one vector per level, so an insertion moves only its
// own level's entries. Plain values; not thread-safe.
#ifndef SLICEPLAN_CORE_COST_CLUSTER_FRONTIER_H_
#define SLICEPLAN_CORE_COST_CLUSTER_FRONTIER_H_

#include <cstddef>
#include <cstdint>
#include <vector>

#include "core/cost/pareto.h"
#include "core/memo/slot.h"
#include "core/model/cluster_costs.h"

namespace sliceplan {

// One physical sub-plan in the memo.
struct ClusterEntry {
  ClusterCosts costs;
  double rows = 0;            // card x completeness
  int64_t level = 0;          // completeness level key (sum of the leaves' rate codes)
  Slot left_slot = kNoSlot;   // kNoSlot: a leaf
  uint32_t left_index = 0;    // entry in the left slot, or the leaf's rate index
  Slot right_slot = kNoSlot;  // kNoSlot with a join: a base-relation right input
  uint32_t right_index = 0;   // entry in the right slot, or the right leaf's rate index
  JoinStrategy strategy = JoinStrategy::kShuffle;
  uint16_t nodes_index = 0;
};

// What a staircase compares: the objectives' latency and node-seconds (0
// for one not asked for), and the per-level precision alpha >= 1.
class StaircaseRule {
 public:
  StaircaseRule(Objectives objectives, double alpha)
      : latency_(objectives.has(Objectives::kLatency)),
        node_seconds_(objectives.has(Objectives::kNodeSeconds)),
        alpha_(alpha) {}

  double Lat(const ClusterEntry& x) const { return latency_ ? x.costs.latency_s : 0.0; }
  double Ns(const ClusterEntry& x) const { return node_seconds_ ? x.costs.node_seconds : 0.0; }
  bool has_latency() const { return latency_; }
  bool has_node_seconds() const { return node_seconds_; }

  // True when an entry of the staircase [begin, end) alpha-covers a point
  // of (objective) latency `lat` and node-seconds `ns`.
  bool Covers(const ClusterEntry* begin, const ClusterEntry* end, double lat, double ns) const;

  // Adds e to the staircase v[begin, end) unless an entry alpha-covers it,
  // dropping the entries e dominates exactly.
  void Insert(std::vector<ClusterEntry>& v, size_t begin, size_t end, const ClusterEntry& e) const;

 private:
  bool latency_;
  bool node_seconds_;
  double alpha_;
};

// The flat form: v sorted by (level, latency). Finds a level's run by
// binary search.
class FlatFrontier {
 public:
  explicit FlatFrontier(std::vector<ClusterEntry>& v) : v_(v) {}
  bool Covers(const StaircaseRule& rule, int64_t level, double lat, double ns) const;
  void Insert(const StaircaseRule& rule, const ClusterEntry& e);

  // One level of it (entries inserted through it must be of that level).
  class Level {
   public:
    Level(FlatFrontier& f, int64_t level) : f_(f), level_(level) {}
    bool Covers(const StaircaseRule& rule, double lat, double ns) const {
      return f_.Covers(rule, level_, lat, ns);
    }
    void Insert(const StaircaseRule& rule, const ClusterEntry& e) { f_.Insert(rule, e); }

   private:
    FlatFrontier& f_;
    int64_t level_;
  };
  Level At(int64_t level) { return Level(*this, level); }

 private:
  std::vector<ClusterEntry>& v_;
};

// A set under construction: one staircase per level.
class LevelFrontier {
 public:
  // Empties it; the levels' vectors keep their capacity.
  void Clear();
  bool Covers(const StaircaseRule& rule, int64_t level, double lat, double ns) const;
  void Insert(const StaircaseRule& rule, const ClusterEntry& e);
  size_t size() const;
  // Appends the entries to out in the flat form's order.
  void AppendTo(std::vector<ClusterEntry>& out) const;

  // One level's staircase (made empty when new), looked up once for many
  // insertions; valid until the next Clear or At.
  class Level {
   public:
    explicit Level(std::vector<ClusterEntry>& run) : run_(run) {}
    bool Covers(const StaircaseRule& rule, double lat, double ns) const {
      return rule.Covers(run_.data(), run_.data() + run_.size(), lat, ns);
    }
    void Insert(const StaircaseRule& rule, const ClusterEntry& e) {
      rule.Insert(run_, 0, run_.size(), e);
    }

   private:
    std::vector<ClusterEntry>& run_;
  };
  Level At(int64_t level);

 private:
  // The run of `level`, or null.
  const std::vector<ClusterEntry>* Find(int64_t level) const;

  std::vector<int64_t> keys_;  // levels in use, ascending
  std::vector<uint32_t> run_;  // keys_[i]'s vector in runs_
  std::vector<std::vector<ClusterEntry>> runs_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_COST_CLUSTER_FRONTIER_H_
