// The engine's own row estimates for relation sets (the query's
// `cardinalities`): the rows of joining exactly a set of relations, every
// predicate among them applied. A listed set's rows replace the model's
// estimate for that set; sets not listed follow the rule of
// docs/cost-models.md, "Engine estimates" (cardinality.h applies it).
//
// Immutable once built; shared by the query's copies (Query and WideQuery
// hold it by shared pointer); thread-safe.
#ifndef SLICEPLAN_CORE_MODEL_LISTED_ROWS_H_
#define SLICEPLAN_CORE_MODEL_LISTED_ROWS_H_

#include <optional>
#include <span>
#include <vector>

#include "absl/container/flat_hash_map.h"
#include "absl/status/statusor.h"
#include "core/model/relation_set.h"

namespace sliceplan {

struct ListedSet {
  RelSet relations = 0;  // non-empty
  double rows = 0;       // finite, > 0
};

class ListedRows {
 public:
  // Validates and indexes. INVALID_ARGUMENT naming cardinalities[i]: an
  // empty set, a set outside the n relations, rows not finite or not > 0,
  // a set listed twice with different rows (twice with the same rows is
  // kept once).
  static absl::StatusOr<ListedRows> Create(int n, std::vector<ListedSet> sets);

  // The listed rows of exactly `s`, if listed. O(1).
  std::optional<double> Find(RelSet s) const {
    const auto it = rows_.find(s);
    if (it == rows_.end()) return std::nullopt;
    return it->second;
  }
  size_t size() const { return sets_.size(); }
  bool empty() const { return sets_.empty(); }
  // The sets, ordered by mask.
  std::span<const ListedSet> sets() const { return sets_; }
  // The same sets with relation i renamed perm[i].
  ListedRows Permuted(std::span<const RelationId> perm) const;

 private:
  std::vector<ListedSet> sets_;
  absl::flat_hash_map<RelSet, double> rows_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MODEL_LISTED_ROWS_H_
