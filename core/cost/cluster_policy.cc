#include "core/cost/cluster_policy.h"

#include <algorithm>

#include "core/model/value_range.h"

namespace sliceplan {
namespace {

// Completeness level codes: a level is the multiset of the leaves' rates,
// keyed by the sum of integer codes -log(rate) * 2^40. Equal multisets get
// equal keys exactly; distinct rates whose products merely coincide may
// get distinct keys, which only prunes less (always safe).
int64_t RateCode(double rate) { return std::llround(-std::log(rate) * 1099511627776.0); }

}  // namespace

ClusterPolicy::ClusterPolicy(const Query& query, const Cardinality& card,
                             const ClusterSearchConfig& config, uint64_t memo_limit_bytes)
    : query_(query),
      card_(card),
      config_(config),
      level_alpha_(std::pow(config.alpha, 1.0 / std::max(1, query.size()))),
      rule_(config.objectives, level_alpha_),
      max_entries_(memo_limit_bytes / sizeof(ClusterEntry)) {
  for (double rate : config_.params.sample_rates) rate_codes_.push_back(RateCode(rate));
  leaves_.resize(query.size());
  for (int i = 0; i < query.size(); ++i) {
    const Relation& rel = query.relations()[i];
    for (size_t k = 0; k < config_.params.sample_rates.size(); ++k) {
      const double rate = config_.params.sample_rates[k];
      ClusterEntry e;
      e.costs = {0, 0, rate};
      e.rows = IsSaturated(rel.rows) ? kValueCeiling : rel.rows * rate;
      e.level = rate_codes_[k];
      e.left_index = static_cast<uint32_t>(k);
      leaves_[i].push_back(e);
    }
  }
}

void ClusterPolicy::Resize(size_t slots) {
  first_.resize(slots, 0);
  size_.resize(slots, 0);
  card_of_.resize(slots, 0);
  width_of_.resize(slots, 0);
  leaf_.resize(slots, 0);
  if (scattered_) per_set_.resize(slots);
}

void ClusterPolicy::InitLeaf(Slot s, RelationId r) {
  card_of_[s] = query_.relation(r).rows;
  width_of_[s] = query_.relation(r).row_bytes;
  leaf_[s] = 1;
  if (scattered_) {
    per_set_[s] = leaves_[r.value];
    Grown(s, 0);
  } else {
    Store(s, leaves_[r.value]);
  }
}

ClusterPolicy::Acc ClusterPolicy::Begin(Slot s, RelSet set) {
  SetInfo(s, set);
  scratch_.Clear();
  return {&scratch_, card_of_[s]};
}

void ClusterPolicy::InitSet(Slot s, RelSet set) {
  if (!scattered_) {
    scattered_ = true;
    per_set_.resize(card_of_.size());
  }
  SetInfo(s, set);
}

void ClusterPolicy::SetInfo(Slot s, RelSet set) {
  card_of_[s] = card_.Of(set);
  double width = 0;
  ForEachMember(set, [&](RelationId r) { width += query_.relation(r).row_bytes; });
  width_of_[s] = width;
  leaf_[s] = 0;
}

namespace {

// Level runs of a frontier sorted by (level, latency): [begin, end) each.
void LevelRuns(std::span<const ClusterEntry> plans,
               std::vector<std::pair<uint32_t, uint32_t>>& runs) {
  runs.clear();
  for (uint32_t i = 0; i < plans.size();) {
    uint32_t j = i + 1;
    while (j < plans.size() && plans[j].level == plans[i].level) ++j;
    runs.emplace_back(i, j);
    i = j;
  }
}

// The rows of joining l and r into a set of `card` rows: sampling shrinks
// a saturated count only on paper, so it stays saturated.
double OutRows(double card, const ClusterEntry& l, const ClusterEntry& r) {
  return IsSaturated(card) ? kValueCeiling : card * (l.costs.completeness * r.costs.completeness);
}

}  // namespace

template <class Level>
bool ClusterPolicy::PairCovered(const Level& out, std::span<const ClusterEntry> left, uint32_t a0,
                                uint32_t a1, std::span<const ClusterEntry> right, uint32_t b0,
                                uint32_t b1, int nodes, double t) const {
  // Each side's least latency (its first entry) and least node-seconds
  // (its last), a hair lower so that the last-bit spread of t within a
  // level cannot make the test unsafe.
  const double lat =
      std::max(rule_.Lat(left[a0]), rule_.Lat(right[b0])) + (rule_.has_latency() ? t : 0.0);
  const double ns = rule_.Ns(left[a1 - 1]) + rule_.Ns(right[b1 - 1]) +
                    (rule_.has_node_seconds() ? nodes * t : 0.0);
  return out.Covers(rule_, lat * (1 - 1e-12), ns * (1 - 1e-12));
}

void ClusterPolicy::Options(const ClusterEntry& l, double left_width, bool left_leaf,
                            const ClusterEntry& r, double right_width, bool right_leaf,
                            double out_rows) const {
  const ClusterParams& p = config_.params;
  options_.clear();
  for (JoinStrategy strategy : kAllStrategies) {
    for (size_t m = 0; m < p.node_counts.size(); ++m) {
      const int nodes = p.node_counts[m];
      options_.push_back({strategy, m, nodes,
                          StageSeconds(p, strategy, nodes, {l.rows, left_width, left_leaf},
                                       {r.rows, right_width, right_leaf}, out_rows)});
    }
  }
  // With t the same for every combination of the pair, option a gives
  // each (l, r) latency max + t_a and node-seconds sum + m_a t_a: no worse
  // than option b on the objectives asked for means every combination
  // under b is dominated by the same one under a. Ties keep the first.
  // Only for the exact frontier: with alpha > 1 the dominated options'
  // combinations, offered first, often cover several better ones at once,
  // and the sets came out larger and slower without them (8 and 10
  // relations, alpha 1.05: 30% slower, docs/benchmarks.md).
  if (config_.alpha > 1) return;
  const auto no_worse = [&](const StageOption& a, const StageOption& b) {
    return (!rule_.has_latency() || a.seconds <= b.seconds) &&
           (!rule_.has_node_seconds() || a.nodes * a.seconds <= b.nodes * b.seconds);
  };
  size_t kept = 0;
  for (size_t b = 0; b < options_.size(); ++b) {
    bool dominated = false;
    for (size_t a = 0; a < options_.size() && !dominated; ++a) {
      if (a == b || !no_worse(options_[a], options_[b])) continue;
      // a equal to b on both: the earlier one stays.
      dominated = !no_worse(options_[b], options_[a]) || a < b;
    }
    if (!dominated) options_[kept++] = options_[b];
  }
  options_.resize(kept);
}

// Within one completeness level every entry has the same completeness (up
// to rounding in the last bit of its product), so for one level pair and
// one (strategy, node count) every combination has the same stage time t:
// latency max(L, R) + t, node-seconds L + R + m t. Of the combinations of
// one left entry l with the right entries of latency <= l's, the one with
// the least node-seconds (the last of them on the right staircase) is as
// fast and at least as cheap as the others; the same for a right entry and
// the left entries of smaller latency. So those |A| + |B| combinations
// hold every combination not dominated by another, and only they are made.
// And a level pair whose best conceivable combination (each side's least
// latency and least node-seconds, with that t) is already covered is
// skipped whole.
template <class Out>
void ClusterPolicy::Combine(Out& out, double card, Operand left, Operand right) const {
  const ClusterParams& p = config_.params;
  LevelRuns(left.plans, left_runs_);
  LevelRuns(right.plans, right_runs_);
  const int fewest_nodes = *std::min_element(p.node_counts.begin(), p.node_counts.end());
  for (const Run& a : left_runs_) {
    for (const Run& b : right_runs_) {
      auto level = out.At(left.plans[a.first].level + right.plans[b.first].level);
      // Every stage pays its start-up, on at least the fewest nodes: if the
      // pair's best point at that floor is covered, all its options are.
      if (PairCovered(level, left.plans, a.first, a.second, right.plans, b.first, b.second,
                      fewest_nodes, p.stage_startup_s)) {
        continue;
      }
      const uint64_t made = CombineLevelPair(level, card, left, a, right, b);
      // A stopped control stays stopped: the enumerator sees it next.
      if (control_ != nullptr && control_->Tick(std::max<uint64_t>(made, 1))) return;
    }
  }
}

template <class Level>
uint64_t ClusterPolicy::CombineLevelPair(Level& level, double card, Operand left, Run a,
                                         Operand right, Run b) const {
  const ClusterEntry& l0 = left.plans[a.first];
  const ClusterEntry& r0 = right.plans[b.first];
  const double rows0 = OutRows(card, l0, r0);
  Options(l0, left.width, left.leaf, r0, right.width, right.leaf, rows0);
  uint64_t made = 0;
  for (const StageOption& o : options_) {
    // The entries of one level pair almost always share their row counts,
    // and the same inputs give the same time: start from the time Options
    // made for this option, so StageTime recomputes only when rows change.
    LastStage last{l0.rows, r0.rows, rows0, o.seconds};
    if (PairCovered(level, left.plans, a.first, a.second, right.plans, b.first, b.second, o.nodes,
                    o.seconds)) {
      continue;
    }
    made += InsertStaircases(level, card, left, a, right, b, o, last);
  }
  return made;
}

template <class Level>
uint64_t ClusterPolicy::InsertStaircases(Level& level, double card, Operand left, Run a,
                                         Operand right, Run b, const StageOption& o,
                                         LastStage& last) const {
  const std::span<const ClusterEntry> ls = left.plans, rs = right.plans;
  const auto [a0, a1] = a;
  const auto [b0, b1] = b;
  uint64_t made = 0;
  // Right entries of latency <= each left entry's: the last of them.
  uint32_t j = b0;
  for (uint32_t i = a0; i < a1; ++i) {
    while (j + 1 < b1 && rule_.Lat(rs[j + 1]) <= rule_.Lat(ls[i])) ++j;
    if (rule_.Lat(rs[j]) <= rule_.Lat(ls[i])) {
      level.Insert(rule_, MakeEntry(card, left, i, right, j, o, last));
      ++made;
    }
  }
  // Left entries of latency < each right entry's: the last of them.
  uint32_t i = a0;
  for (j = b0; j < b1; ++j) {
    while (i + 1 < a1 && rule_.Lat(ls[i + 1]) < rule_.Lat(rs[j])) ++i;
    if (rule_.Lat(ls[i]) < rule_.Lat(rs[j])) {
      level.Insert(rule_, MakeEntry(card, left, i, right, j, o, last));
      ++made;
    }
  }
  return made;
}

ClusterEntry ClusterPolicy::MakeEntry(double card, Operand left, uint32_t i, Operand right,
                                      uint32_t j, const StageOption& o, LastStage& last) const {
  const ClusterEntry& l = left.plans[i];
  const ClusterEntry& r = right.plans[j];
  ClusterEntry e;
  e.rows = OutRows(card, l, r);
  e.level = l.level + r.level;
  e.left_slot = left.slot;
  e.left_index = i;
  e.right_slot = right.slot;
  e.right_index = j;
  e.costs = JoinCosts(l.costs, r.costs, o.nodes, StageTime(left, l, right, r, e.rows, o, last));
  e.strategy = o.strategy;
  e.nodes_index = static_cast<uint16_t>(o.nodes_index);
  return e;
}

double ClusterPolicy::StageTime(Operand left, const ClusterEntry& l, Operand right,
                                const ClusterEntry& r, double out_rows, const StageOption& o,
                                LastStage& last) const {
  if (l.rows != last.left_rows || r.rows != last.right_rows || out_rows != last.out_rows) {
    last = {l.rows, r.rows, out_rows,
            StageSeconds(config_.params, o.strategy, o.nodes, {l.rows, left.width, left.leaf},
                         {r.rows, right.width, right.leaf}, out_rows)};
  }
  return last.seconds;
}

ClusterPolicy::Acc ClusterPolicy::Offer(Acc a, Slot left, Slot right) const {
  Combine(*a.out, a.card, SlotOperand(left), SlotOperand(right));
  return a;
}

ClusterPolicy::Acc ClusterPolicy::OfferLeafRight(Acc a, Slot left, RelationId right) const {
  Combine(*a.out, a.card, SlotOperand(left), LeafOperand(right));
  return a;
}

void ClusterPolicy::Store(Slot s, std::span<const ClusterEntry> plans) {
  largest_ = std::max(largest_, plans.size());
  entries_ += plans.size();
  if (entries_ > max_entries_) exhausted_ = true;
  first_[s] = arena_.size();
  size_[s] = exhausted_ ? 0 : static_cast<uint32_t>(plans.size());
  if (!exhausted_) arena_.insert(arena_.end(), plans.begin(), plans.end());
}

void ClusterPolicy::Store(Slot s, const LevelFrontier& plans) {
  const size_t count = plans.size();
  largest_ = std::max(largest_, count);
  entries_ += count;
  if (entries_ > max_entries_) exhausted_ = true;
  first_[s] = arena_.size();
  size_[s] = exhausted_ ? 0 : static_cast<uint32_t>(count);
  if (!exhausted_) plans.AppendTo(arena_);
}

void ClusterPolicy::Finish(Slot s, RelSet, const Acc& a) { Store(s, *a.out); }

void ClusterPolicy::Grown(Slot s, size_t before) {
  entries_ = entries_ + per_set_[s].size() - before;
  largest_ = std::max(largest_, per_set_[s].size());
  if (entries_ > max_entries_) {
    exhausted_ = true;
    per_set_[s].clear();
  }
}

void ClusterPolicy::Relax(Slot s, Slot left, Slot right) {
  const size_t before = per_set_[s].size();
  FlatFrontier out(per_set_[s]);
  Combine(out, card_of_[s], SlotOperand(left), SlotOperand(right));
  Grown(s, before);
}

void ClusterPolicy::RelaxLeafRight(Slot s, Slot left, RelationId right) {
  const size_t before = per_set_[s].size();
  FlatFrontier out(per_set_[s]);
  Combine(out, card_of_[s], SlotOperand(left), LeafOperand(right));
  Grown(s, before);
}

}  // namespace sliceplan
