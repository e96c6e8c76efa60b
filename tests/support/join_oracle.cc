#include "tests/support/join_oracle.h"

#include <algorithm>
#include <deque>
#include <map>

#include "absl/strings/str_cat.h"
#include "core/model/cardinality.h"
#include "core/model/join_tree.h"
#include "gtest/gtest.h"

namespace sliceplan::testing {
namespace {

using enum JoinType;

// The transformation tables (Moerkotte, Fender and Eich, SIGMOD 2013,
// for null-rejecting predicates), written out here independently of the
// engine's copy; Evaluate checks every tree they reach.
bool Assoc(JoinType a, JoinType b) {
  static const std::set<std::pair<JoinType, JoinType>> kHolds = {
      {kInner, kInner}, {kInner, kLeft}, {kInner, kSemi}, {kInner, kAnti},
      {kLeft, kLeft},   {kFull, kLeft},  {kFull, kFull}};
  return kHolds.count({a, b}) > 0;
}
bool LeftAsscom(JoinType a, JoinType b) {
  const auto plain = [](JoinType t) { return t != kFull; };
  if (plain(a) && plain(b)) return true;
  return (a == kLeft || a == kFull) && (b == kLeft || b == kFull);
}
bool RightAsscom(JoinType a, JoinType b) {
  return (a == kInner && b == kInner) || (a == kFull && b == kFull);
}

RelSet PredicateOf(const Query& query, const OpTree& t) {
  return t.op >= 0 ? query.joins()[t.op].predicate : 0;
}
bool Inner(const OpTree& t) { return t.op < 0; }
// A non-inner predicate fits a join with inputs x and y.
bool Fits(const Query& query, const OpTree& t, RelSet x, RelSet y) {
  if (Inner(t)) return true;
  const RelSet p = PredicateOf(query, t);
  return IsSubset(p, x | y) && (p & x) != 0 && (p & y) != 0;
}

void Neighbours(const Query& query, const OpTreePtr& v, std::vector<OpTreePtr>& out) {
  if (v->relation >= 0) return;
  const OpTreePtr& l = v->left;
  const OpTreePtr& r = v->right;
  if (IsCommutative(v->type)) out.push_back(Join(v->type, v->op, r, l));
  if (l->relation < 0) {
    const OpTreePtr &x = l->left, &y = l->right, &z = r;
    if (Assoc(l->type, v->type) && Fits(query, *v, y->set, z->set)) {
      out.push_back(Join(l->type, l->op, x, Join(v->type, v->op, y, z)));
    }
    if (LeftAsscom(l->type, v->type) && Fits(query, *v, x->set, z->set)) {
      out.push_back(Join(l->type, l->op, Join(v->type, v->op, x, z), y));
    }
  }
  if (r->relation < 0) {
    const OpTreePtr &x = l, &y = r->left, &z = r->right;
    if (Assoc(v->type, r->type) && Fits(query, *v, x->set, y->set)) {
      out.push_back(Join(r->type, r->op, Join(v->type, v->op, x, y), z));
    }
    if (RightAsscom(v->type, r->type) && Fits(query, *v, x->set, z->set)) {
      out.push_back(Join(r->type, r->op, y, Join(v->type, v->op, x, z)));
    }
  }
  std::vector<OpTreePtr> sub;
  Neighbours(query, l, sub);
  for (const OpTreePtr& t : sub) out.push_back(Join(v->type, v->op, t, r));
  sub.clear();
  Neighbours(query, r, sub);
  for (const OpTreePtr& t : sub) out.push_back(Join(v->type, v->op, l, t));
}

// The relations whose columns a subtree keeps (semi and anti joins drop
// their right side).
RelSet Kept(const OpTree& t) {
  if (t.relation >= 0) return t.set;
  if (t.type == kSemi || t.type == kAnti) return Kept(*t.left);
  return Kept(*t.left) | Kept(*t.right);
}

struct Tables {
  // [relation][row][predicate]: a join column value, -1 for NULL
  std::vector<std::vector<std::vector<int>>> cells;
};

Tables MakeTables(const Query& query, uint64_t seed) {
  std::mt19937_64 rng(seed);
  const size_t preds = query.predicates().size() + query.joins().size();
  Tables t;
  t.cells.resize(query.size());
  for (auto& rel : t.cells) {
    const int rows = 1 + static_cast<int>(rng() % 4);
    rel.assign(rows, std::vector<int>(preds));
    for (auto& row : rel) {
      for (int& cell : row) cell = static_cast<int>(rng() % 4) - 1;  // -1 is NULL
    }
  }
  return t;
}

using Row = std::vector<int>;  // per relation: row index, -1 padded NULL, -2 absent

bool Holds(const Tables& t, RelSet rels, size_t pred, const Row& row) {
  int value = -2;
  for (RelSet s = rels; s != 0; s &= s - 1) {
    const int v = std::countr_zero(s);
    if (row[v] < 0) return false;
    const int cell = t.cells[v][row[v]][pred];
    if (cell < 0 || (value != -2 && cell != value)) return false;
    value = cell;
  }
  return true;
}

std::vector<Row> Eval(const Query& query, const Tables& t, const OpTree& tree) {
  const int n = query.size();
  if (tree.relation >= 0) {
    std::vector<Row> out;
    for (size_t i = 0; i < t.cells[tree.relation].size(); ++i) {
      Row row(n, -2);
      row[tree.relation] = static_cast<int>(i);
      out.push_back(row);
    }
    return out;
  }
  const std::vector<Row> left = Eval(query, t, *tree.left);
  const std::vector<Row> right = Eval(query, t, *tree.right);
  // The predicates applied here, by index into the table columns.
  std::vector<std::pair<RelSet, size_t>> preds;
  for (size_t j = 0; j < query.predicates().size(); ++j) {
    const RelSet p = query.predicates()[j].relations;
    if (!IsSubset(p, tree.set) || IsSubset(p, tree.left->set) || IsSubset(p, tree.right->set)) {
      continue;
    }
    if (!Inner(tree)) {
      ADD_FAILURE() << "inner predicate " << j << " lands on a " << JoinTypeName(tree.type)
                    << " join in " << Text(tree);
    }
    preds.emplace_back(p, j);
  }
  if (!Inner(tree)) {
    preds.emplace_back(query.joins()[tree.op].predicate, query.predicates().size() + tree.op);
  }
  const auto merge = [](const Row& a, const Row& b) {
    Row m = a;
    for (size_t i = 0; i < m.size(); ++i) {
      if (b[i] != -2) m[i] = b[i];
    }
    return m;
  };
  const auto match = [&](const Row& m) {
    for (const auto& [p, j] : preds) {
      if (!Holds(t, p, j, m)) return false;
    }
    return true;
  };
  const auto padded = [&](const Row& row, RelSet kept) {
    Row m = row;
    ForEachMember(kept, [&](RelationId r) { m[r.value] = -1; });
    return m;
  };
  std::vector<Row> out;
  std::vector<bool> right_matched(right.size(), false);
  for (const Row& l : left) {
    bool matched = false;
    for (size_t i = 0; i < right.size(); ++i) {
      const Row m = merge(l, right[i]);
      if (!match(m)) continue;
      matched = true;
      right_matched[i] = true;
      if (tree.type == kInner || tree.type == kLeft || tree.type == kFull) out.push_back(m);
    }
    if (tree.type == kSemi && matched) out.push_back(l);
    if (tree.type == kAnti && !matched) out.push_back(l);
    if ((tree.type == kLeft || tree.type == kFull) && !matched) {
      out.push_back(padded(l, Kept(*tree.right)));
    }
  }
  if (tree.type == kFull) {
    for (size_t i = 0; i < right.size(); ++i) {
      if (!right_matched[i]) out.push_back(padded(right[i], Kept(*tree.left)));
    }
  }
  return out;
}

// A random original tree over `rels`; appends inner predicates and
// non-inner operators.
struct Generator {
  std::mt19937_64& rng;
  std::vector<Predicate> preds;
  std::vector<JoinOp> ops;

  // What a predicate above may read: for an inner one (`inner`), nothing
  // of a null-supplying or dropped side; for an operator's, nothing
  // dropped.
  static RelSet Visible(const OpTree& t, bool inner) {
    if (t.relation >= 0) return t.set;
    const RelSet l = Visible(*t.left, inner), r = Visible(*t.right, inner);
    switch (t.type) {
      case kInner:
        return l | r;
      case kLeft:
        return inner ? l : l | r;
      case kFull:
        return inner ? 0 : l | r;
      case kSemi:
      case kAnti:
        return l;
    }
    return 0;
  }

  int PickFrom(RelSet s) {
    int k = static_cast<int>(rng() % Size(s));
    for (; k > 0; --k) s &= s - 1;
    return std::countr_zero(s);
  }

  OpTreePtr Gen(std::vector<int> rels) {
    if (rels.size() == 1) return Leaf(rels[0]);
    const size_t cut = 1 + rng() % (rels.size() - 1);
    OpTreePtr l = Gen({rels.begin(), rels.begin() + static_cast<std::ptrdiff_t>(cut)});
    OpTreePtr r = Gen({rels.begin() + static_cast<std::ptrdiff_t>(cut), rels.end()});
    static constexpr JoinType kTypes[] = {kInner, kInner, kLeft, kLeft, kFull, kSemi, kAnti};
    const JoinType type = kTypes[rng() % 7];
    std::uniform_real_distribution<double> sel(0.01, 0.9);
    if (type == kInner) {
      const RelSet a = Visible(*l, true), b = Visible(*r, true);
      if (a != 0 && b != 0) {
        preds.push_back({(RelSet{1} << PickFrom(a)) | (RelSet{1} << PickFrom(b)), sel(rng)});
      }
      return Join(kInner, -1, l, r);
    }
    const RelSet a = Visible(*l, false), b = Visible(*r, false);
    const RelSet p = (RelSet{1} << PickFrom(a)) | (RelSet{1} << PickFrom(b));
    ops.push_back({type, l->set, r->set, p, sel(rng)});
    return Join(type, static_cast<int>(ops.size()) - 1, l, r);
  }
};

}  // namespace

OpTreePtr Leaf(int relation) {
  auto t = std::make_shared<OpTree>();
  t->relation = relation;
  t->set = RelSet{1} << relation;
  return t;
}

OpTreePtr Join(JoinType type, int op, OpTreePtr left, OpTreePtr right) {
  auto t = std::make_shared<OpTree>();
  t->type = type;
  t->op = op;
  t->set = left->set | right->set;
  t->left = std::move(left);
  t->right = std::move(right);
  return t;
}

std::string Text(const OpTree& t) {
  if (t.relation >= 0) return absl::StrCat("r", t.relation);
  if (t.op < 0) return absl::StrCat("(", Text(*t.left), " ", Text(*t.right), ")");
  return absl::StrCat("(", Text(*t.left), " ", JoinTypeKeyword(t.type), "#", t.op, " ",
                      Text(*t.right), ")");
}

JoinCase RandomJoinQuery(int n, std::mt19937_64& rng) {
  std::vector<int> order(n);
  for (int i = 0; i < n; ++i) order[i] = i;
  std::shuffle(order.begin(), order.end(), rng);
  Generator gen{rng, {}, {}};
  OpTreePtr original = gen.Gen(order);
  std::vector<Relation> rels;
  for (int i = 0; i < n; ++i) {
    rels.push_back({absl::StrCat("r", i), static_cast<double>(2 + rng() % 1000), 100});
  }
  auto query = Query::Create(rels, gen.preds);
  EXPECT_TRUE(query.ok()) << query.status();
  auto with = query->WithJoins(gen.ops);
  EXPECT_TRUE(with.ok()) << with.status() << " for " << Text(*original);
  return {with.ok() ? *with : *query, original};
}

std::vector<OpTreePtr> ClosureTrees(const Query& query, const OpTreePtr& original,
                                    bool cross_products) {
  std::map<std::string, OpTreePtr> seen{{Text(*original), original}};
  std::deque<OpTreePtr> todo{original};
  while (!todo.empty()) {
    const OpTreePtr t = todo.front();
    todo.pop_front();
    std::vector<OpTreePtr> next;
    Neighbours(query, t, next);
    for (OpTreePtr& u : next) {
      if (seen.emplace(Text(*u), u).second) todo.push_back(std::move(u));
    }
  }
  std::vector<OpTreePtr> out;
  for (auto& [text, t] : seen) {
    if (cross_products || !HasCrossProduct(query, *t)) out.push_back(t);
  }
  return out;
}

std::set<std::string> Closure(const Query& query, const OpTreePtr& original, bool cross_products) {
  std::set<std::string> out;
  for (const OpTreePtr& t : ClosureTrees(query, original, cross_products)) out.insert(Text(*t));
  return out;
}

bool HasCrossProduct(const Query& query, const OpTree& t) {
  if (t.relation >= 0) return false;
  if (Inner(t)) {
    bool joined = false;
    for (const Predicate& p : query.predicates()) {
      joined = joined || (IsSubset(p.relations, t.set) && (p.relations & t.left->set) != 0 &&
                          (p.relations & t.right->set) != 0);
    }
    if (!joined) return true;
  }
  return HasCrossProduct(query, *t.left) || HasCrossProduct(query, *t.right);
}

OpTreePtr OriginalTree(const Query& query) {
  const JoinTree tree(query);
  std::vector<OpTreePtr> built;
  for (const JoinTreeNode& node : tree.nodes()) {
    built.push_back(node.leaf() ? Leaf(std::countr_zero(node.set))
                                : Join(node.type, node.op, built[node.left], built[node.right]));
  }
  return built.back();
}

OpTreePtr FromPlan(const Query& query, const Plan& plan) {
  std::vector<OpTreePtr> built;
  for (const PlanNode& node : plan.nodes) {
    if (node.is_leaf()) {
      built.push_back(Leaf(std::countr_zero(node.relations)));
      continue;
    }
    const OpTreePtr& l = built[node.left];
    const OpTreePtr& r = built[node.right];
    int op = -1;
    for (size_t k = 0; k < query.joins().size(); ++k) {
      const RelSet p = query.joins()[k].predicate;
      if (query.joins()[k].type == node.type && IsSubset(p, node.relations) && (p & l->set) != 0 &&
          (p & r->set) != 0) {
        op = static_cast<int>(k);
      }
    }
    built.push_back(Join(node.type, op, l, r));
  }
  return built.back();
}

std::vector<std::vector<int>> Evaluate(const Query& query, const OpTree& tree, uint64_t seed) {
  const Tables tables = MakeTables(query, seed);
  std::vector<Row> rows = Eval(query, tables, tree);
  std::sort(rows.begin(), rows.end());
  return rows;
}

double TreeCout(const Query& query, const OpTree& tree) {
  if (tree.relation >= 0) return 0;
  const Cardinality card(query);
  double sum = 0;
  const auto walk = [&](const auto& self, const OpTree& t) -> void {
    if (t.relation >= 0) return;
    sum += card.Of(t.set);
    self(self, *t.left);
    self(self, *t.right);
  };
  walk(walk, tree);
  return sum;
}

}  // namespace sliceplan::testing
