#include "coordinator/template_desk.h"

#include <cmath>
#include <random>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "core/model/status_macros.h"
#include "wire/service_proto.h"

namespace sliceplan {
namespace {

constexpr int kDefaultGrid = 8;
constexpr double kDefaultMaxRatio = 1.2;
constexpr double kLargestMaxRatio = 1e6;

// 128 random bits in hex: ids nobody can guess or collide with.
std::string NewTemplateId() {
  std::random_device device;
  std::string id;
  for (int i = 0; i < 4; ++i) absl::StrAppendFormat(&id, "%08x", device());
  return id;
}

absl::Status Prefixed(const char* field, const absl::Status& s) {
  return absl::Status(s.code(), absl::StrCat(field, ": ", s.message()));
}

// The request's prepare options, each refusal naming its field.
absl::StatusOr<PrepareOptions> OptionsOf(const v1::PrepareTemplateRequest& request) {
  PrepareOptions o;
  o.grid = request.grid() == 0 ? kDefaultGrid
                               : static_cast<int>(std::min<uint32_t>(request.grid(), 1u << 30));
  if (o.grid < kMinGrid || o.grid > kMaxGrid) {
    return absl::InvalidArgumentError(
        absl::StrCat("grid: ", request.grid(), " is outside ", kMinGrid, "..", kMaxGrid));
  }
  o.max_ratio = request.max_ratio() == 0 ? kDefaultMaxRatio : request.max_ratio();
  if (!(o.max_ratio >= 1 && o.max_ratio <= kLargestMaxRatio)) {
    return absl::InvalidArgumentError(absl::StrCat("max_ratio: must be in [1, ", kLargestMaxRatio,
                                                   "], got ", request.max_ratio()));
  }
  auto search = SearchOptionsFromProto(request.options());
  if (!search.ok()) return Prefixed("options", search.status());
  if (search->cost != CostModelKind::kCout) {
    return absl::InvalidArgumentError(
        "options.cost: a template is prepared under the cout model only (docs/templates.md)");
  }
  o.search = *search;
  return o;
}

// RESOURCE_EXHAUSTED when the grid has more points than `limit`.
absl::Status CheckGridPoints(int grid, size_t parameters, size_t limit) {
  size_t points = 1;
  for (size_t i = 0; i < parameters; ++i) {
    points *= static_cast<size_t>(grid);
    if (points > limit) {
      return absl::ResourceExhaustedError(absl::StrCat(
          "grid: ", grid, " values for each of ", parameters, " parameters is more than ", limit,
          " grid points (--max_grid_points); ask for a smaller grid"));
    }
  }
  return absl::OkStatus();
}

v1::PrepareReport ReportOf(const PrepareFigures& f) {
  v1::PrepareReport r;
  r.set_stored_plans(static_cast<uint32_t>(f.stored_plans));
  r.set_grid_points(f.grid_points);
  r.set_grid(static_cast<uint32_t>(f.grid));
  r.set_distinct_optima(f.distinct_optima);
  r.set_max_ratio(f.max_ratio);
  r.set_max_ratio_on_grid(f.worst_ratio);
  if (f.box_ratio_bound) r.set_box_ratio_bound(*f.box_ratio_bound);
  r.set_seconds(f.seconds);
  return r;
}

}  // namespace

absl::StatusOr<std::unique_ptr<TemplateDesk>> TemplateDesk::Open(std::unique_ptr<PlanStore> store,
                                                                 TemplateLimits limits) {
  std::unique_ptr<TemplateDesk> desk(new TemplateDesk(std::move(store), limits));
  if (desk->store_ == nullptr) return desk;
  ASSIGN_OR_RETURN(const std::vector<StoredPlanSet> stored, desk->store_->LoadAll());
  absl::MutexLock lock(&desk->mu_);
  for (const StoredPlanSet& entry : stored) {
    auto set = ParsePlanSet(entry.plan_set_json);
    if (!set.ok()) {
      return absl::FailedPreconditionError(
          absl::StrCat("--plan_store=", desk->store_->path(), ": template ", entry.id,
                       " does not load: ", set.status().message()));
    }
    desk->sets_[entry.id] = std::make_shared<const PlanSet>(*std::move(set));
  }
  return desk;
}

size_t TemplateDesk::size() const {
  absl::MutexLock lock(&mu_);
  return sets_.size();
}

absl::Status TemplateDesk::CheckRoom() const {
  if (const size_t n = size(); n >= limits_.max_templates) {
    return absl::ResourceExhaustedError(absl::StrCat("the coordinator holds ", n,
                                                     n == 1 ? " template" : " templates",
                                                     ", its limit (--max_templates)"));
  }
  return absl::OkStatus();
}

absl::StatusOr<v1::PrepareTemplateResult> TemplateDesk::Prepare(
    const v1::PrepareTemplateRequest& request, const InputLimits& input, PointSolver solve,
    int concurrency, std::function<void(size_t, size_t)> on_progress) {
  const auto bytes = static_cast<int64_t>(request.template_json().size());
  if (bytes > input.max_query_bytes) {
    return absl::ResourceExhaustedError(
        absl::StrCat("template_json: ", bytes, " bytes, over the limit of ", input.max_query_bytes,
                     " (--max_query_bytes)"));
  }
  auto parsed = QueryTemplate::Parse(request.template_json(), input);
  if (!parsed.ok()) return Prefixed("template_json", parsed.status());
  const QueryTemplate& t = *parsed;
  ASSIGN_OR_RETURN(PrepareOptions options, OptionsOf(request));
  RETURN_IF_ERROR(CheckGridPoints(options.grid, t.parameters().size(), limits_.max_grid_points));
  RETURN_IF_ERROR(CheckRoom());
  options.workers = std::max(1, concurrency);
  options.solve_point = std::move(solve);
  options.on_progress = std::move(on_progress);
  ASSIGN_OR_RETURN(const PreparedPlans prepared, PrepareTemplate(t, options));
  v1::PrepareTemplateResult result;
  result.set_plan_set_json(PlanSetJson(t, prepared));
  // Read back as choose will read it: what is stored is what answers.
  ASSIGN_OR_RETURN(PlanSet set, ParsePlanSet(result.plan_set_json()));
  result.set_template_id(NewTemplateId());
  *result.mutable_report() = ReportOf(FiguresOf(prepared));
  RETURN_IF_ERROR(CheckRoom());
  if (store_ != nullptr) {
    RETURN_IF_ERROR(
        store_->Put({result.template_id(), result.plan_set_json()}, limits_.max_templates));
  }
  absl::MutexLock lock(&mu_);
  if (store_ == nullptr && sets_.size() >= limits_.max_templates) {
    return absl::ResourceExhaustedError(absl::StrCat("the coordinator holds ", sets_.size(),
                                                     " templates, its limit (--max_templates)"));
  }
  sets_[result.template_id()] = std::make_shared<const PlanSet>(std::move(set));
  return result;
}

absl::StatusOr<v1::ChooseTemplatePlanResponse> TemplateDesk::Choose(
    const v1::ChooseTemplatePlanRequest& request) const {
  std::shared_ptr<const PlanSet> set;
  {
    absl::MutexLock lock(&mu_);
    const auto it = sets_.find(request.template_id());
    if (it == sets_.end()) {
      // A hostile id is not echoed whole: ids this coordinator gives are
      // 32 characters.
      const std::string& id = request.template_id();
      return absl::NotFoundError(absl::StrCat(
          "template_id: no template \"", id.size() <= 64 ? id : id.substr(0, 64) + "...",
          "\" is prepared here (", sets_.size(), sets_.size() == 1 ? " is)" : " are)"));
    }
    set = it->second;
  }
  if (set->prepared.plans.empty())
    return absl::FailedPreconditionError("the plan set holds no plan");
  std::vector<std::pair<std::string, double>> given;
  for (const v1::ParameterValue& v : request.values()) given.emplace_back(v.name(), v.value());
  auto values = set->query_template.Values(given, "values");
  if (!values.ok()) return values.status();
  auto at = set->query_template.At(*values);
  if (!at.ok()) return Prefixed("values", at.status());
  const StoredChoice choice = ChooseStoredPlan(set->prepared, *at, request.robust());
  v1::ChooseTemplatePlanResponse out;
  *out.mutable_plan() = PlanToProto(choice.plan, CostModelKind::kCout);
  out.set_stored_plans(static_cast<uint32_t>(set->prepared.plans.size()));
  out.set_plan_index(static_cast<uint32_t>(choice.index));
  out.set_worst_ratio_on_grid(set->prepared.plan_worst[choice.index]);
  return out;
}

}  // namespace sliceplan
