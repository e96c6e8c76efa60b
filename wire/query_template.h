// A prepared query's template: a query whose `rows` or `selectivity` values
// may be parameters, `{"parameter": NAME}`, each with a range
// (docs/interfaces.md; docs/templates.md). The template is validated once;
// At() gives the query at given values.
//
// Immutable once parsed; thread-safe.
#ifndef SLICEPLAN_WIRE_QUERY_TEMPLATE_H_
#define SLICEPLAN_WIRE_QUERY_TEMPLATE_H_

#include <span>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "absl/status/statusor.h"
#include "core/model/input_limits.h"
#include "core/model/query.h"
#include "query.pb.h"

namespace sliceplan {

// The most parameters a template may have (a grid of G points per
// parameter has G^d points).
inline constexpr int kMaxTemplateParameters = 8;

struct TemplateParameter {
  std::string name;
  double min = 0;  // > 0, finite
  double max = 0;  // >= min, finite; <= 1 for a selectivity
};

class QueryTemplate {
 public:
  // Parses and validates a template (the query file's JSON with
  // `parameters`). INVALID_ARGUMENT naming the field: everything a query
  // file is refused for (its values at the parameters' minima), a
  // parameter reference that is not {"parameter": NAME} or names no
  // parameter, a parameter named twice or never used, a range that is not
  // finite, not > 0, min > max, or outside (0, 1] where a selectivity
  // uses it; no parameter at all; more than kMaxTemplateParameters or
  // more than 64 relations.
  static absl::StatusOr<QueryTemplate> Parse(std::string_view json, const InputLimits& limits = {});

  std::span<const TemplateParameter> parameters() const { return parameters_; }
  // The JSON the template was parsed from.
  const std::string& text() const { return text_; }

  // The query with parameter i at values[i]. INVALID_ARGUMENT naming the
  // parameter when a value lies outside its range (or the count differs).
  absl::StatusOr<Query> At(std::span<const double> values) const;
  // The values in parameter order from NAME=VALUE pairs. INVALID_ARGUMENT
  // naming an unknown or repeated name, a missing one, or a value outside
  // its range, after `field` (the CLI's flag, the RPC's field).
  absl::StatusOr<std::vector<double>> Values(
      const std::vector<std::pair<std::string, double>>& named, const char* field = "--set") const;

 private:
  struct Use {
    bool rows = true;  // relations[index].rows, else predicates[index].selectivity
    int index = 0;
    int parameter = 0;
  };

  // INVALID_ARGUMENT naming a value outside its range (or a wrong count).
  absl::Status CheckRanges(std::span<const double> values) const;

  v1::Query message_;  // the query with each parameter's minimum in place
  std::vector<Use> uses_;
  std::vector<TemplateParameter> parameters_;
  std::string text_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_WIRE_QUERY_TEMPLATE_H_
