#include "core/cardinality.h"

namespace sliceplan {

Cardinality::Cardinality(const Query& query)
    : predicates_(query.predicates().begin(), query.predicates().end()) {
  for (const Relation& rel : query.relations()) rows_.push_back(rel.rows);
}

double Cardinality::Of(RelSet x) const {
  double card = 1;
  ForEachMember(x, [&](RelationId r) { card *= rows_[r.value]; });
  for (const Predicate& p : predicates_) {
    if (IsSubset(p.relations, x)) card *= p.selectivity;
  }
  return card;
}

bool Cardinality::Connects(RelSet left, RelSet right) const {
  const RelSet both = left | right;
  for (const Predicate& p : predicates_) {
    if (IsSubset(p.relations, both) && (p.relations & left) != 0 &&
        (p.relations & right) != 0) {
      return true;
    }
  }
  return false;
}

}  // namespace sliceplan
