#include "core/graph/join_conflicts.h"

#include <bit>
#include <cstdint>
#include <vector>

namespace sliceplan {
namespace {

using enum JoinType;

// The transformation tables of docs/joins.md for predicates that reject
// nulls (every predicate of a query does). assoc(a, b):
// (e1 a e2) b e3 == e1 a (e2 b e3).
bool Assoc(JoinType a, JoinType b) {
  switch (a) {
    case kInner:
      return b != kFull;
    case kSemi:
    case kAnti:
      return false;
    case kLeft:
      return b == kLeft;
    case kFull:
      return b == kLeft || b == kFull;
  }
  return false;
}

// l-asscom(a, b): (e1 a e2) b e3 == (e1 b e3) a e2.
bool LeftAsscom(JoinType a, JoinType b) {
  switch (a) {
    case kInner:
    case kSemi:
    case kAnti:
      return b != kFull;
    case kLeft:
      return true;
    case kFull:
      return b == kLeft || b == kFull;
  }
  return false;
}

// r-asscom(a, b): e1 a (e2 b e3) == e2 b (e1 a e3).
bool RightAsscom(JoinType a, JoinType b) {
  return (a == kInner && b == kInner) || (a == kFull && b == kFull);
}

}  // namespace

JoinConflicts::JoinConflicts(const Query& query)
    : tree_(query), predicates_(query.predicates().begin(), query.predicates().end()) {
  const auto& nodes = tree_.nodes();
  ops_.resize(query.joins().size());
  inner_ops_.resize(nodes.size());
  // Each node's core: what stays with it in every equivalent tree (the
  // right input of a left, semi or anti join may move above it).
  visible_.resize(nodes.size());
  for (size_t i = 0; i < nodes.size(); ++i) {
    const JoinTreeNode& node = nodes[i];
    if (node.leaf()) {
      visible_[i] = node.set;
    } else if (node.type == kInner) {
      visible_[i] = visible_[node.left] | visible_[node.right];
    } else {
      visible_[i] =
          node.type == kFull ? visible_[node.left] | visible_[node.right] : visible_[node.left];
    }
  }
  for (size_t i = 0; i < nodes.size(); ++i) {
    if (!nodes[i].leaf()) AddRules(static_cast<int>(i));
  }
  for (size_t j = 0; j < predicates_.size(); ++j) predicate_owner_.push_back(tree_.owner(j));
  Index();
  // A cross product is an inner join with no predicate to tell which
  // operator of the original tree it is: one that holds part of a
  // non-inner operator's right side (either side of a full join) and
  // reaches outside what that operator's right input may hold lies above
  // the operator, so it holds all the operator reads.
  for (size_t i = 0; i < nodes.size(); ++i) {
    const JoinTreeNode& a = nodes[i];
    if (a.leaf() || a.op < 0) continue;
    const RelSet left = nodes[a.left].set, right = nodes[a.right].set;
    cross_rules_.push_back({right, Reach(static_cast<int>(i), true), a.reads});
    if (a.type == kFull) cross_rules_.push_back({left, Reach(static_cast<int>(i), false), a.reads});
  }
}

RelSet JoinConflicts::Reach(int a, bool right_side) const {
  const auto& nodes = tree_.nodes();
  const JoinTreeNode& node = nodes[a];
  const RelSet left = nodes[node.left].set, right = nodes[node.right].set;
  // The side's other input: what an operator moving in may not read.
  const RelSet other = right_side ? left : right;
  RelSet reach = right_side ? right : left;
  // Operators above `a` whose other input may move into this side:
  //   right: (e1 a e2) c e3 == e1 a (e2 c e3)   (assoc(a, c)),
  //          e1 c (e2 a e3) == e2 a (e1 c e3)   (r-asscom(c, a));
  //   left:  (e1 a e2) c e3 == (e1 c e3) a e2   (l-asscom(a, c)),
  //          e1 c (e2 a e3) == (e1 c e2) a e3   (assoc(c, a)).
  for (size_t c = static_cast<size_t>(a) + 1; c < nodes.size(); ++c) {
    const JoinTreeNode& up = nodes[c];
    if (up.leaf() || up.op < 0 || (up.reads & other) != 0 || (up.reads & reach) == 0) continue;
    const bool from_left = IsSubset(node.set, nodes[up.left].set);
    const bool from_right = IsSubset(node.set, nodes[up.right].set);
    if (from_left && (right_side ? Assoc(node.type, up.type) : LeftAsscom(node.type, up.type))) {
      reach |= nodes[up.right].set;
    }
    if (from_right && (right_side ? RightAsscom(up.type, node.type) : Assoc(up.type, node.type))) {
      reach |= nodes[up.left].set;
    }
  }
  return reach;
}

void JoinConflicts::AddRules(int b) {
  const auto& nodes = tree_.nodes();
  const JoinTreeNode& node = nodes[b];
  Operator op;
  op.type = node.type;
  op.reads_left = node.reads & nodes[node.left].set;
  op.reads_right = node.reads & nodes[node.right].set;
  op.rules_begin = rules_.size();
  // T1 -> T2 restricted to what the lower operator's predicate reads, as
  // CD-C does (the whole side when it reads nothing there).
  const auto add = [&](RelSet trigger, RelSet side, RelSet reads) {
    rules_.push_back({trigger, 0, (side & reads) != 0 ? side & reads : side});
  };
  // A cross product of the original tree reads, for its rules, the cores
  // of its inputs.
  const auto reads = [&](const JoinTreeNode& a) {
    if (a.op >= 0 || a.reads != 0) return a.reads;
    return visible_[a.left] | visible_[a.right];
  };
  const auto below = [&](int root, auto&& fn) {
    for (int a = 0; a <= root; ++a) {
      if (!nodes[a].leaf() && IsSubset(nodes[a].set, nodes[root].set)) fn(nodes[a]);
    }
  };
  below(node.left, [&](const JoinTreeNode& a) {
    const RelSet l = nodes[a.left].set, r = nodes[a.right].set;
    if (!Assoc(a.type, node.type)) add(r, l, reads(a));
    if (!LeftAsscom(a.type, node.type)) add(l, r, reads(a));
  });
  below(node.right, [&](const JoinTreeNode& a) {
    const RelSet l = nodes[a.left].set, r = nodes[a.right].set;
    if (!Assoc(node.type, a.type)) add(l, r, reads(a));
    if (!RightAsscom(node.type, a.type)) add(r, l, reads(a));
  });
  op.rules_end = rules_.size();
  if (node.op >= 0) {
    ops_[node.op] = op;
  } else {
    inner_ops_[b] = op;
  }
}

JoinConflicts::Check JoinConflicts::Simplify(const Operator& op, RelSet known) {
  Check check;
  check.begin = checked_.size();
  std::vector<Rule> rest(rules_.begin() + static_cast<std::ptrdiff_t>(op.rules_begin),
                         rules_.begin() + static_cast<std::ptrdiff_t>(op.rules_end));
  // What a join that applies `op` surely holds grows by every rule that
  // surely fires; a rule whose need is surely held goes.
  for (bool grew = true; grew;) {
    grew = false;
    std::vector<Rule> kept;
    for (const Rule& rule : rest) {
      if (IsSubset(rule.need, known)) continue;
      if (rule.exempt == 0 && (rule.trigger & known) != 0) {
        known |= rule.need;
        check.required |= rule.need;
        grew = true;
        continue;
      }
      kept.push_back(rule);
    }
    rest = std::move(kept);
  }
  checked_.insert(checked_.end(), rest.begin(), rest.end());
  check.end = checked_.size();
  return check;
}

void JoinConflicts::Index() {
  const size_t n = tree_.nodes().empty() ? 0 : static_cast<size_t>(Size(tree_.root().set));
  touch_ops_.assign(n, 0);
  partners_.assign(n, 0);
  pair_predicate_.assign(n * kMaxRelations, -1);
  for (size_t k = 0; k < ops_.size(); ++k) {
    Operator& op = ops_[k];
    op.check = Simplify(op, op.reads_left | op.reads_right);
    ForEachMember(op.reads_left | op.reads_right,
                  [&](RelationId v) { touch_ops_[v.value] |= uint64_t{1} << k; });
  }
  for (size_t j = 0; j < predicates_.size(); ++j) {
    const RelSet p = predicates_[j].relations;
    predicate_checks_.push_back(Simplify(inner_ops_[predicate_owner_[j]], p));
    if (Size(p) != 2) {
      hyper_predicates_.push_back(j);
      continue;
    }
    const int u = std::countr_zero(p), v = 63 - std::countl_zero(p);
    partners_[u] |= RelSet{1} << v;
    partners_[v] |= RelSet{1} << u;
    pair_predicate_[u * kMaxRelations + v] = pair_predicate_[v * kMaxRelations + u] =
        static_cast<int>(j);
  }
  IndexRules(n);
  for (size_t j = 0; j < predicates_.size(); ++j) {
    const Check& check = predicate_checks_[j];
    const RelSet p = predicates_[j].relations;
    if (!IsSubset(check.required, p) || check.begin != check.end) guarded_.push_back({p, check});
  }
}

JoinConflicts::AtSet JoinConflicts::At(RelSet s) const {
  AtSet at;
  at.set = s;
  // Hyperedges are tested split by split.
  at.clean = hyper_predicates_.empty();
  const uint64_t broken = rule_tables_ ? BrokenRules(s) : 0;
  for (const auto& [p, check] : guarded_) {
    if (IsSubset(p, s) && !Holds(check, s, broken)) at.clean = false;
  }
  for (size_t k = 0; k < ops_.size(); ++k) {
    const Operator& op = ops_[k];
    if (!IsSubset(op.reads_left | op.reads_right, s)) continue;
    at.active |= uint64_t{1} << k;
    if (Holds(op.check, s, broken)) at.fits |= uint64_t{1} << k;
  }
  return at;
}

void JoinConflicts::IndexRules(size_t n) {
  all_ = n == 0 ? 0 : ~RelSet{0} >> (kMaxRelations - n);
  rule_tables_ = !checked_.empty() && checked_.size() <= 64;
  for (const Rule& rule : checked_) rule_tables_ = rule_tables_ && rule.exempt == 0;
  if (!rule_tables_) return;
  const auto span = [](size_t begin, size_t end) {
    return end == begin ? 0 : (~uint64_t{0} >> (64 - (end - begin))) << begin;
  };
  for (Operator& op : ops_) op.check.rules = span(op.check.begin, op.check.end);
  for (Check& check : predicate_checks_) check.rules = span(check.begin, check.end);
  const size_t bytes = (n + 7) / 8;
  triggered_.assign(bytes * 256, 0);
  needed_.assign(bytes * 256, 0);
  for (size_t i = 0; i < checked_.size(); ++i) {
    for (size_t byte = 0; byte < bytes; ++byte) {
      const RelSet trigger = checked_[i].trigger >> (8 * byte) & 0xff;
      const RelSet need = checked_[i].need >> (8 * byte) & 0xff;
      for (size_t value = 1; value < 256; ++value) {
        if ((value & trigger) != 0) triggered_[byte * 256 + value] |= uint64_t{1} << i;
        if ((value & need) != 0) needed_[byte * 256 + value] |= uint64_t{1} << i;
      }
    }
  }
}

uint64_t JoinConflicts::BrokenRules(RelSet s) const {
  // Every kept rule has no exemption, so a rule breaks when s meets its
  // trigger and lacks part of its need.
  uint64_t triggered = 0, lacking = 0;
  const RelSet missing = all_ & ~s;
  for (size_t at = 0; at < triggered_.size(); at += 256, s >>= 8) {
    triggered |= triggered_[at + (s & 0xff)];
  }
  for (size_t at = 0; at < needed_.size(); at += 256) {
    lacking |= needed_[at + (missing >> (at / 32) & 0xff)];
  }
  return triggered & lacking;
}

JoinFit JoinConflicts::Fit(RelSet s1, RelSet s2, bool cross_products) const {
  const RelSet s = s1 | s2;
  const RelSet small = Size(s1) <= Size(s2) ? s1 : s2;
  const RelSet other = s ^ small;
  const uint64_t broken = rule_tables_ ? BrokenRules(s) : 0;
  // The non-inner operator whose predicate lies in s and reads both sides,
  // and the inner predicates across the split.
  uint64_t candidates = 0;
  bool inner_predicate = false;
  for (RelSet m = small; m != 0; m &= m - 1) {
    const int v = std::countr_zero(m);
    candidates |= touch_ops_[v];
    for (RelSet across = partners_[v] & other; across != 0; across &= across - 1) {
      const int j = pair_predicate_[v * kMaxRelations + std::countr_zero(across)];
      if (!Holds(predicate_checks_[j], s, broken)) return {};
      inner_predicate = true;
    }
  }
  // The operator found, as a scalar: the loop's state stays in a register.
  // (What removed the store-forward stall measured here, about a dozen
  // cycles a call, was JoinFit's 8-byte layout, returned in a register:
  // in 12 bytes it was stored field by field and read back whole.)
  int found = -1;
  for (; candidates != 0; candidates &= candidates - 1) {
    const int k = std::countr_zero(candidates);
    const Operator& op = ops_[k];
    const RelSet reads = op.reads_left | op.reads_right;
    if (!IsSubset(reads, s) || (reads & other) == 0) continue;
    // Two operators at one join, or an inner predicate at a non-inner one.
    if (found >= 0 || inner_predicate) return {};
    found = k;
  }
  for (const size_t j : hyper_predicates_) {
    const RelSet p = predicates_[j].relations;
    if (!IsSubset(p, s) || (p & s1) == 0 || (p & s2) == 0) continue;
    if (found >= 0) return {};
    if (!Holds(predicate_checks_[j], s, broken)) return {};
    inner_predicate = true;
  }
  if (found >= 0) {
    if (!Holds(ops_[found].check, s, broken)) return {};
    return Oriented(found, s1, s2);
  }
  if (!inner_predicate) {
    if (!cross_products) return {};
    for (const Rule& rule : cross_rules_) {
      if (rule.Broken(s)) return {};
    }
  }
  return {.type = JoinType::kInner, .forward = true, .backward = true, .op = -1};
}

}  // namespace sliceplan
