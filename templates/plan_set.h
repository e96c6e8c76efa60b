// The plan set file `sliceplan prepare --out` writes and `sliceplan choose`
// reads (docs/templates.md): the template's own JSON, the grid, the
// guarantee, and the kept plans as node lists. Pure functions.
#ifndef SLICEPLAN_TEMPLATES_PLAN_SET_H_
#define SLICEPLAN_TEMPLATES_PLAN_SET_H_

#include <string>
#include <string_view>

#include "absl/status/statusor.h"
#include "templates/template_prepare.h"
#include "wire/query_template.h"

namespace sliceplan {

inline constexpr int kPlanSetVersion = 1;

std::string PlanSetJson(const QueryTemplate& t, const PreparedPlans& prepared);

struct PlanSet {
  QueryTemplate query_template;
  PreparedPlans prepared;
};

// INVALID_ARGUMENT naming what is wrong: not a plan set of this version, a
// template refused (as QueryTemplate::Parse), a plan that is no tree over
// the template's relations.
absl::StatusOr<PlanSet> ParsePlanSet(std::string_view json);

}  // namespace sliceplan

#endif  // SLICEPLAN_TEMPLATES_PLAN_SET_H_
