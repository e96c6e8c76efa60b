#include "core/graph/join_graph.h"

namespace sliceplan {

JoinGraph::JoinGraph(const Query& query) : simple_(query.size(), 0), touching_(query.size(), 0) {
  for (const Predicate& p : query.predicates()) {
    const bool binary = Size(p.relations) == 2;
    if (!binary) hyper_.push_back(p.relations);
    ForEachMember(p.relations, [&](RelationId r) {
      const RelSet others = p.relations & ~Singleton(r);
      touching_[r.value] |= others;
      if (binary) simple_[r.value] |= others;
    });
  }
}

RelSet JoinGraph::HyperNeighbourhood(RelSet s, RelSet x) const {
  RelSet out = 0;
  for (RelSet p : hyper_) {
    const RelSet outside = p & ~s;
    if ((p & s) != 0 && outside != 0 && (outside & x) == 0) {
      out |= LowestBit(outside);
    }
  }
  return out;
}

RelSet JoinGraph::Around(RelSet s) const {
  RelSet out = 0;
  ForEachMember(s, [&](RelationId r) { out |= touching_[r.value]; });
  return out & ~s;
}

}  // namespace sliceplan
