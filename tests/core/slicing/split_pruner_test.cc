// The slice's split pruning (split_pruner.h): a state is dead exactly when
// a constraint inside the set is settled against the part or the
// remainder; walked with the set ccp walk, the pruned walk drops no split
// whose two parts the slice admits, reports nothing the full walk does not,
// and does drop splits on cliques and random graphs (so the pruning is not
// idle).
#include "core/slicing/split_pruner.h"

#include <set>
#include <string>
#include <utility>

#include "core/graph/connected_sets.h"
#include "core/graph/set_ccp_walk.h"
#include "gtest/gtest.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

RelSet Bits(std::initializer_list<int> ids) {
  RelSet s = 0;
  for (int i : ids) s |= RelSet{1} << i;
  return s;
}

// One triple {0, 1, 2} oriented by bit 0: forbids sets with 0 and 1 but
// not 2.
SliceConstraints OneTriple() {
  ConstraintRelations r;
  r.ids = {RelationId{0}, RelationId{1}, RelationId{2}};
  r.size = 3;
  return SliceConstraints::FromRelations(PlanShape::kBushy, {0, 2}, {r});
}

TEST(SplitPrunerTest, DeadExactlyWhenAConstraintIsSettled) {
  const SplitPruner pruner(OneTriple(), Bits({0, 1, 2, 3}));
  ASSERT_FALSE(pruner.empty());
  // The part holds the trigger, the ceiling excludes the need.
  EXPECT_TRUE(pruner(Bits({0, 1}), Bits({2})));
  // The ceiling's excluded part holds the trigger, the part the need: the
  // remainder has 0 and 1 without 2.
  EXPECT_TRUE(pruner(Bits({2}), Bits({0, 1})));
  // Open: the need may still join the part, or the trigger is split.
  EXPECT_FALSE(pruner(Bits({0, 1}), Bits({3})));
  EXPECT_FALSE(pruner(Bits({0}), Bits({2})));
  EXPECT_FALSE(pruner(Bits({0, 2}), Bits({1})));
}

TEST(SplitPrunerTest, OnlyConstraintsInsideTheSetCount) {
  // Without relation 2 the set is inadmissible or the trigger is absent:
  // either way no split of it is pruned by this constraint.
  EXPECT_TRUE(SplitPruner(OneTriple(), Bits({0, 1, 3})).empty());
  EXPECT_TRUE(SplitPruner(OneTriple(), Bits({1, 2, 3})).empty());
}

TEST(SplitPrunerTest, PrunedWalkKeepsEveryAdmittedSplitAndDropsSome) {
  for (GraphShape graph : {GraphShape::kStar, GraphShape::kClique, GraphShape::kRandom}) {
    const int n = 10;
    const Query q = testing::MakeQuery(graph, n, 1);
    DirectMemo connected(n);
    MarkConnectedSets(q, connected);
    const SetCcpWalk walk(n, JoinGraph(q), connected);
    auto constraints = SliceConstraints::ForSlice(q, PlanShape::kBushy, {1, 4}, false);
    ASSERT_TRUE(constraints.ok());
    uint64_t full = 0, pruned = 0;
    for (RelSet set = 1; set <= FullSet(n); ++set) {
      if (Size(set) < 2 || !connected.Contains(set) || !constraints->Admissible(set)) continue;
      SCOPED_TRACE(testing::ShapeName(graph) + " set=" + std::to_string(set));
      std::set<std::pair<RelSet, RelSet>> all, kept;
      walk.ForEach(set, [&](RelSet c, RelSet rest) { return all.insert({c, rest}).second; });
      walk.ForEach(
          set,
          [&](RelSet c, RelSet rest) {
            return kept.insert({c, rest}).second;
          },
          SplitPruner(*constraints, set));
      for (const auto& pair : kept) EXPECT_TRUE(all.count(pair)) << "a split not in the set";
      for (const auto& [c, rest] : all) {
        if (constraints->Admissible(c) && constraints->Admissible(rest)) {
          EXPECT_TRUE(kept.count({c, rest})) << "an admitted split pruned: " << c;
        }
      }
      full += all.size();
      pruned += kept.size();
    }
    // A star's splits give one leaf away: each is met with nothing
    // excluded yet, so nothing is settled before it is reported.
    if (graph != GraphShape::kStar) {
      EXPECT_LT(pruned, full) << testing::ShapeName(graph) << ": nothing pruned";
    }
  }
}

}  // namespace
}  // namespace sliceplan
