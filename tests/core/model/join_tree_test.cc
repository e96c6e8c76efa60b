// The non-inner cardinality rule (docs/cost-models.md, "Non-inner joins")
// on small trees worked by hand, and on random trees against the rule
// written out again over the test's own tree type.
#include "core/model/join_tree.h"

#include <cmath>
#include <random>

#include "core/model/cardinality.h"
#include "gtest/gtest.h"
#include "tests/support/join_oracle.h"

namespace sliceplan {
namespace {

constexpr RelSet kA = 1, kB = 2, kC = 4;

// a (100) and b (50) inner-joined (0.01), then `type` joined with c (20)
// on b = c (0.1).
Query Tree(JoinType type) {
  auto q = Query::Create({{"a", 100}, {"b", 50}, {"c", 20}}, {{kA | kB, 0.01}});
  EXPECT_TRUE(q.ok());
  auto with = q->WithJoins({{type, kA | kB, kC, kB | kC, 0.1}});
  EXPECT_TRUE(with.ok()) << with.status();
  return *with;
}

TEST(JoinTreeTest, EachTypeByItsFormula) {
  const double l = 100 * 50 * 0.01;      // the inner block a, b: 50
  const double q_r = std::pow(0.9, 20);  // a left row finds none of 20 c rows
  const double q_l = std::pow(0.9, l);   // a c row finds none of 50 rows
  const double inner = l * 20 * 0.1;     // 100
  EXPECT_NEAR(Cardinality(Tree(JoinType::kLeft)).Of(kA | kB | kC), inner + l * q_r, 1e-9);
  EXPECT_NEAR(Cardinality(Tree(JoinType::kSemi)).Of(kA | kB | kC), l * (1 - q_r), 1e-9);
  EXPECT_NEAR(Cardinality(Tree(JoinType::kAnti)).Of(kA | kB | kC), l * q_r, 1e-9);
  EXPECT_NEAR(Cardinality(Tree(JoinType::kFull)).Of(kA | kB | kC), inner + l * q_r + 20 * q_l,
              1e-9);
  // 50 * 0.9^20 = 6.0788327...: worked by hand.
  EXPECT_NEAR(Cardinality(Tree(JoinType::kAnti)).Of(kA | kB | kC), 6.0788327, 1e-6);
}

TEST(JoinTreeTest, LeftIsInnerPlusAntiAndSemiPlusAntiIsTheLeftInput) {
  const RelSet all = kA | kB | kC;
  const double left = Cardinality(Tree(JoinType::kLeft)).Of(all);
  const double semi = Cardinality(Tree(JoinType::kSemi)).Of(all);
  const double anti = Cardinality(Tree(JoinType::kAnti)).Of(all);
  EXPECT_NEAR(semi + anti, 50, 1e-9);
  EXPECT_NEAR(left, 100 + anti, 1e-9);
}

TEST(JoinTreeTest, RestrictsTheTreeToTheSet) {
  const Cardinality card(Tree(JoinType::kLeft));
  // b left-joined with c alone: a's side lost a, the block is b.
  EXPECT_NEAR(card.Of(kB | kC), 50 * 20 * 0.1 + 50 * std::pow(0.9, 20), 1e-9);
  // The operator lost its right side: the inner block a, b.
  EXPECT_DOUBLE_EQ(card.Of(kA | kB), 50);
  EXPECT_DOUBLE_EQ(card.Of(kC), 20);
  // The predicate b = c is not inside {a, c}: selectivity 1, every row
  // pair matches, none is padded.
  EXPECT_DOUBLE_EQ(card.Of(kA | kC), 100 * 20);
}

TEST(JoinTreeTest, TheTreeHoldsTheOperatorsAndBlocks) {
  const JoinTree tree(Tree(JoinType::kSemi));
  const JoinTreeNode& root = tree.root();
  EXPECT_EQ(root.type, JoinType::kSemi);
  EXPECT_EQ(root.op, 0);
  EXPECT_EQ(tree.nodes()[root.left].set, kA | kB);
  EXPECT_EQ(tree.nodes()[root.left].reads, kA | kB);  // the inner predicate
  EXPECT_EQ(tree.nodes()[root.right].set, kC);
  EXPECT_EQ(tree.owner(0), root.left);
}

// The rule of docs/cost-models.md over the generator's own tree: cut the
// tree down to x, estimate bottom-up, q(N) = (1 - s)^N by pow.
double RuleEstimate(const Query& query, const testing::OpTree& t, RelSet x) {
  if (t.relation >= 0) return query.relations()[t.relation].rows;
  const bool l = (t.left->set & x) != 0, r = (t.right->set & x) != 0;
  if (!(l && r)) return RuleEstimate(query, l ? *t.left : *t.right, x);
  const double left = RuleEstimate(query, *t.left, x);
  const double right = RuleEstimate(query, *t.right, x);
  double s = 1;
  if (t.op >= 0) {
    const JoinOp& op = query.joins()[t.op];
    if (IsSubset(op.predicate, x)) s = op.selectivity;
  } else {
    for (const Predicate& p : query.predicates()) {
      if (IsSubset(p.relations, x) && IsSubset(p.relations, t.set) &&
          !IsSubset(p.relations, t.left->set) && !IsSubset(p.relations, t.right->set)) {
        s *= p.selectivity;
      }
    }
  }
  const double q_r = std::pow(1 - s, right), q_l = std::pow(1 - s, left);
  switch (t.type) {
    case JoinType::kInner:
      return left * right * s;
    case JoinType::kSemi:
      return left * (1 - q_r);
    case JoinType::kAnti:
      return left * q_r;
    case JoinType::kLeft:
      return left * right * s + left * q_r;
    case JoinType::kFull:
      return left * right * s + left * q_r + right * q_l;
  }
  return 0;
}

TEST(JoinTreeTest, EverySubsetOfRandomTreesFollowsTheRule) {
  std::mt19937_64 rng(20261205);
  int product_form = 0, recursion = 0;
  for (int round = 0; round < 300; ++round) {
    const int n = 3 + round % 6;
    const testing::JoinCase c = testing::RandomJoinQuery(n, rng);
    if (!c.query.has_joins()) continue;
    const JoinTree tree(c.query);
    ++(tree.product_form() ? product_form : recursion);
    for (RelSet x = 1; x <= c.query.all(); ++x) {
      const double want = RuleEstimate(c.query, *c.original, x);
      ASSERT_NEAR(tree.Estimate(x), want, 1e-9 * want + 1e-300)
          << testing::Text(*c.original) << " x=" << x;
    }
  }
  // Both evaluations were exercised.
  EXPECT_GT(product_form, 50);
  EXPECT_GT(recursion, 50);
}

}  // namespace
}  // namespace sliceplan
