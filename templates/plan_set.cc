#include "templates/plan_set.h"

#include <optional>

#include "absl/strings/str_cat.h"
#include "core/graph/join_conflicts.h"
#include "core/model/json_text.h"
#include "core/model/status_macros.h"
#include "google/protobuf/struct.pb.h"
#include "google/protobuf/util/json_util.h"

namespace sliceplan {
namespace {

absl::Status Bad(const std::string& what) {
  return absl::InvalidArgumentError(absl::StrCat("plan set: ", what));
}

// A node list back into a plan over n relations: [r] a leaf, [l, r] a join
// of earlier nodes.
absl::StatusOr<Plan> PlanFrom(const google::protobuf::ListValue& nodes, int n, int p) {
  Plan plan;
  RelSet seen = 0;
  for (int i = 0; i < nodes.values_size(); ++i) {
    const std::string at = absl::StrCat("plans[", p, "].nodes[", i, "]");
    if (!nodes.values(i).has_list_value()) return Bad(at + ": not a list");
    const auto& v = nodes.values(i).list_value().values();
    PlanNode node;
    if (v.size() == 1) {
      const double r = v[0].number_value();
      if (!(r >= 0 && r < n) || r != static_cast<int>(r)) return Bad(at + ": no relation");
      node.relations = RelSet{1} << static_cast<int>(r);
      if ((seen & node.relations) != 0) return Bad(at + ": a relation twice");
      seen |= node.relations;
    } else if (v.size() == 2) {
      const double l = v[0].number_value(), r = v[1].number_value();
      if (!(l >= 0 && l < i && r >= 0 && r < i) || l != static_cast<int>(l) ||
          r != static_cast<int>(r)) {
        return Bad(at + ": children must be earlier nodes");
      }
      node.left = static_cast<int>(l);
      node.right = static_cast<int>(r);
      node.relations = plan.nodes[node.left].relations | plan.nodes[node.right].relations;
    } else {
      return Bad(at + ": [relation] or [left, right]");
    }
    plan.nodes.push_back(node);
  }
  if (plan.nodes.empty() || seen != FullSet(n) || plan.root().relations != FullSet(n)) {
    return Bad(absl::StrCat("plans[", p, "]: not a tree over the template's relations"));
  }
  return plan;
}

// A template with outer, semi or anti joins: each stored join gets the
// type the original tree gives it there (the file keeps the preserved
// input first); a join no equivalent tree has there is refused.
absl::Status TypeJoins(const JoinConflicts& conflicts, int p, Plan& plan) {
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    PlanNode& node = plan.nodes[i];
    if (node.is_leaf()) continue;
    const JoinFit fit =
        conflicts.Fit(plan.nodes[node.left].relations, plan.nodes[node.right].relations, true);
    if (!fit.forward) {
      return Bad(absl::StrCat("plans[", p, "].nodes[", i,
                              "]: no tree equivalent to the template's joins has this join"));
    }
    node.type = fit.type;
  }
  return absl::OkStatus();
}

}  // namespace

std::string PlanSetJson(const QueryTemplate& t, const PreparedPlans& prepared) {
  std::string out = absl::StrCat(
      "{\n  \"sliceplan_plan_set\": ", kPlanSetVersion, ",\n  \"template\": ", JsonString(t.text()),
      ",\n  \"grid\": ", prepared.grid, ",\n  \"max_ratio\": ", JsonNumber(prepared.max_ratio),
      ",\n  \"max_ratio_on_grid\": ", JsonNumber(prepared.worst_ratio),
      ",\n  \"grid_points\": ", prepared.grid_points, ",\n  \"plans\": [\n");
  for (size_t p = 0; p < prepared.plans.size(); ++p) {
    absl::StrAppend(&out, "    {\"worst_ratio\": ", JsonNumber(prepared.plan_worst[p]),
                    ", \"nodes\": [");
    const Plan& plan = prepared.plans[p];
    for (size_t i = 0; i < plan.nodes.size(); ++i) {
      const PlanNode& n = plan.nodes[i];
      absl::StrAppend(&out, i ? ", " : "", "[",
                      n.left < 0 ? absl::StrCat(std::countr_zero(n.relations))
                                 : absl::StrCat(n.left, ", ", n.right),
                      "]");
    }
    absl::StrAppend(&out, "]}", p + 1 < prepared.plans.size() ? ",\n" : "\n");
  }
  out += "  ]\n}\n";
  return out;
}

absl::StatusOr<PlanSet> ParsePlanSet(std::string_view json) {
  google::protobuf::Struct doc;
  if (!google::protobuf::util::JsonStringToMessage(
           google::protobuf::StringPiece(json.data(), json.size()), &doc)
           .ok()) {
    return Bad("not JSON");
  }
  const auto& f = doc.fields();
  const auto field = [&](const char* name) -> const google::protobuf::Value* {
    const auto it = f.find(name);
    return it == f.end() ? nullptr : &it->second;
  };
  const auto* version = field("sliceplan_plan_set");
  if (version == nullptr || version->number_value() != kPlanSetVersion) {
    return Bad(absl::StrCat("not a plan set of version ", kPlanSetVersion,
                            " (written by sliceplan prepare)"));
  }
  const auto* text = field("template");
  if (text == nullptr || !text->has_string_value()) return Bad("template: missing");
  ASSIGN_OR_RETURN(QueryTemplate t, QueryTemplate::Parse(text->string_value()));
  ASSIGN_OR_RETURN(const Query lowest, t.At([&] {
    std::vector<double> v;
    for (const TemplateParameter& p : t.parameters()) v.push_back(p.min);
    return v;
  }()));
  PreparedPlans prepared;
  const auto number = [&](const char* name) {
    const auto* v = field(name);
    return v != nullptr ? v->number_value() : 0.0;
  };
  prepared.grid = static_cast<int>(number("grid"));
  prepared.max_ratio = number("max_ratio");
  prepared.worst_ratio = number("max_ratio_on_grid");
  prepared.grid_points = static_cast<size_t>(number("grid_points"));
  const auto* plans = field("plans");
  if (plans == nullptr || !plans->has_list_value() || plans->list_value().values_size() == 0) {
    return Bad("plans: missing or empty");
  }
  std::optional<JoinConflicts> conflicts;  // built once, for every plan
  if (lowest.has_joins()) conflicts.emplace(lowest);
  for (int p = 0; p < plans->list_value().values_size(); ++p) {
    const auto& entry = plans->list_value().values(p).struct_value().fields();
    const auto nodes = entry.find("nodes");
    const auto worst = entry.find("worst_ratio");
    if (nodes == entry.end() || !nodes->second.has_list_value() || worst == entry.end()) {
      return Bad(absl::StrCat("plans[", p, "]: nodes and worst_ratio expected"));
    }
    ASSIGN_OR_RETURN(Plan plan, PlanFrom(nodes->second.list_value(), lowest.size(), p));
    if (conflicts) RETURN_IF_ERROR(TypeJoins(*conflicts, p, plan));
    prepared.plans.push_back(std::move(plan));
    prepared.plan_worst.push_back(worst->second.number_value());
  }
  return PlanSet{std::move(t), std::move(prepared)};
}

}  // namespace sliceplan
