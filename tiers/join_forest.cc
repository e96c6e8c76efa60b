#include "tiers/join_forest.h"

#include <utility>

#include "core/model/value_range.h"

namespace sliceplan {

JoinForest::JoinForest(const WideQuery& query)
    : query_(query),
      parent_(query.size()),
      members_(query.size(), 1),
      card_(query.size()),
      pending_(query.size()),
      applied_(query.predicates().size(), 0) {
  for (int32_t r = 0; r < query.size(); ++r) {
    parent_[r] = r;
    card_[r] = query.relation(r).rows;
    const auto incident = query.incident(r);
    pending_[r].assign(incident.begin(), incident.end());
  }
}

int32_t JoinForest::Find(int32_t r) {
  while (parent_[r] != r) {
    parent_[r] = parent_[parent_[r]];
    r = parent_[r];
  }
  return r;
}

bool JoinForest::Within(int32_t p, int32_t c) {
  for (const int32_t r : query_.predicates()[p].relations) {
    if (Find(r) != c) return false;
  }
  return true;
}

int32_t JoinForest::Merge(int32_t a, int32_t b) {
  if (members_[a] < members_[b]) std::swap(a, b);  // a: the larger
  parent_[b] = a;
  members_[a] += members_[b];
  double card = card_[a] * card_[b];
  // A predicate completing now names relations of both sides, so it is
  // pending on the smaller side too.
  std::vector<int32_t>& into = pending_[a];
  for (const int32_t p : pending_[b]) {
    if (applied_[p]) continue;
    if (Within(p, a)) {
      applied_[p] = 1;
      card *= query_.predicates()[p].selectivity;
    } else {
      into.push_back(p);
    }
  }
  std::vector<int32_t>().swap(pending_[b]);
  card_[a] = Saturate(card);
  return a;
}

bool IsConnected(const WideQuery& query) {
  JoinForest forest(query);
  int components = query.size();
  for (const WidePredicate& p : query.predicates()) {
    for (size_t i = 1; i < p.relations.size(); ++i) {
      const int32_t a = forest.Find(p.relations[0]), b = forest.Find(p.relations[i]);
      if (a != b) {
        forest.Merge(a, b);
        --components;
      }
    }
  }
  return components == 1;
}

}  // namespace sliceplan
