#include "core/model/wide_query.h"

#include <algorithm>
#include <limits>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/str_cat.h"
#include "core/model/status_macros.h"

namespace sliceplan {
namespace {

absl::Status CheckPredicate(WidePredicate& p, size_t j, int n) {
  const std::string at = absl::StrCat("predicates[", j, "].relations");
  std::sort(p.relations.begin(), p.relations.end());
  if (p.relations.size() < 2) {
    return absl::InvalidArgumentError(
        absl::StrCat(at, ": must name two or more distinct relations"));
  }
  if (p.relations.front() < 0 || p.relations.back() >= n) {
    return absl::InvalidArgumentError(absl::StrCat(at, ": names a relation id outside the query"));
  }
  if (std::adjacent_find(p.relations.begin(), p.relations.end()) != p.relations.end()) {
    return absl::InvalidArgumentError(absl::StrCat(at, ": names a relation twice"));
  }
  return ValidateSelectivity(p.selectivity, j);
}

// As Query::Create: one predicate per relation set, selectivities
// multiplied and kept above zero.
std::vector<WidePredicate> MergeEqual(std::vector<WidePredicate> predicates) {
  absl::flat_hash_map<std::vector<int32_t>, size_t> index;
  std::vector<WidePredicate> out;
  out.reserve(predicates.size());
  for (WidePredicate& p : predicates) {
    const auto [it, inserted] = index.emplace(p.relations, out.size());
    if (inserted) {
      out.push_back(std::move(p));
      continue;
    }
    double& sel = out[it->second].selectivity;
    sel = std::max(sel * p.selectivity, std::numeric_limits<double>::min());
  }
  return out;
}

}  // namespace

WideQuery::WideQuery(std::vector<Relation> relations, std::vector<WidePredicate> predicates)
    : relations_(std::move(relations)), predicates_(std::move(predicates)) {
  const size_t n = relations_.size();
  incident_start_.assign(n + 1, 0);
  for (const WidePredicate& p : predicates_) {
    for (const int32_t r : p.relations) ++incident_start_[r + 1];
  }
  for (size_t i = 0; i < n; ++i) incident_start_[i + 1] += incident_start_[i];
  incident_.resize(incident_start_[n]);
  std::vector<int32_t> next(incident_start_.begin(), incident_start_.end() - 1);
  for (size_t j = 0; j < predicates_.size(); ++j) {
    for (const int32_t r : predicates_[j].relations) {
      incident_[next[r]++] = static_cast<int32_t>(j);
    }
  }
}

absl::StatusOr<WideQuery> WideQuery::Create(std::vector<Relation> relations,
                                            std::vector<WidePredicate> predicates) {
  if (relations.empty()) {
    return absl::InvalidArgumentError("relations: the query has no relations");
  }
  if (relations.size() > static_cast<size_t>(std::numeric_limits<int32_t>::max() / 2)) {
    return absl::ResourceExhaustedError(
        absl::StrCat("relations: ", relations.size(), " relations given"));
  }
  RETURN_IF_ERROR(ValidateRelations(relations));
  const int n = static_cast<int>(relations.size());
  for (size_t j = 0; j < predicates.size(); ++j) {
    RETURN_IF_ERROR(CheckPredicate(predicates[j], j, n));
  }
  return WideQuery(std::move(relations), MergeEqual(std::move(predicates)));
}

WideQuery WideQuery::FromExact(const Query& query) {
  std::vector<WidePredicate> predicates;
  for (const Predicate& p : query.predicates()) {
    WidePredicate w{{}, p.selectivity};
    ForEachMember(p.relations, [&](RelationId r) { w.relations.push_back(r.value); });
    predicates.push_back(std::move(w));
  }
  WideQuery out({query.relations().begin(), query.relations().end()}, std::move(predicates));
  out.listed_ = query.shared_listed();
  out.joins_.assign(query.joins().begin(), query.joins().end());
  return out;
}

WideQuery WideQuery::WithListed(std::shared_ptr<const ListedRows> listed) const {
  WideQuery out = *this;
  out.listed_ = listed && !listed->empty() ? std::move(listed) : nullptr;
  return out;
}

absl::StatusOr<Query> ToExactQuery(const WideQuery& query) {
  if (query.size() > kMaxRelations) {
    return absl::InvalidArgumentError(absl::StrCat(
        "relations: ", query.size(), " relations given; the exact search takes at most ",
        kMaxRelations, " (the greedy, linear and idp tiers take more)"));
  }
  std::vector<Predicate> predicates;
  predicates.reserve(query.predicates().size());
  for (const WidePredicate& p : query.predicates()) {
    Predicate out{0, p.selectivity};
    for (const int32_t r : p.relations) out.relations |= Singleton(RelationId{uint8_t(r)});
    predicates.push_back(out);
  }
  ASSIGN_OR_RETURN(Query exact, Query::Create({query.relations().begin(), query.relations().end()},
                                              std::move(predicates)));
  if (query.listed() != nullptr) exact = exact.WithListed(query.shared_listed());
  if (!query.joins().empty()) return exact.WithJoins({query.joins().begin(), query.joins().end()});
  return exact;
}

WideQuery WideQuery::WithJoins(std::vector<JoinOp> joins) const {
  WideQuery out = *this;
  out.joins_ = std::move(joins);
  return out;
}

}  // namespace sliceplan
