// The coordinator's prepared queries (docs/templates.md, "In the
// service"): PrepareTemplate optimizes a template's grid with a point
// solver the caller gives (the pool), keeps the plan set under a new id
// (written to the plan store first, when there is one), and
// ChooseTemplatePlan answers from memory. Templates stored before a
// restart are loaded at start. Thread-safe.
#ifndef SLICEPLAN_COORDINATOR_TEMPLATE_DESK_H_
#define SLICEPLAN_COORDINATOR_TEMPLATE_DESK_H_

#include <functional>
#include <map>
#include <memory>
#include <string>

#include "absl/base/thread_annotations.h"
#include "absl/status/statusor.h"
#include "absl/synchronization/mutex.h"
#include "core/model/input_limits.h"
#include "sliceplan.pb.h"
#include "templates/plan_set.h"
#include "templates/plan_store.h"
#include "templates/template_prepare.h"

namespace sliceplan {

struct TemplateLimits {
  size_t max_templates = 1000;    // stored at once
  size_t max_grid_points = 4096;  // optimized by one prepare
};

class TemplateDesk {
 public:
  // `store` may be null: templates then live in memory only. Loads every
  // stored template; FAILED_PRECONDITION naming the id of one that no
  // longer parses (nothing is dropped silently).
  static absl::StatusOr<std::unique_ptr<TemplateDesk>> Open(std::unique_ptr<PlanStore> store,
                                                            TemplateLimits limits);

  // Validates the request (each refusal names its field; RESOURCE_EXHAUSTED
  // past a limit, checked before any work), optimizes its grid with
  // `solve`, `concurrency` points at once, and stores the plan set under a
  // new id. The template is stored whole or not at all.
  absl::StatusOr<v1::PrepareTemplateResult> Prepare(
      const v1::PrepareTemplateRequest& request, const InputLimits& input, PointSolver solve,
      int concurrency, std::function<void(size_t done, size_t total)> on_progress)
      ABSL_LOCKS_EXCLUDED(mu_);

  // NOT_FOUND for an unknown id; INVALID_ARGUMENT naming a parameter that
  // is unknown, missing, given twice or outside its range.
  absl::StatusOr<v1::ChooseTemplatePlanResponse> Choose(
      const v1::ChooseTemplatePlanRequest& request) const ABSL_LOCKS_EXCLUDED(mu_);

  size_t size() const ABSL_LOCKS_EXCLUDED(mu_);

 private:
  TemplateDesk(std::unique_ptr<PlanStore> store, TemplateLimits limits)
      : store_(std::move(store)), limits_(limits) {}
  absl::Status CheckRoom() const ABSL_LOCKS_EXCLUDED(mu_);

  const std::unique_ptr<PlanStore> store_;
  const TemplateLimits limits_;
  mutable absl::Mutex mu_;
  std::map<std::string, std::shared_ptr<const PlanSet>> sets_ ABSL_GUARDED_BY(mu_);
};

}  // namespace sliceplan

#endif  // SLICEPLAN_COORDINATOR_TEMPLATE_DESK_H_
