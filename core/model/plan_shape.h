// The shape of the join trees a search considers: bushy (any binary tree)
// or left-deep (every join's right input a base relation). Plain value.
#ifndef SLICEPLAN_CORE_MODEL_PLAN_SHAPE_H_
#define SLICEPLAN_CORE_MODEL_PLAN_SHAPE_H_

namespace sliceplan {

enum class PlanShape { kBushy, kLeftDeep };

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MODEL_PLAN_SHAPE_H_
