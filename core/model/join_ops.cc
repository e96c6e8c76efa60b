#include "core/model/join_ops.h"

#include <cmath>
#include <string>

#include "absl/strings/str_cat.h"
#include "core/model/query.h"

namespace sliceplan {
namespace {

absl::Status Invalid(size_t k, absl::string_view field, absl::string_view what) {
  return absl::InvalidArgumentError(absl::StrCat("joins[", k, "].", field, ": ", what));
}

// "voyages, vessels": the first few names of a set.
std::string Names(std::span<const Relation> relations, RelSet s) {
  std::string out;
  int shown = 0;
  for (; s != 0 && shown < 4; s &= s - 1, ++shown) {
    absl::StrAppend(&out, shown ? ", " : "", relations[std::countr_zero(s)].name);
  }
  if (s != 0) absl::StrAppend(&out, " and ", Size(s), " more");
  return out;
}

absl::Status CheckOne(std::span<const Relation> relations, const JoinOp& op, size_t k) {
  const RelSet all = FullSet(static_cast<int>(relations.size()));
  if (op.type == JoinType::kInner) {
    return Invalid(k, "type", "inner joins are the query's predicates, not joins entries");
  }
  if (op.left == 0) return Invalid(k, "left", "names no relation");
  if (op.right == 0) return Invalid(k, "right", "names no relation");
  if (!IsSubset(op.left | op.right | op.predicate, all)) {
    return Invalid(k, "left", "names a relation id outside the query");
  }
  if (const RelSet both = op.left & op.right; both != 0) {
    return Invalid(k, "right", absl::StrCat(Names(relations, both), " also in left"));
  }
  if (!IsSubset(op.predicate, op.all())) {
    return Invalid(k, "predicate",
                   absl::StrCat("names ", Names(relations, op.predicate & ~op.all()),
                                ", outside both sides of this join"));
  }
  if ((op.predicate & op.left) == 0 || (op.predicate & op.right) == 0) {
    return Invalid(k, "predicate", "must name a relation of each side");
  }
  if (!(std::isfinite(op.selectivity) && op.selectivity > 0 && op.selectivity <= 1)) {
    return Invalid(k, "predicate.selectivity",
                   absl::StrCat("must be in (0, 1], got ", op.selectivity));
  }
  return absl::OkStatus();
}

// Two operators nest like a tree: disjoint, or one inside one side of the
// other.
bool Nest(const JoinOp& a, const JoinOp& b) {
  if ((a.all() & b.all()) == 0) return true;
  const auto inside = [](const JoinOp& in, const JoinOp& out) {
    return IsSubset(in.all(), out.left) || IsSubset(in.all(), out.right);
  };
  return inside(a, b) || inside(b, a);
}

// A predicate over `p`, applied above operator `o` (p reaches outside the
// side it touches): the reason it is refused, or "" when it may be.
std::string ReadsHidden(std::span<const Relation> relations, const JoinOp& o, size_t j, RelSet p,
                        bool inner) {
  const auto crosses = [&](RelSet side) { return (p & side) != 0 && !IsSubset(p, side); };
  const bool gone = o.type == JoinType::kSemi || o.type == JoinType::kAnti;
  if (gone && crosses(o.right)) {
    return absl::StrCat("reads ", Names(relations, p & o.right), ", the right side of the ",
                        JoinTypeName(o.type), " join joins[", j,
                        "], from above it (those columns are gone)");
  }
  if (!inner) return "";
  const auto nulls = [&](RelSet side) {
    return absl::StrCat("joins ", Names(relations, p & side), ", the null-supplying side of the ",
                        JoinTypeName(o.type), " join joins[", j,
                        "], to a relation outside it; it rejects the padded nulls, so send that "
                        "join as inner");
  };
  if (o.type == JoinType::kLeft || o.type == JoinType::kFull) {
    if (crosses(o.right)) return nulls(o.right);
  }
  if (o.type == JoinType::kFull && crosses(o.left)) return nulls(o.left);
  return "";
}

}  // namespace

// By JoinType: the spelling and the tree string's keyword.
constexpr struct {
  JoinType type;
  const char* name;
  const char* keyword;
} kSpellings[] = {{JoinType::kInner, "inner", ""},
                  {JoinType::kLeft, "left", "LEFT"},
                  {JoinType::kFull, "full", "FULL"},
                  {JoinType::kSemi, "semi", "SEMI"},
                  {JoinType::kAnti, "anti", "ANTI"}};

static_assert([] {
  for (int i = 0; i < 5; ++i) {
    if (static_cast<int>(kSpellings[i].type) != i) return false;
  }
  return true;
}());

const char* JoinTypeName(JoinType type) { return kSpellings[static_cast<int>(type)].name; }

const char* JoinTypeKeyword(JoinType type) { return kSpellings[static_cast<int>(type)].keyword; }

std::optional<JoinType> ParseJoinType(absl::string_view name) {
  for (const auto& s : kSpellings) {
    if (name == s.name) return s.type;
  }
  return std::nullopt;
}

absl::Status ValidateJoinOps(std::span<const Relation> relations,
                             std::span<const Predicate> predicates, std::span<const JoinOp> ops) {
  for (size_t k = 0; k < ops.size(); ++k) {
    if (absl::Status s = CheckOne(relations, ops[k], k); !s.ok()) return s;
  }
  for (size_t k = 0; k < ops.size(); ++k) {
    for (size_t j = 0; j < k; ++j) {
      if (!Nest(ops[j], ops[k])) {
        return Invalid(k, "left",
                       absl::StrCat("its relations and those of joins[", j,
                                    "] do not nest like a tree (they must be "
                                    "disjoint or one inside one side of the other)"));
      }
      if (ops[j].all() == ops[k].all()) {
        return Invalid(k, "left", absl::StrCat("joins the same relations as joins[", j, "]"));
      }
    }
  }
  // An operator's predicate may not read below it what a semi or anti join
  // inside one of its sides has dropped.
  for (size_t k = 0; k < ops.size(); ++k) {
    for (size_t j = 0; j < ops.size(); ++j) {
      if (j == k || !IsSubset(ops[j].all(), ops[k].all())) continue;
      if (std::string why = ReadsHidden(relations, ops[j], j, ops[k].predicate, false);
          !why.empty()) {
        return Invalid(k, "predicate", why);
      }
    }
  }
  for (size_t i = 0; i < predicates.size(); ++i) {
    for (size_t j = 0; j < ops.size(); ++j) {
      if (std::string why = ReadsHidden(relations, ops[j], j, predicates[i].relations, true);
          !why.empty()) {
        return absl::InvalidArgumentError(absl::StrCat("predicates[", i, "]: ", why));
      }
    }
  }
  return absl::OkStatus();
}

}  // namespace sliceplan
