// Which operator may join two relation sets when the query has non-inner
// joins: the conflict detector CD-C of Moerkotte, Fender and Eich ("On the
// correct and complete enumeration of the core search space", SIGMOD 2013),
// built once from the original tree (core/model/join_tree.h) and read by
// every search (docs/joins.md).
//
// Each operator o of the original tree gets a syntactic eligibility set
// (the relations its predicate reads, split by the side they came from)
// and conflict rules T1 -> T2 ("a join holding any of T1 holds all of
// T2"), one per pair (o, a below o) that the transformation tables forbid
// (commutativity, associativity, left- and right-asscom; docs/joins.md).
// A split (S1, S2) of S is joined by:
//   - the non-inner operator whose predicate lies in S and reads both
//     sides (at most one may), when its sides' reads lie in S1 and S2 (or
//     swapped, for a full join) and its rules hold on S;
//   - else an inner join: joined by inner predicates whose operators'
//     rules all hold on S, or (cross products allowed) by none, under the
//     rules of every non-inner operator from above it.
// Immutable; thread-safe.
#ifndef SLICEPLAN_CORE_GRAPH_JOIN_CONFLICTS_H_
#define SLICEPLAN_CORE_GRAPH_JOIN_CONFLICTS_H_

#include <bit>
#include <utility>
#include <vector>

#include "core/model/join_tree.h"
#include "core/model/query.h"

namespace sliceplan {

// The join of a split: its type, and which orders the operator allows.
// Eight bytes, so that it is returned in one register.
struct JoinFit {
  JoinType type = JoinType::kInner;
  bool forward = false;   // S1 as the left input
  bool backward = false;  // S2 as the left input
  int op = -1;            // index in Query::joins(); -1 for inner
  bool ok() const { return forward || backward; }
};

class JoinConflicts {
 public:
  // What a set's splits share, worked out once per set (At): the
  // non-inner operators whose predicate lies in the set, those whose
  // rules hold on it, and whether every inner predicate inside it may
  // join there ("clean"; else each split takes the full test).
  struct AtSet {
    RelSet set = 0;
    uint64_t active = 0;  // operators (Query::joins() bits) reading only inside
    uint64_t fits = 0;    // ... of those, the ones whose rules hold
    bool clean = false;
  };

  // `query` in the search's numbering; REQUIRES: its joins passed
  // ValidateJoinOps.
  explicit JoinConflicts(const Query& query);

  // The join of disjoint non-empty S1 and S2; !ok() when none may join
  // them (or, without cross products, when nothing connects them).
  JoinFit Fit(RelSet s1, RelSet s2, bool cross_products) const;

  // The same answer in a few mask operations per split, for a search that
  // meets a set's splits together. REQUIRES: at = At(s1 | s2).
  AtSet At(RelSet s) const;
  [[gnu::always_inline]] JoinFit Fit(const AtSet& at, RelSet s1, RelSet s2,
                                     bool cross_products) const {
    if (!at.clean) return Fit(s1, s2, cross_products);
    const RelSet small = Size(s1) <= Size(s2) ? s1 : s2;
    const RelSet other = at.set ^ small;
    uint64_t candidates = 0;
    RelSet across = 0;
    for (RelSet m = small; m != 0; m &= m - 1) {
      const int v = std::countr_zero(m);
      candidates |= touch_ops_[v];
      across |= partners_[v];
    }
    candidates &= at.active;
    across &= other;
    int found = -1;
    for (; candidates != 0; candidates &= candidates - 1) {
      const int k = std::countr_zero(candidates);
      if ((ops_[k].reads_left & other) == 0 && (ops_[k].reads_right & other) == 0) continue;
      if (found >= 0) return {};  // two operators at one join
      found = k;
    }
    if (found < 0) {
      if (across != 0) return {.type = JoinType::kInner, .forward = true, .backward = true};
      return Fit(s1, s2, cross_products);  // a cross product: its own rules
    }
    // An inner predicate at a non-inner join, or the operator's rules broken.
    if (across != 0 || (at.fits >> found & 1) == 0) return {};
    return Oriented(found, s1, s2);
  }

  const JoinTree& tree() const { return tree_; }

 private:
  // "A join over S holding any of `trigger` (and something outside
  // `exempt`) holds all of `need`".
  struct Rule {
    RelSet trigger = 0;
    RelSet exempt = 0;
    RelSet need = 0;
    bool Broken(RelSet s) const {
      return (s & trigger) != 0 && (s & ~exempt) != 0 && !IsSubset(need, s);
    }
  };
  // An operator's rules at a join that surely holds some relations: what
  // the join must hold, and the rules left to test (checked_[begin, end)).
  struct Check {
    RelSet required = 0;
    size_t begin = 0;
    size_t end = 0;
    uint64_t rules = 0;  // bits [begin, end) when the rule tables are kept
  };
  struct Operator {
    JoinType type = JoinType::kInner;
    RelSet reads_left = 0;   // the eligibility set's part from the left input
    RelSet reads_right = 0;  // ... from the right input
    size_t rules_begin = 0;  // its rules: rules_[rules_begin, rules_end)
    size_t rules_end = 0;
    Check check;  // non-inner: at a join that holds all it reads
  };

  // Operator k at the split (S1, S2), its rules known to hold: the orders
  // its inputs' reads allow (a full join commutes: either order).
  JoinFit Oriented(int k, RelSet s1, RelSet s2) const {
    const Operator& op = ops_[k];
    const bool as_is = IsSubset(op.reads_left, s1) && IsSubset(op.reads_right, s2);
    const bool swapped = IsSubset(op.reads_left, s2) && IsSubset(op.reads_right, s1);
    const bool either = IsCommutative(op.type) && (as_is || swapped);
    return {.type = op.type,
            .forward = as_is || either,
            .backward = IsCommutative(op.type) ? either : swapped,
            .op = k};
  }
  void AddRules(int node);
  // What the right (else left) input of non-inner tree node `a` may hold
  // in some equivalent tree.
  RelSet Reach(int a, bool right_side) const;
  // `op`'s rules at a join known to hold `known`.
  Check Simplify(const Operator& op, RelSet known);
  // `broken`: BrokenRules(s) when the rule tables are kept.
  bool Holds(const Check& check, RelSet s, uint64_t broken) const {
    if (!IsSubset(check.required, s)) return false;
    if (rule_tables_) return (check.rules & broken) == 0;
    for (size_t i = check.begin; i < check.end; ++i) {
      if (checked_[i].Broken(s)) return false;
    }
    return true;
  }
  // Fit's tables: the checks and the per-relation masks.
  void Index();
  // With at most 64 kept rules, the rules a join over s breaks as one
  // mask: OR over s's bytes of the rules their relations trigger, AND OR
  // over the bytes of what s lacks of the rules that need those relations.
  // A few lookups per set instead of a loop over each check's rules.
  void IndexRules(size_t n);
  uint64_t BrokenRules(RelSet s) const;

  JoinTree tree_;
  std::vector<Rule> rules_;
  std::vector<Operator> ops_;        // by Query::joins() index
  std::vector<Operator> inner_ops_;  // by tree node id (inner nodes only used)
  std::vector<Predicate> predicates_;
  std::vector<int> predicate_owner_;      // inner predicate -> tree node id
  std::vector<Rule> cross_rules_;         // a cross product's rules
  std::vector<RelSet> visible_;           // tree node -> its core (what never leaves it)
  std::vector<Rule> checked_;             // the rules Checks keep
  std::vector<Check> predicate_checks_;   // inner predicate -> its operator's check
  std::vector<uint64_t> touch_ops_;       // relation -> operators whose predicate reads it
  std::vector<RelSet> partners_;          // relation -> binary inner-predicate partners
  std::vector<int> pair_predicate_;       // [u * 64 + v] -> their predicate's index
  std::vector<size_t> hyper_predicates_;  // inner predicates over three or more
  RelSet all_ = 0;                        // every relation of the query
  bool rule_tables_ = false;              // checked_ fits one mask
  std::vector<uint64_t> triggered_;       // [byte * 256 + value] -> rules triggered
  std::vector<uint64_t> needed_;          // [byte * 256 + value] -> rules needing one
  // At's list: inner predicates whose check is more than "inside the set"
  // (their relations, their check).
  std::vector<std::pair<RelSet, Check>> guarded_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_GRAPH_JOIN_CONFLICTS_H_
