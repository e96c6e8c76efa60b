#include "core/model/join_tree.h"

#include <cmath>
#include <limits>

#include "core/model/value_range.h"

namespace sliceplan {
namespace {

// The probability that a row finds no partner among `rows` candidates,
// each a match with probability s: (1 - s)^rows, from log_miss =
// log1p(-s) (-inf when s = 1).
double NoPartner(double log_miss, double rows) {
  return rows > 0 ? std::exp(rows * log_miss) : 1.0;
}

double Combine(JoinType type, double l, double r, double s, double log_miss) {
  const double inner = l * r * s;
  switch (type) {
    case JoinType::kInner:
      return inner;
    case JoinType::kSemi:
      return l * (1 - NoPartner(log_miss, r));
    case JoinType::kAnti:
      return l * NoPartner(log_miss, r);
    case JoinType::kLeft:
      return inner + l * NoPartner(log_miss, r);
    case JoinType::kFull:
      return inner + l * NoPartner(log_miss, r) + r * NoPartner(log_miss, l);
  }
  return inner;
}

}  // namespace

JoinTree::JoinTree(const Query& query) {
  for (const Relation& rel : query.relations()) rows_.push_back(rel.rows);
  owner_.assign(query.predicates().size(), -1);
  Build(query, query.all());
  // Children before parents: each node's whole estimate from its
  // children's.
  for (size_t i = 0; i < nodes_.size(); ++i) {
    const JoinTreeNode& node = nodes_[i];
    whole_.push_back(node.leaf() ? rows_[std::countr_zero(node.set)]
                                 : Join(static_cast<int>(i), query.all(), whole_[node.left],
                                        whole_[node.right]));
  }
}

int JoinTree::Add(JoinTreeNode node) {
  log_miss_.push_back(std::log1p(-node.selectivity));
  nodes_.push_back(node);
  completed_.emplace_back();
  return static_cast<int>(nodes_.size()) - 1;
}

int JoinTree::Build(const Query& query, RelSet x) {
  const auto ops = query.joins();
  // The block's items: operators inside x that no other operator inside x
  // holds, and the relations none of them holds.
  std::vector<int> items;
  RelSet covered = 0;
  for (size_t k = 0; k < ops.size(); ++k) {
    if (!IsSubset(ops[k].all(), x)) continue;
    bool top = true;
    for (size_t j = 0; j < ops.size() && top; ++j) {
      top = j == k || !IsSubset(ops[j].all(), x) ||
            !(IsSubset(ops[k].all(), ops[j].left) || IsSubset(ops[k].all(), ops[j].right));
    }
    if (!top) continue;
    const int l = Build(query, ops[k].left);
    const int r = Build(query, ops[k].right);
    JoinTreeNode node{ops[k].type,      static_cast<int>(k), l, r, ops[k].all(),
                      ops[k].predicate, ops[k].selectivity};
    items.push_back(Add(node));
    covered |= ops[k].all();
  }
  ForEachMember(x & ~covered, [&](RelationId r) {
    JoinTreeNode leaf;
    leaf.set = Singleton(r);
    items.push_back(Add(leaf));
  });
  // Left-deep in a connected order: start from the item holding x's
  // lowest relation, then take the first item some inner predicate joins
  // to what is built (else the first left: a cross product).
  size_t first = 0;
  while (!IsSubset(LowestBit(x), nodes_[items[first]].set)) ++first;
  int acc = items[first];
  items.erase(items.begin() + static_cast<std::ptrdiff_t>(first));
  while (!items.empty()) {
    size_t pick = 0;
    for (size_t i = 0; i < items.size(); ++i) {
      const RelSet a = nodes_[acc].set, b = nodes_[items[i]].set;
      bool joined = false;
      for (const Predicate& p : query.predicates()) {
        if (IsSubset(p.relations, a | b) && (p.relations & a) && (p.relations & b)) joined = true;
      }
      if (joined) {
        pick = i;
        break;
      }
    }
    const int item = items[pick];
    items.erase(items.begin() + static_cast<std::ptrdiff_t>(pick));
    JoinTreeNode node;
    node.left = acc;
    node.right = item;
    node.set = nodes_[acc].set | nodes_[item].set;
    std::vector<Predicate> done;
    std::vector<size_t> done_ids;
    for (size_t j = 0; j < query.predicates().size(); ++j) {
      const Predicate& p = query.predicates()[j];
      if (IsSubset(p.relations, node.set) && !IsSubset(p.relations, nodes_[acc].set) &&
          !IsSubset(p.relations, nodes_[item].set)) {
        node.reads |= p.relations;
        done.push_back(p);
        done_ids.push_back(j);
      }
    }
    acc = Add(node);
    completed_[acc] = std::move(done);
    for (size_t j : done_ids) owner_[j] = acc;
  }
  return acc;
}

double JoinTree::Join(int i, RelSet x, double l, double r) const {
  const JoinTreeNode& node = nodes_[i];
  double s = 1, log_miss = -std::numeric_limits<double>::infinity();
  if (node.op >= 0) {
    if (IsSubset(node.reads, x)) s = node.selectivity, log_miss = log_miss_[i];
  } else {
    for (const Predicate& p : completed_[i]) {
      if (IsSubset(p.relations, x)) s *= p.selectivity;
    }
  }
  return Saturate(Combine(node.type, l, r, s, log_miss));
}

double JoinTree::EstimateBelow(int i, RelSet x) const {
  // A node wholly inside x has its whole estimate; one partly inside
  // combines its children's (a child outside x gives way to the other).
  const JoinTreeNode& node = nodes_[i];
  if (IsSubset(node.set, x)) return whole_[i];
  const bool l = (nodes_[node.left].set & x) != 0, r = (nodes_[node.right].set & x) != 0;
  if (!(l && r)) return EstimateBelow(l ? node.left : node.right, x);
  return Join(i, x, EstimateBelow(node.left, x), EstimateBelow(node.right, x));
}

double JoinTree::Estimate(RelSet x) const {
  return EstimateBelow(static_cast<int>(nodes_.size()) - 1, x);
}

}  // namespace sliceplan
