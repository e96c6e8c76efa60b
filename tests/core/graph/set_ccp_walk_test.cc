// The pull-order pair enumerator (set_ccp_walk.h): for every
// connected set of every binary graph shape, exactly the splits into two
// connected parts (the lowest relation's part first), each once, against
// brute force over all splits; and the closed forms of the full set's
// splits on chains, cycles, stars and cliques.
#include "core/graph/set_ccp_walk.h"

#include <set>
#include <string>
#include <utility>
#include <vector>

#include "core/graph/connected_sets.h"
#include "gtest/gtest.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

DirectMemo Connected(const Query& q) {
  DirectMemo memo(q.size());
  MarkConnectedSets(q, memo);
  return memo;
}

using Pairs = std::vector<std::pair<RelSet, RelSet>>;

Pairs Walked(const SetCcpWalk& walk, RelSet set) {
  Pairs out;
  EXPECT_TRUE(walk.ForEach(set, [&](RelSet c, RelSet rest) {
    out.push_back({c, rest});
    return true;
  }));
  return out;
}

// Every split of `set` with the lowest relation on the left whose two parts
// are connected, in no particular order.
std::set<std::pair<RelSet, RelSet>> BruteForce(const DirectMemo& connected, RelSet set) {
  std::set<std::pair<RelSet, RelSet>> out;
  const RelSet lowest = LowestBit(set), rest = set ^ lowest;
  for (RelSet sub = 0; sub != rest; sub = (sub - rest) & rest) {
    const RelSet left = sub | lowest, right = set ^ left;
    if (connected.Contains(left) && connected.Contains(right)) out.insert({left, right});
  }
  return out;
}

TEST(SetCcpWalkTest, EveryConnectedSplitOnceForEveryShape) {
  for (GraphShape graph : {GraphShape::kChain, GraphShape::kCycle, GraphShape::kStar,
                           GraphShape::kClique, GraphShape::kRandom}) {
    for (int n : {2, 5, 8, 11}) {
      for (uint64_t seed : {1, 2, 3}) {
        const Query q = testing::MakeQuery(graph, n, seed);
        const DirectMemo connected = Connected(q);
        const SetCcpWalk walk(n, JoinGraph(q), connected);
        uint64_t total = 0;
        for (RelSet set = 1; set <= FullSet(n); ++set) {
          if (Size(set) < 2 || !connected.Contains(set)) continue;
          SCOPED_TRACE(testing::ShapeName(graph) + " n=" + std::to_string(n) +
                       " seed=" + std::to_string(seed) + " set=" + std::to_string(set));
          const Pairs got = Walked(walk, set);
          const std::set<std::pair<RelSet, RelSet>> unique(got.begin(), got.end());
          EXPECT_EQ(unique.size(), got.size()) << "a split reported twice";
          EXPECT_EQ(unique, BruteForce(connected, set));
          total += got.size();
        }
        EXPECT_GT(total, 0u);
      }
    }
  }
}

TEST(SetCcpWalkTest, FullSetSplitsMatchClosedForms) {
  // The whole graph's splits into two connected parts: a chain of n cuts
  // one of its n - 1 edges; a cycle cuts two of its n; a star gives one
  // leaf away; a clique splits every way, 2^(n-1) - 1.
  for (int n : {3, 6, 12, 16}) {
    const auto count = [&](GraphShape shape) {
      const Query q = testing::MakeQuery(shape, n, 1);
      const DirectMemo connected = Connected(q);
      return Walked(SetCcpWalk(n, JoinGraph(q), connected), FullSet(n)).size();
    };
    SCOPED_TRACE("n=" + std::to_string(n));
    EXPECT_EQ(count(GraphShape::kChain), static_cast<size_t>(n - 1));
    EXPECT_EQ(count(GraphShape::kCycle), static_cast<size_t>(n * (n - 1) / 2));
    EXPECT_EQ(count(GraphShape::kStar), static_cast<size_t>(n - 1));
    EXPECT_EQ(count(GraphShape::kClique), (size_t{1} << (n - 1)) - 1);
  }
}

TEST(SetCcpWalkTest, StopsWhenAsked) {
  const Query q = testing::MakeQuery(GraphShape::kClique, 10, 1);
  const DirectMemo connected = Connected(q);
  const SetCcpWalk walk(10, JoinGraph(q), connected);
  int seen = 0;
  EXPECT_FALSE(walk.ForEach(FullSet(10), [&](RelSet, RelSet) { return ++seen < 7; }));
  EXPECT_EQ(seen, 7);
}

}  // namespace
}  // namespace sliceplan
