#include "rpc/callback_gauges.h"

#include <utility>

namespace sliceplan {

void CallbackGauges::Add(std::string name, std::string help, std::function<double()> value) {
  gauges_.push_back({std::move(name), std::move(help), std::move(value)});
}

std::vector<prometheus::MetricFamily> CallbackGauges::Collect() const {
  std::vector<prometheus::MetricFamily> out;
  out.reserve(gauges_.size());
  for (const Gauge& g : gauges_) {
    prometheus::MetricFamily family;
    family.name = g.name;
    family.help = g.help;
    family.type = prometheus::MetricType::Gauge;
    prometheus::ClientMetric metric;
    metric.gauge.value = g.value();
    family.metric.push_back(std::move(metric));
    out.push_back(std::move(family));
  }
  return out;
}

}  // namespace sliceplan
