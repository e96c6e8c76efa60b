// The query of any size: base relations and predicates over relation ids
// held as sorted id lists, not 64-bit masks, so the heuristic tiers
// (tiers/) take up to InputLimits::max_relations relations. Every request
// enters as a WideQuery; the exact engine's Query (at most 64 relations)
// is made from it by ToExactQuery.
//
// Immutable once created; safe to share between threads.
#ifndef SLICEPLAN_CORE_MODEL_WIDE_QUERY_H_
#define SLICEPLAN_CORE_MODEL_WIDE_QUERY_H_

#include <cstdint>
#include <memory>
#include <span>
#include <vector>

#include "absl/status/statusor.h"
#include "core/model/listed_rows.h"
#include "core/model/query.h"

namespace sliceplan {

struct WidePredicate {
  std::vector<int32_t> relations;  // ascending, distinct, two or more
  double selectivity = 1;          // in (0, 1]
};

class WideQuery {
 public:
  // Validates as Query::Create does, for any number of relations (the size
  // limits are the edge's, checked before this is called). Predicate
  // relation lists are sorted; a list naming an id twice or outside the
  // query is INVALID_ARGUMENT naming the predicate. Predicates over one
  // relation set are merged, their selectivities multiplied.
  static absl::StatusOr<WideQuery> Create(std::vector<Relation> relations,
                                          std::vector<WidePredicate> predicates);
  // The same query (n <= 64), for tests and for queries built in code.
  static WideQuery FromExact(const Query& query);

  int size() const { return static_cast<int>(relations_.size()); }
  const Relation& relation(int32_t r) const { return relations_[r]; }
  std::span<const Relation> relations() const { return relations_; }
  std::span<const WidePredicate> predicates() const { return predicates_; }
  // The engine's listed row estimates over relation masks (at most 64
  // relations take them), or null when none are listed.
  const ListedRows* listed() const { return listed_.get(); }
  const std::shared_ptr<const ListedRows>& shared_listed() const { return listed_; }
  // The same query with `listed` as its estimates; an empty list is none.
  // REQUIRES: size() <= kMaxRelations, the sets within the query.
  WideQuery WithListed(std::shared_ptr<const ListedRows> listed) const;
  // The non-inner joins over relation masks (at most 64 relations take
  // them); ToExactQuery validates them.
  std::span<const JoinOp> joins() const { return joins_; }
  // REQUIRES: size() <= kMaxRelations.
  WideQuery WithJoins(std::vector<JoinOp> joins) const;

  // Indices into predicates() of those naming relation r, ascending.
  std::span<const int32_t> incident(int32_t r) const {
    return {incident_.data() + incident_start_[r], incident_.data() + incident_start_[r + 1]};
  }

 private:
  WideQuery(std::vector<Relation> relations, std::vector<WidePredicate> predicates);

  std::vector<Relation> relations_;
  std::vector<WidePredicate> predicates_;
  std::vector<int32_t> incident_start_;  // size() + 1 offsets into incident_
  std::vector<int32_t> incident_;
  std::shared_ptr<const ListedRows> listed_;  // null: none listed
  std::vector<JoinOp> joins_;
};

// The exact engine's form of `query`. More than kMaxRelations relations is
// INVALID_ARGUMENT saying so and naming the tiers that take the query.
absl::StatusOr<Query> ToExactQuery(const WideQuery& query);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MODEL_WIDE_QUERY_H_
