// Relations merging into joined components, with the cardinality of each
// component: card(C) = prod rows(i) for i in C times the selectivity of
// every predicate whose relations all lie in C (docs/cost-models.md), kept
// up to date as components merge. A predicate applies once, when its last
// two components merge.
//
// Union-find (union by size, path halving); each predicate is re-checked
// only from the smaller side of a merge, so n - 1 merges cost
// O(m log n) predicate checks in all. Values saturate at kValueCeiling
// (core/model/value_range.h). Single-threaded.
#ifndef SLICEPLAN_TIERS_JOIN_FOREST_H_
#define SLICEPLAN_TIERS_JOIN_FOREST_H_

#include <cstdint>
#include <span>
#include <vector>

#include "core/model/wide_query.h"

namespace sliceplan {

class JoinForest {
 public:
  explicit JoinForest(const WideQuery& query);

  // The component holding relation r (its representative relation).
  int32_t Find(int32_t r);
  double Card(int32_t component) const { return card_[component]; }
  int32_t Members(int32_t component) const { return members_[component]; }
  // Merges two distinct components; returns the merged one's
  // representative. REQUIRES: a and b are distinct representatives.
  int32_t Merge(int32_t a, int32_t b);

 private:
  // True when every relation of predicate p lies in component c.
  bool Within(int32_t p, int32_t c);

  const WideQuery& query_;
  std::vector<int32_t> parent_;
  std::vector<int32_t> members_;
  std::vector<double> card_;
  std::vector<std::vector<int32_t>> pending_;  // predicates not yet applied, per component
  std::vector<uint8_t> applied_;
};

// True when the join graph (predicates as hyperedges) is connected.
bool IsConnected(const WideQuery& query);

}  // namespace sliceplan

#endif  // SLICEPLAN_TIERS_JOIN_FOREST_H_
