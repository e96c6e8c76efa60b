// The k ordering constraints that carve one slice out of the plan space, and
// the admissibility test they imply for relation sets.
//
// Every constraint, once oriented by its slice bit, forbids the sets that
// hold all of `trigger` and none of `need`:
//   precedence pair (a before c):        trigger {c},     need {a}
//   path triple (t not before u on r's path): trigger {r, t}, need {u}
// A slice's admissible sets are those no constraint forbids; a plan lies in
// the slice when every one of its intermediate results (and, for bushy
// plans, every join operand) is admissible. Immutable, thread-safe.
#ifndef SLICEPLAN_CORE_SLICING_SLICE_CONSTRAINTS_H_
#define SLICEPLAN_CORE_SLICING_SLICE_CONSTRAINTS_H_

#include <array>
#include <span>
#include <vector>

#include "absl/status/statusor.h"
#include "core/model/query.h"
#include "core/slicing/slice_spec.h"

namespace sliceplan {

// One constraint's relations before orientation, in the order the layout
// gives them bits: for a pair {first, second}; for a triple {anchor, t, u}.
// `size` is 2 or 3.
struct ConstraintRelations {
  std::array<RelationId, 3> ids{};
  int size = 0;
};

// One oriented constraint. Its relations, in digit order, are
// `ids[0..size)`: for a pair {required, trigger}; for a triple
// {anchor, trigger, required} (see the digit tables of dense_layout.h).
struct OrientedConstraint {
  ConstraintRelations relations;
  RelSet trigger = 0;
  RelSet need = 0;
  bool Forbids(RelSet s) const { return (s & trigger) == trigger && (s & need) == 0; }
};

class SliceConstraints {
 public:
  // The constraints of slice `spec` for `shape`: the relations come from
  // ChooseConstraintRelations (a deterministic function of the query and
  // the search space), the orientation from the slice bits. Errors as
  // ValidateSlice.
  static absl::StatusOr<SliceConstraints> ForSlice(const Query& query, PlanShape shape,
                                                   SliceSpec spec, bool cross_products = true);
  // Builds from given relations (tests use it to pin a choice).
  // REQUIRES: relations disjoint, sizes match `shape`, one per slice bit.
  static SliceConstraints FromRelations(PlanShape shape, SliceSpec spec,
                                        const std::vector<ConstraintRelations>& relations);
  // The same constraints with every relation i renamed perm[i] (a search
  // that renumbers its query tests its own sets). REQUIRES: perm is a
  // permutation of the query's relations.
  SliceConstraints Renumbered(std::span<const RelationId> perm) const;

  bool Admissible(RelSet s) const {
    for (const OrientedConstraint& c : constraints_) {
      if (c.Forbids(s)) return false;
    }
    return true;
  }
  const std::vector<OrientedConstraint>& constraints() const { return constraints_; }
  // The union of all constrained relations.
  RelSet constrained() const { return constrained_; }
  PlanShape shape() const { return shape_; }
  SliceSpec spec() const { return spec_; }

 private:
  PlanShape shape_ = PlanShape::kBushy;
  SliceSpec spec_;
  std::vector<OrientedConstraint> constraints_;
  RelSet constrained_ = 0;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SLICING_SLICE_CONSTRAINTS_H_
