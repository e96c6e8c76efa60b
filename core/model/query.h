// The query model: base relations, join predicates and the cardinality
// inputs the cost models read.
//
// A Query is immutable once created and safe to share between threads.
// Relations are identified by RelationId (their position in the query);
// predicates name relation sets, so a predicate over three or more relations
// (a hyperedge) needs no special case.
#ifndef SLICEPLAN_CORE_MODEL_QUERY_H_
#define SLICEPLAN_CORE_MODEL_QUERY_H_

#include <memory>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/statusor.h"
#include "core/model/join_ops.h"
#include "core/model/listed_rows.h"
#include "core/model/relation_set.h"

namespace sliceplan {

inline constexpr double kDefaultRowBytes = 100.0;

struct Relation {
  std::string name;                     // unique, [A-Za-z_][A-Za-z0-9_]*
  double rows = 0;                      // > 0
  double row_bytes = kDefaultRowBytes;  // > 0
};

struct Predicate {
  RelSet relations = 0;    // two or more relations
  double selectivity = 1;  // in (0, 1]
};

class Query {
 public:
  // Validates and builds a query. Errors (INVALID_ARGUMENT) name the field
  // and its position, e.g. "relations[3].rows: must be > 0, got -1":
  // no relations or more than kMaxRelations, a bad or duplicate name, rows
  // not finite and > 0, row_bytes outside (0, kMaxRowBytes], a predicate
  // over fewer than two relations or over ids outside the query,
  // selectivity outside (0, 1]. Predicates over the same relation set are
  // merged into one, their selectivities multiplied (the product kept at
  // or above the smallest normal double).
  static absl::StatusOr<Query> Create(std::vector<Relation> relations,
                                      std::vector<Predicate> predicates);

  int size() const { return static_cast<int>(relations_.size()); }
  RelSet all() const { return FullSet(size()); }
  const Relation& relation(RelationId r) const { return relations_[r.value]; }
  std::span<const Relation> relations() const { return relations_; }
  std::span<const Predicate> predicates() const { return predicates_; }

  // The same query with relation i renamed to position perm[i] (relations,
  // then predicate masks and listed sets, are permuted). REQUIRES: perm is
  // a permutation of 0..size()-1.
  Query Permuted(std::span<const RelationId> perm) const;

  // The engine's listed row estimates (`cardinalities`), or null when none
  // are listed.
  const ListedRows* listed() const { return listed_.get(); }
  const std::shared_ptr<const ListedRows>& shared_listed() const { return listed_; }
  // The same query with `listed` (over its relations) as its estimates;
  // an empty list is none.
  Query WithListed(std::shared_ptr<const ListedRows> listed) const;

  // The non-inner operators of the engine's original tree (`joins`);
  // empty when every join is inner.
  std::span<const JoinOp> joins() const { return joins_; }
  bool has_joins() const { return !joins_.empty(); }
  // The same query with `joins` as its non-inner operators, checked by
  // ValidateJoinOps (INVALID_ARGUMENT naming the entry).
  absl::StatusOr<Query> WithJoins(std::vector<JoinOp> joins) const;

 private:
  Query(std::vector<Relation> relations, std::vector<Predicate> predicates)
      : relations_(std::move(relations)), predicates_(std::move(predicates)) {}

  std::vector<Relation> relations_;
  std::vector<Predicate> predicates_;
  std::shared_ptr<const ListedRows> listed_;  // null: none listed
  std::vector<JoinOp> joins_;
};

// Maps a set through a permutation: bit i of `s` becomes bit perm[i].
RelSet PermuteSet(RelSet s, std::span<const RelationId> perm);

// Checks relations as Query::Create does: names (form, length, no
// duplicates), rows, row_bytes. INVALID_ARGUMENT naming the relation.
absl::Status ValidateRelations(std::span<const Relation> relations);

// INVALID_ARGUMENT naming predicates[j] unless selectivity is in (0, 1].
absl::Status ValidateSelectivity(double selectivity, size_t j);

// True when `name` matches [A-Za-z_][A-Za-z0-9_]*.
bool IsValidRelationName(std::string_view name);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MODEL_QUERY_H_
