#include "core/cost/plan_choice.h"

#include <cmath>
#include <cstdlib>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"
#include "core/model/user_text.h"

namespace sliceplan {
namespace {

std::optional<Metric> MetricNamed(absl::string_view name) {
  if (name == "latency_s") return Metric::kLatency;
  if (name == "node_seconds") return Metric::kNodeSeconds;
  if (name == "completeness") return Metric::kCompleteness;
  return std::nullopt;
}

std::optional<double> Number(absl::string_view text) {
  const std::string s(text);
  char* end = nullptr;
  const double v = std::strtod(s.c_str(), &end);
  if (s.empty() || *end != '\0' || !std::isfinite(v)) return std::nullopt;
  return v;
}

}  // namespace

std::string MetricLabel(Metric m) {
  switch (m) {
    case Metric::kLatency:
      return "latency_s";
    case Metric::kNodeSeconds:
      return "node_seconds";
    case Metric::kCompleteness:
      return "completeness";
  }
  return "?";
}

double MetricValue(const ClusterCosts& c, Metric m) {
  switch (m) {
    case Metric::kLatency:
      return c.latency_s;
    case Metric::kNodeSeconds:
      return c.node_seconds;
    case Metric::kCompleteness:
      return c.completeness;
  }
  return 0;
}

absl::StatusOr<Bound> ParseBound(const std::string& text) {
  for (const char* op : {"<=", ">="}) {
    const size_t at = text.find(op);
    if (at == std::string::npos) continue;
    const auto metric = MetricNamed(absl::string_view(text).substr(0, at));
    const auto value = Number(absl::string_view(text).substr(at + 2));
    if (!metric) {
      return absl::InvalidArgumentError(
          absl::StrCat("bound: \"", ShortName(text),
                       "\" names no metric (latency_s, node_seconds, completeness)"));
    }
    if (!value)
      return absl::InvalidArgumentError(
          absl::StrCat("bound: \"", ShortName(text), "\" has no number"));
    return Bound{*metric, op[0] == '<', *value};
  }
  return absl::InvalidArgumentError(
      absl::StrCat("bound: \"", ShortName(text), "\" is not METRIC<=VALUE or METRIC>=VALUE"));
}

absl::StatusOr<Preference> ParsePreference(const std::string& text) {
  if (const auto m = MetricNamed(text)) return Preference::Best(*m);
  const std::string prefix = "weights:";
  if (text.rfind(prefix, 0) != 0) {
    return absl::InvalidArgumentError(absl::StrCat(
        "prefer: \"", ShortName(text), "\" is neither a metric nor weights:METRIC=W,..."));
  }
  Preference p{0, 0, 0};
  uint8_t seen = 0;
  for (absl::string_view part : absl::StrSplit(text.substr(prefix.size()), ',')) {
    const std::vector<absl::string_view> kv = absl::StrSplit(part, '=');
    const auto metric = kv.size() == 2 ? MetricNamed(kv[0]) : std::nullopt;
    const auto weight = kv.size() == 2 ? Number(kv[1]) : std::nullopt;
    if (!metric || !weight || *weight < 0) {
      return absl::InvalidArgumentError(
          absl::StrCat("prefer: \"", ShortName(std::string_view(part.data(), part.size())),
                       "\" is not METRIC=WEIGHT with a weight >= 0"));
    }
    const uint8_t bit = static_cast<uint8_t>(1u << static_cast<int>(*metric));
    if ((seen & bit) != 0) {
      return absl::InvalidArgumentError(
          absl::StrCat("prefer: ", MetricLabel(*metric), " is weighted twice"));
    }
    seen |= bit;
    if (*metric == Metric::kLatency) p.latency = *weight;
    if (*metric == Metric::kNodeSeconds) p.node_seconds = *weight;
    if (*metric == Metric::kCompleteness) p.incompleteness = *weight;
  }
  return p;
}

std::optional<size_t> ChoosePlan(const std::vector<ClusterCosts>& frontier,
                                 const ChoiceRule& rule) {
  std::optional<size_t> best;
  for (size_t i = 0; i < frontier.size(); ++i) {
    bool ok = true;
    for (const Bound& b : rule.bounds) {
      const double v = MetricValue(frontier[i], b.metric);
      ok = ok && (b.at_most ? v <= b.value : v >= b.value);
    }
    if (ok && (!best || rule.prefer.Score(frontier[i]) < rule.prefer.Score(frontier[*best]))) {
      best = i;
    }
  }
  return best;
}

}  // namespace sliceplan
