#include "wire/query_template.h"

#include <cmath>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/str_cat.h"
#include "core/model/status_macros.h"
#include "core/model/user_text.h"
#include "google/protobuf/struct.pb.h"
#include "google/protobuf/util/json_util.h"
#include "wire/json_shape.h"
#include "wire/query_proto.h"

namespace sliceplan {
namespace {

using google::protobuf::Struct;
using google::protobuf::Value;

absl::Status Bad(const std::string& what) {
  return absl::InvalidArgumentError(absl::StrCat("template: ", what));
}

// The template's parameters, each checked on its own.
absl::StatusOr<std::vector<TemplateParameter>> ReadParameters(const Struct& doc) {
  const auto it = doc.fields().find("parameters");
  if (it == doc.fields().end() || !it->second.has_list_value() ||
      it->second.list_value().values_size() == 0) {
    return Bad("parameters: missing; a template lists one or more parameters");
  }
  const auto& list = it->second.list_value().values();
  if (list.size() > kMaxTemplateParameters) {
    return Bad(
        absl::StrCat("parameters: ", list.size(), " given; the limit is ", kMaxTemplateParameters));
  }
  std::vector<TemplateParameter> out;
  for (int i = 0; i < list.size(); ++i) {
    const std::string at = absl::StrCat("parameters[", i, "]");
    if (!list[i].has_struct_value()) return Bad(at + ": not an object");
    const auto& f = list[i].struct_value().fields();
    for (const auto& [key, value] : f) {
      if (key != "name" && key != "min" && key != "max") {
        return Bad(absl::StrCat(at, ": unknown field \"", ShortName(key), "\""));
      }
    }
    TemplateParameter p;
    const auto name = f.find("name");
    if (name == f.end() || !name->second.has_string_value() ||
        !IsValidRelationName(name->second.string_value())) {
      return Bad(at + ".name: missing or not of the form [A-Za-z_][A-Za-z0-9_]*");
    }
    p.name = name->second.string_value();
    for (const auto& [key, out_value] : {std::pair{"min", &p.min}, std::pair{"max", &p.max}}) {
      const auto v = f.find(key);
      if (v == f.end() || !v->second.has_number_value()) {
        return Bad(absl::StrCat(at, " (", p.name, ").", key, ": missing or not a number"));
      }
      *out_value = v->second.number_value();
    }
    if (!std::isfinite(p.min) || !std::isfinite(p.max) || !(p.min > 0) || p.min > p.max) {
      return Bad(absl::StrCat(at, " (", p.name,
                              "): the range must be finite with 0 < min <= max, got [", p.min, ", ",
                              p.max, "]"));
    }
    for (const TemplateParameter& q : out) {
      if (q.name == p.name)
        return Bad(absl::StrCat(at, ": parameter \"", p.name, "\" named twice"));
    }
    out.push_back(std::move(p));
  }
  return out;
}

}  // namespace

absl::StatusOr<QueryTemplate> QueryTemplate::Parse(std::string_view json,
                                                   const InputLimits& limits) {
  if (static_cast<int64_t>(json.size()) > limits.max_query_bytes) {
    return absl::ResourceExhaustedError(
        absl::StrCat("template: ", json.size(), " bytes; the limit is ", limits.max_query_bytes));
  }
  if (!IsValidUtf8(json)) return Bad("not valid UTF-8");
  RETURN_IF_ERROR(CheckJsonShape(json));
  Struct doc;
  google::protobuf::util::JsonParseOptions options;
  const auto parsed = google::protobuf::util::JsonStringToMessage(
      google::protobuf::StringPiece(json.data(), json.size()), &doc, options);
  if (!parsed.ok()) return Bad(parsed.message().as_string());
  QueryTemplate t;
  t.text_ = std::string(json);
  ASSIGN_OR_RETURN(t.parameters_, ReadParameters(doc));
  absl::flat_hash_map<std::string, int> ids;
  for (size_t i = 0; i < t.parameters_.size(); ++i)
    ids[t.parameters_[i].name] = static_cast<int>(i);
  std::vector<bool> used(t.parameters_.size(), false);
  std::vector<bool> selectivity(t.parameters_.size(), false);
  // Each {"parameter": NAME} is replaced by its parameter's minimum.
  const auto bind = [&](const char* list, const char* field, bool rows) -> absl::Status {
    auto it = doc.mutable_fields()->find(list);
    if (it == doc.mutable_fields()->end() || !it->second.has_list_value()) return absl::OkStatus();
    auto* values = it->second.mutable_list_value()->mutable_values();
    for (int i = 0; i < values->size(); ++i) {
      if (!(*values)[i].has_struct_value()) continue;
      auto* fields = (*values)[i].mutable_struct_value()->mutable_fields();
      auto v = fields->find(field);
      if (v == fields->end() || !v->second.has_struct_value()) continue;
      const std::string at = absl::StrCat(list, "[", i, "].", field);
      const auto& ref = v->second.struct_value().fields();
      const auto name = ref.find("parameter");
      if (ref.size() != 1 || name == ref.end() || !name->second.has_string_value()) {
        return Bad(at + ": a number or {\"parameter\": NAME}");
      }
      const auto id = ids.find(name->second.string_value());
      if (id == ids.end()) {
        return Bad(absl::StrCat(at, ": unknown parameter \"",
                                ShortName(name->second.string_value()), "\""));
      }
      t.uses_.push_back({rows, i, id->second});
      used[id->second] = true;
      if (!rows) selectivity[id->second] = true;
      v->second.set_number_value(t.parameters_[id->second].min);
    }
    return absl::OkStatus();
  };
  RETURN_IF_ERROR(bind("relations", "rows", true));
  RETURN_IF_ERROR(bind("predicates", "selectivity", false));
  for (size_t i = 0; i < t.parameters_.size(); ++i) {
    const TemplateParameter& p = t.parameters_[i];
    if (!used[i]) {
      return Bad(
          absl::StrCat("parameters[", i, "] (", p.name, "): used by no rows or selectivity"));
    }
    if (selectivity[i] && p.max > 1) {
      return Bad(absl::StrCat("parameters[", i, "] (", p.name,
                              "): a selectivity's range must lie in (0, 1], got max ", p.max));
    }
  }
  doc.mutable_fields()->erase("parameters");
  std::string query_json;
  if (!google::protobuf::util::MessageToJsonString(doc, &query_json).ok()) {
    return absl::InternalError("template: cannot re-encode the query");
  }
  // The query at the minima is checked as any query file is.
  RETURN_IF_ERROR(ParseQueryJson(query_json, limits).status());
  if (!google::protobuf::util::JsonStringToMessage(query_json, &t.message_).ok()) {
    return absl::InternalError("template: cannot decode the query");
  }
  // And at the maxima (rows past their bound, say).
  std::vector<double> top;
  for (const TemplateParameter& p : t.parameters_) top.push_back(p.max);
  RETURN_IF_ERROR(t.At(top).status());
  return t;
}

absl::Status QueryTemplate::CheckRanges(std::span<const double> values) const {
  if (values.size() != parameters_.size()) {
    return absl::InvalidArgumentError(absl::StrCat("template: ", values.size(), " values for ",
                                                   parameters_.size(), " parameters"));
  }
  for (size_t i = 0; i < values.size(); ++i) {
    const TemplateParameter& p = parameters_[i];
    if (!(values[i] >= p.min && values[i] <= p.max)) {
      return absl::InvalidArgumentError(absl::StrCat(
          p.name, "=", values[i], ": outside the template's range [", p.min, ", ", p.max, "]"));
    }
  }
  return absl::OkStatus();
}

absl::StatusOr<Query> QueryTemplate::At(std::span<const double> values) const {
  RETURN_IF_ERROR(CheckRanges(values));
  v1::Query m = message_;
  for (const Use& u : uses_) {
    const double v = values[u.parameter];
    if (u.rows) {
      m.mutable_relations(u.index)->set_rows(v);
    } else {
      m.mutable_predicates(u.index)->set_selectivity(v);
    }
  }
  return QueryFromProto(m);
}

absl::StatusOr<std::vector<double>> QueryTemplate::Values(
    const std::vector<std::pair<std::string, double>>& named, const char* field) const {
  std::vector<double> out(parameters_.size(), 0);
  std::vector<bool> given(parameters_.size(), false);
  for (const auto& [name, value] : named) {
    size_t i = 0;
    while (i < parameters_.size() && parameters_[i].name != name) ++i;
    if (i == parameters_.size()) {
      return absl::InvalidArgumentError(
          absl::StrCat(field, ": unknown parameter \"", ShortName(name), "\""));
    }
    if (given[i])
      return absl::InvalidArgumentError(absl::StrCat(field, ": ", ShortName(name), " given twice"));
    given[i] = true;
    out[i] = value;
  }
  for (size_t i = 0; i < parameters_.size(); ++i) {
    if (!given[i]) {
      return absl::InvalidArgumentError(
          absl::StrCat(field, ": no value for parameter \"", parameters_[i].name, "\""));
    }
  }
  RETURN_IF_ERROR(CheckRanges(out));
  return out;
}

}  // namespace sliceplan
