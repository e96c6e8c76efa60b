// Non-inner joins of the engine's original join tree: left outer, full
// outer, semi and anti joins, each with the relations of its two inputs and
// its predicate (docs/joins.md). The query's plain predicates stay its
// inner joins. Plain values.
#ifndef SLICEPLAN_CORE_MODEL_JOIN_OPS_H_
#define SLICEPLAN_CORE_MODEL_JOIN_OPS_H_

#include <optional>
#include <span>
#include <vector>

#include "absl/status/status.h"
#include "absl/strings/string_view.h"
#include "core/model/relation_set.h"

namespace sliceplan {

struct Relation;
struct Predicate;

enum class JoinType : uint8_t { kInner, kLeft, kFull, kSemi, kAnti };

// "inner", "left", "full", "semi", "anti": the query's and the result's
// spelling.
const char* JoinTypeName(JoinType type);
// The type of a spelling; nullopt for any other text.
std::optional<JoinType> ParseJoinType(absl::string_view name);
// "LEFT", "FULL", "SEMI", "ANTI" as the tree string writes them; "" for
// inner.
const char* JoinTypeKeyword(JoinType type);
// Inner and full outer joins may swap their inputs.
constexpr bool IsCommutative(JoinType type) {
  return type == JoinType::kInner || type == JoinType::kFull;
}

// One non-inner operator of the original tree. `left` and `right` hold
// every relation below that input; `predicate` names relations of both.
struct JoinOp {
  JoinType type = JoinType::kLeft;
  RelSet left = 0;
  RelSet right = 0;
  RelSet predicate = 0;
  double selectivity = 1;  // in (0, 1]
  RelSet all() const { return left | right; }
};

// Checks `ops` against the query's relations and inner predicates (ids
// already resolved); INVALID_ARGUMENT naming the entry and field, e.g.
// "joins[1].right: ...":
//   - an inner type, an empty side, a relation in both sides;
//   - a predicate without a relation on each side, or naming a relation
//     outside the operator, or a selectivity outside (0, 1];
//   - two operators whose relation sets neither are disjoint nor nest
//     inside one side of the other;
//   - a predicate (of an operator or an inner one) that reads the right
//     side of a semi or anti join from above it;
//   - an inner predicate that joins the null-supplying side of a left or
//     full join to a relation outside that side (it rejects the padded
//     nulls: the engine should send that join as inner).
absl::Status ValidateJoinOps(std::span<const Relation> relations,
                             std::span<const Predicate> predicates, std::span<const JoinOp> ops);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MODEL_JOIN_OPS_H_
