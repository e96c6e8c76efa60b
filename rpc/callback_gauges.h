// Gauges read at scrape time: each is a name, a help text and a function
// that returns the value now (the pool's healthy workers, the requests
// waiting), so nothing has to push the value whenever it changes. A
// Prometheus collectable; register it with the metrics endpoint.
// Thread-safe once built: Collect runs on the endpoint's threads, and the
// functions must be safe to call from them.
#ifndef SLICEPLAN_RPC_CALLBACK_GAUGES_H_
#define SLICEPLAN_RPC_CALLBACK_GAUGES_H_

#include <functional>
#include <string>
#include <vector>

#include "prometheus/collectable.h"
#include "prometheus/metric_family.h"

namespace sliceplan {

class CallbackGauges final : public prometheus::Collectable {
 public:
  // Adds a gauge; call before the first scrape. `name` must be a valid
  // metric name (the project's own, prefixed sliceplan_).
  void Add(std::string name, std::string help, std::function<double()> value);

  std::vector<prometheus::MetricFamily> Collect() const override;

 private:
  struct Gauge {
    std::string name;
    std::string help;
    std::function<double()> value;
  };
  std::vector<Gauge> gauges_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_CALLBACK_GAUGES_H_
