#include "core/model/listed_rows.h"

#include <algorithm>
#include <cmath>

#include "absl/strings/str_cat.h"
#include "core/model/query.h"

namespace sliceplan {

absl::StatusOr<ListedRows> ListedRows::Create(int n, std::vector<ListedSet> sets) {
  ListedRows out;
  out.rows_.reserve(sets.size());
  for (size_t i = 0; i < sets.size(); ++i) {
    const ListedSet& s = sets[i];
    if (s.relations == 0) {
      return absl::InvalidArgumentError(
          absl::StrCat("cardinalities[", i, "].relations: empty; list one or more relations"));
    }
    if ((s.relations & ~FullSet(n)) != 0) {
      return absl::InvalidArgumentError(
          absl::StrCat("cardinalities[", i, "].relations: a relation outside the query"));
    }
    if (!std::isfinite(s.rows) || !(s.rows > 0)) {
      return absl::InvalidArgumentError(
          absl::StrCat("cardinalities[", i, "].rows: must be finite and > 0, got ", s.rows));
    }
    const auto [it, inserted] = out.rows_.emplace(s.relations, s.rows);
    if (!inserted && it->second != s.rows) {
      return absl::InvalidArgumentError(absl::StrCat(
          "cardinalities[", i, "]: the same relations are listed again with other rows (", s.rows,
          " against ", it->second, ")"));
    }
  }
  out.sets_.reserve(out.rows_.size());
  for (const auto& [set, rows] : out.rows_) out.sets_.push_back({set, rows});
  std::sort(out.sets_.begin(), out.sets_.end(),
            [](const ListedSet& a, const ListedSet& b) { return a.relations < b.relations; });
  return out;
}

ListedRows ListedRows::Permuted(std::span<const RelationId> perm) const {
  ListedRows out;
  out.rows_.reserve(rows_.size());
  for (const ListedSet& s : sets_) {
    const RelSet renamed = PermuteSet(s.relations, perm);
    out.rows_.emplace(renamed, s.rows);
    out.sets_.push_back({renamed, s.rows});
  }
  std::sort(out.sets_.begin(), out.sets_.end(),
            [](const ListedSet& a, const ListedSet& b) { return a.relations < b.relations; });
  return out;
}

}  // namespace sliceplan
