#include "core/model/query.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "absl/container/flat_hash_map.h"
#include "absl/container/flat_hash_set.h"
#include "absl/strings/str_cat.h"
#include "core/model/input_limits.h"
#include "core/model/status_macros.h"
#include "core/model/user_text.h"

namespace sliceplan {
namespace {

absl::Status Invalid(absl::string_view where, absl::string_view what) {
  return absl::InvalidArgumentError(absl::StrCat(where, ": ", what));
}

bool PositiveFinite(double x) { return std::isfinite(x) && x > 0; }

absl::Status CheckRelation(const Relation& rel, size_t i,
                           absl::flat_hash_set<std::string_view>& seen) {
  const std::string at = absl::StrCat("relations[", i, "]");
  if (rel.name.size() > kMaxNameBytes) {
    return Invalid(absl::StrCat(at, ".name"),
                   absl::StrCat(rel.name.size(), " bytes; a name has at most ", kMaxNameBytes));
  }
  if (!IsValidRelationName(rel.name)) {
    return Invalid(absl::StrCat(at, ".name"), absl::StrCat("\"", ShortName(rel.name),
                                                           "\" is not a name of the form "
                                                           "[A-Za-z_][A-Za-z0-9_]*"));
  }
  if (!seen.insert(rel.name).second) {
    return Invalid(absl::StrCat(at, ".name"),
                   absl::StrCat("duplicate relation name \"", ShortName(rel.name), "\""));
  }
  const std::string named = absl::StrCat(at, " (", ShortName(rel.name), ")");
  if (!PositiveFinite(rel.rows)) {
    return Invalid(absl::StrCat(named, ".rows"),
                   absl::StrCat("must be a finite number > 0, got ", rel.rows));
  }
  if (!PositiveFinite(rel.row_bytes) || rel.row_bytes > kMaxRowBytes) {
    return Invalid(
        absl::StrCat(named, ".row_bytes"),
        absl::StrCat("must be a number in (0, ", kMaxRowBytes, "], got ", rel.row_bytes));
  }
  return absl::OkStatus();
}

absl::Status CheckPredicate(const Predicate& p, size_t j, int n) {
  const std::string at = absl::StrCat("predicates[", j, "]");
  if (!IsSubset(p.relations, FullSet(n))) {
    return Invalid(absl::StrCat(at, ".relations"), "names a relation id outside the query");
  }
  if (Size(p.relations) < 2) {
    return Invalid(absl::StrCat(at, ".relations"), "must name two or more distinct relations");
  }
  return ValidateSelectivity(p.selectivity, j);
}

// Predicates over one relation set become one whose selectivity is the
// product (each applies once the set is joined, so card is unchanged).
// The product is kept above zero: selectivities are in (0, 1].
std::vector<Predicate> MergeEqualPredicates(std::vector<Predicate> predicates) {
  absl::flat_hash_map<RelSet, size_t> index;
  std::vector<Predicate> out;
  for (const Predicate& p : predicates) {
    const auto [it, inserted] = index.emplace(p.relations, out.size());
    if (inserted) {
      out.push_back(p);
      continue;
    }
    double& sel = out[it->second].selectivity;
    sel = std::max(sel * p.selectivity, std::numeric_limits<double>::min());
  }
  return out;
}

}  // namespace

absl::Status ValidateRelations(std::span<const Relation> relations) {
  absl::flat_hash_set<std::string_view> seen;
  for (size_t i = 0; i < relations.size(); ++i) {
    RETURN_IF_ERROR(CheckRelation(relations[i], i, seen));
  }
  return absl::OkStatus();
}

absl::Status ValidateSelectivity(double selectivity, size_t j) {
  if (!(selectivity > 0 && selectivity <= 1)) {
    return Invalid(absl::StrCat("predicates[", j, "].selectivity"),
                   absl::StrCat("must lie in (0, 1], got ", selectivity));
  }
  return absl::OkStatus();
}

bool IsValidRelationName(std::string_view name) {
  if (name.empty()) return false;
  const auto alpha = [](char c) {
    return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || c == '_';
  };
  if (!alpha(name[0])) return false;
  for (char c : name) {
    if (!alpha(c) && !(c >= '0' && c <= '9')) return false;
  }
  return true;
}

absl::StatusOr<Query> Query::Create(std::vector<Relation> relations,
                                    std::vector<Predicate> predicates) {
  if (relations.empty()) {
    return Invalid("relations", "the query has no relations");
  }
  if (relations.size() > static_cast<size_t>(kMaxRelations)) {
    return Invalid("relations",
                   absl::StrCat(relations.size(),
                                " relations given; the exact search takes at "
                                "most ",
                                kMaxRelations, " (the greedy, linear and idp tiers take more)"));
  }
  RETURN_IF_ERROR(ValidateRelations(relations));
  const int n = static_cast<int>(relations.size());
  for (size_t j = 0; j < predicates.size(); ++j) {
    RETURN_IF_ERROR(CheckPredicate(predicates[j], j, n));
  }
  return Query(std::move(relations), MergeEqualPredicates(std::move(predicates)));
}

RelSet PermuteSet(RelSet s, std::span<const RelationId> perm) {
  RelSet out = 0;
  ForEachMember(s, [&](RelationId r) { out |= Singleton(perm[r.value]); });
  return out;
}

Query Query::Permuted(std::span<const RelationId> perm) const {
  std::vector<Relation> rels(relations_.size());
  for (size_t i = 0; i < relations_.size(); ++i) {
    rels[perm[i].value] = relations_[i];
  }
  std::vector<Predicate> preds = predicates_;
  for (Predicate& p : preds) p.relations = PermuteSet(p.relations, perm);
  Query out(std::move(rels), std::move(preds));
  if (listed_) out.listed_ = std::make_shared<const ListedRows>(listed_->Permuted(perm));
  out.joins_ = joins_;
  for (JoinOp& op : out.joins_) {
    op.left = PermuteSet(op.left, perm);
    op.right = PermuteSet(op.right, perm);
    op.predicate = PermuteSet(op.predicate, perm);
  }
  return out;
}

Query Query::WithListed(std::shared_ptr<const ListedRows> listed) const {
  Query out = *this;
  out.listed_ = listed && !listed->empty() ? std::move(listed) : nullptr;
  return out;
}

absl::StatusOr<Query> Query::WithJoins(std::vector<JoinOp> joins) const {
  RETURN_IF_ERROR(ValidateJoinOps(relations_, predicates_, joins));
  Query out = *this;
  out.joins_ = std::move(joins);
  return out;
}

}  // namespace sliceplan
