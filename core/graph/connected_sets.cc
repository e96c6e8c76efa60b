#include "core/graph/connected_sets.h"

#include "core/graph/join_graph.h"

namespace sliceplan {
namespace {

// DPccp's EnumerateCsg, handing each set to `emit` (which returns false to
// stop the walk).
template <class Emit>
class CsgEnumerator {
 public:
  CsgEnumerator(const Query& query, Emit emit) : graph_(query), emit_(emit) {}

  void Run(int n) {
    for (int v = n - 1; v >= 0 && !stopped_; --v) {
      const RelSet start = RelSet{1} << v;
      if (!Emit1(start)) return;
      Grow(start, FullSet(v + 1));
    }
  }

 private:
  bool Emit1(RelSet s) {
    stopped_ = stopped_ || !emit_(s);
    return !stopped_;
  }

  void Grow(RelSet s, RelSet x) {
    const RelSet nb = graph_.Around(s) & ~x;
    if (nb == 0) return;
    for (RelSet sub = nb & (0 - nb); Emit1(s | sub); sub = (sub - nb) & nb) {
      if (sub == nb) break;
    }
    // A child s | sub can grow only through a member of sub with a
    // neighbour outside s, x and nb (the rest of Around(s | sub) is in
    // them): the subsets holding none of those are not entered, where
    // each would cost an Around (a star's hub has 2^(n-1) such subsets).
    const RelSet seen = s | x | nb;
    RelSet growers = 0;
    for (RelSet m = nb; m != 0; m &= m - 1) {
      if ((graph_.Around(LowestBit(m)) & ~seen) != 0) growers |= LowestBit(m);
    }
    if (growers == 0) return;
    for (RelSet sub = nb & (0 - nb); !stopped_; sub = (sub - nb) & nb) {
      if ((sub & growers) != 0) Grow(s | sub, x | nb);
      if (sub == nb) break;
    }
  }

  JoinGraph graph_;
  Emit emit_;
  bool stopped_ = false;
};

template <class Emit>
void EnumerateConnectedSets(const Query& query, Emit emit) {
  CsgEnumerator<Emit>(query, emit).Run(query.size());
}

}  // namespace

std::vector<RelSet> ConnectedSets(const Query& query, uint64_t cap) {
  std::vector<RelSet> out;
  if (cap == 0) return out;
  EnumerateConnectedSets(query, [&](RelSet s) {
    out.push_back(s);
    return out.size() < cap;
  });
  return out;
}

uint64_t CountConnectedSets(const Query& query, uint64_t cap) {
  uint64_t count = 0;
  if (cap == 0) return count;
  EnumerateConnectedSets(query, [&](RelSet) { return ++count < cap; });
  return count;
}

void MarkConnectedSets(const Query& query, DirectMemo& memo) {
  bool added = false;
  EnumerateConnectedSets(query, [&](RelSet s) {
    memo.Insert(s, added);
    return true;
  });
}

uint64_t CountListedConnected(const Query& query) {
  if (query.listed() == nullptr) return 0;
  const JoinGraph graph(query);
  uint64_t count = 0;
  for (const ListedSet& set : query.listed()->sets()) {
    RelSet reached = LowestBit(set.relations);
    for (RelSet grown = reached; grown != 0;) {
      grown = graph.Around(reached) & set.relations & ~reached;
      reached |= grown;
    }
    count += reached == set.relations ? 1 : 0;
  }
  return count;
}

}  // namespace sliceplan
