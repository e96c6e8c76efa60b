#include "core/model/join_tree.h"

#include <algorithm>
#include <bit>
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
  BuildRegions();
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
  if (product_form_) return Saturate(EstimateRegion(0, x));
  return EstimateBelow(static_cast<int>(nodes_.size()) - 1, x);
}

namespace {

// An operator's factor on its left input, L * factor = Combine(L, r).
double Factor(JoinType type, double r, double s, double log_miss) {
  switch (type) {
    case JoinType::kInner:
      return r * s;
    case JoinType::kSemi:
      return 1 - NoPartner(log_miss, r);
    case JoinType::kAnti:
      return NoPartner(log_miss, r);
    case JoinType::kLeft:
      return r * s + NoPartner(log_miss, r);
    case JoinType::kFull:
      break;  // not linear in L: never in the product form
  }
  return r * s;
}

}  // namespace

void JoinTree::BuildRegions() {
  // No full join, and no value near the ceiling: each node's estimate is
  // at most 2^(operators below) times the product of max(rows, 1).
  double bound = 1;
  for (double rows : rows_) bound *= std::max(rows, 1.0);
  for (const JoinTreeNode& node : nodes_) {
    if (node.type == JoinType::kFull) return;
    if (node.op >= 0) bound *= 2;
  }
  if (!(bound < kValueCeiling)) return;
  std::vector<int> roots{static_cast<int>(nodes_.size()) - 1};
  for (size_t g = 0; g < roots.size(); ++g) {
    regions_.emplace_back();
    regions_[g].predicates_begin = region_predicates_.size();
    // The region's operators are listed before their right inputs'
    // regions exist; their indices are filled as each region is opened.
    std::vector<int> right_roots;
    regions_[g].ops_begin = region_ops_.size();
    FillRegion(roots[g], static_cast<int>(g), right_roots);
    regions_[g].ops_end = region_ops_.size();
    regions_[g].predicates_end = region_predicates_.size();
    for (size_t k = 0; k < right_roots.size(); ++k) {
      region_ops_[regions_[g].ops_begin + k].right_region = static_cast<int>(roots.size());
      roots.push_back(right_roots[k]);
    }
  }
  for (RegionOp& op : region_ops_) {
    op.factor_whole = Factor(op.type, op.right_whole, op.selectivity, op.log_miss);
  }
  product_form_ = true;
}

void JoinTree::FillRegion(int i, int region, std::vector<int>& right_roots) {
  const JoinTreeNode& node = nodes_[i];
  if (node.leaf()) {
    regions_[region].relations |= node.set;
    return;
  }
  if (node.op < 0) {
    region_predicates_.insert(region_predicates_.end(), completed_[i].begin(), completed_[i].end());
    FillRegion(node.left, region, right_roots);
    FillRegion(node.right, region, right_roots);
    return;
  }
  RegionOp op;
  op.type = node.type;
  op.left = nodes_[node.left].set;
  op.right = nodes_[node.right].set;
  op.reads = node.reads;
  op.selectivity = node.selectivity;
  op.log_miss = log_miss_[i];
  op.right_whole = whole_[node.right];
  region_ops_.push_back(op);
  right_roots.push_back(node.right);
  FillRegion(node.left, region, right_roots);
}

double JoinTree::EstimateRegion(int g, RelSet x) const {
  const Region& region = regions_[g];
  double card = 1;
  ForEachMember(region.relations & x, [&](RelationId r) { card *= rows_[r.value]; });
  // Branch-free, as the inner product is (cardinality.cc).
  constexpr uint64_t kOne = std::bit_cast<uint64_t>(1.0);
  for (size_t j = region.predicates_begin; j < region.predicates_end; ++j) {
    const Predicate& p = region_predicates_[j];
    const uint64_t inside = uint64_t{0} - static_cast<uint64_t>(IsSubset(p.relations, x));
    card *=
        std::bit_cast<double>((std::bit_cast<uint64_t>(p.selectivity) & inside) | (kOne & ~inside));
  }
  for (size_t k = region.ops_begin; k < region.ops_end; ++k) {
    const RegionOp& op = region_ops_[k];
    if ((op.right & x) == 0) continue;  // the operator gives way to its left input
    const bool reads = IsSubset(op.reads, x);
    if (IsSubset(op.right, x) && reads && (op.left & x) != 0) {
      card *= op.factor_whole;
      continue;
    }
    const double r = IsSubset(op.right, x) ? op.right_whole : EstimateRegion(op.right_region, x);
    if ((op.left & x) == 0) {
      card *= r;  // ... or to its right input
    } else if (reads) {
      card *= Factor(op.type, r, op.selectivity, op.log_miss);
    } else {
      card *= Factor(op.type, r, 1, -std::numeric_limits<double>::infinity());
    }
  }
  return card;
}

}  // namespace sliceplan
