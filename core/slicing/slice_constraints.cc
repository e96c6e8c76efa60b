#include "core/slicing/slice_constraints.h"

#include <utility>

#include "core/model/status_macros.h"
#include "core/slicing/constraint_choice.h"

namespace sliceplan {
namespace {

// Orients one constraint. Bit 0 keeps the pair's natural order (first before
// second: the second may not appear without the first) and, for a triple
// {r, t, u}, forbids sets with r and t but not u. Bit 1 swaps the roles of
// the last two relations.
OrientedConstraint Orient(ConstraintRelations rel, bool bit) {
  OrientedConstraint c;
  if (rel.size == 2) {
    if (bit) std::swap(rel.ids[0], rel.ids[1]);
    c.trigger = Singleton(rel.ids[1]);
    c.need = Singleton(rel.ids[0]);
  } else {
    if (bit) std::swap(rel.ids[1], rel.ids[2]);
    c.trigger = Singleton(rel.ids[0]) | Singleton(rel.ids[1]);
    c.need = Singleton(rel.ids[2]);
  }
  c.relations = rel;
  return c;
}

}  // namespace

absl::StatusOr<SliceConstraints> SliceConstraints::ForSlice(const Query& query, PlanShape shape,
                                                            SliceSpec spec, bool cross_products) {
  RETURN_IF_ERROR(ValidateSlice(spec, query.size(), shape));
  return FromRelations(shape, spec,
                       ChooseConstraintRelations(query, shape, spec.bits(), cross_products));
}

SliceConstraints SliceConstraints::FromRelations(
    PlanShape shape, SliceSpec spec, const std::vector<ConstraintRelations>& relations) {
  SliceConstraints out;
  out.shape_ = shape;
  out.spec_ = spec;
  for (size_t j = 0; j < relations.size(); ++j) {
    out.constraints_.push_back(Orient(relations[j], spec.bit(static_cast<int>(j))));
    out.constrained_ |= out.constraints_.back().trigger | out.constraints_.back().need;
  }
  return out;
}

SliceConstraints SliceConstraints::Renumbered(std::span<const RelationId> perm) const {
  SliceConstraints out = *this;
  out.constrained_ = PermuteSet(constrained_, perm);
  for (OrientedConstraint& c : out.constraints_) {
    c.trigger = PermuteSet(c.trigger, perm);
    c.need = PermuteSet(c.need, perm);
    for (int d = 0; d < c.relations.size; ++d) c.relations.ids[d] = perm[c.relations.ids[d].value];
  }
  return out;
}

}  // namespace sliceplan
