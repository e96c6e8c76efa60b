// Prepared queries against their targets (docs/templates.md): a
// 14-relation template (a random join graph, tests/support/test_queries.h,
// seed 5) with two parameters spanning four decades each (relation 0's rows
// and predicate 0's selectivity), a 16 x 16 grid, max-ratio 1.2, 2 workers:
// prepare's wall time and stored plans; choose's time in process (mean of
// 10,000 calls); and at 1,000 random points inside the box, the chosen
// plan's cost over a fresh exact optimum there (p50, p99, worst). Not a
// test; run by hand:
//   build/bench/template_bench [WORKER_BIN COORDINATOR_BIN]
// With the binaries it also prepares over a local coordinator and times
// ChooseTemplatePlan over loopback RPC.
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <random>
#include <string>
#include <vector>

#include "absl/strings/str_cat.h"
#include "cli/rpc_client.h"
#include "core/slice_solver.h"
#include "grpcpp/grpcpp.h"
#include "sliceplan.grpc.pb.h"
#include "templates/template_prepare.h"
#include "tests/support/process.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using Clock = std::chrono::steady_clock;

// The template of `q` with relation `rows_param`'s rows a parameter over
// [rows_min, rows_max] and, when `sel_param` >= 0, that predicate's
// selectivity over [1e-6, 1e-2]; else relation `second`'s rows over
// [rows_min, rows_max] too.
struct Shape {
  int rows_param = 0;
  double rows_min = 1e4, rows_max = 1e8;
  int sel_param = 0;  // or -1
  int second = -1;    // with sel_param < 0
};

std::string TemplateJson(const Query& q, const Shape& shape) {
  std::string out = "{\"relations\": [";
  for (int i = 0; i < q.size(); ++i) {
    const Relation& r = q.relation(RelationId{static_cast<uint8_t>(i)});
    const char* param = i == shape.rows_param ? "a_rows" : i == shape.second ? "b_rows" : nullptr;
    absl::StrAppend(&out, i ? ", " : "", "{\"name\": \"", r.name, "\", \"rows\": ",
                    param ? absl::StrCat("{\"parameter\": \"", param, "\"}") : absl::StrCat(r.rows),
                    "}");
  }
  out += "], \"predicates\": [";
  for (size_t j = 0; j < q.predicates().size(); ++j) {
    const Predicate& p = q.predicates()[j];
    std::string names;
    ForEachMember(p.relations, [&](RelationId r) {
      absl::StrAppend(&names, names.empty() ? "" : ", ", "\"", q.relation(r).name, "\"");
    });
    absl::StrAppend(&out, j ? ", " : "", "{\"relations\": [", names, "], \"selectivity\": ",
                    static_cast<int>(j) == shape.sel_param
                        ? std::string("{\"parameter\": \"since\"}")
                        : absl::StrCat(p.selectivity),
                    "}");
  }
  absl::StrAppend(&out, "], \"parameters\": [{\"name\": \"a_rows\", \"min\": ", shape.rows_min,
                  ", \"max\": ", shape.rows_max, "}, ",
                  shape.sel_param >= 0
                      ? std::string("{\"name\": \"since\", \"min\": 1e-6, \"max\": 1e-2}")
                      : absl::StrCat("{\"name\": \"b_rows\", \"min\": ", shape.rows_min,
                                     ", \"max\": ", shape.rows_max, "}"),
                  "]}");
  return out;
}

double Quantile(std::vector<double> v, double q) {
  std::sort(v.begin(), v.end());
  return v[static_cast<size_t>(q * static_cast<double>(v.size() - 1))];
}

// A value inside the box, log-uniform per parameter.
std::vector<double> Draw(const QueryTemplate& t, std::mt19937_64& rng) {
  std::uniform_real_distribution<double> u(0, 1);
  std::vector<double> v;
  for (const TemplateParameter& p : t.parameters())
    v.push_back(p.min * std::pow(p.max / p.min, u(rng)));
  return v;
}

// prepare at three ratios, choose's time in process, and the chosen plan
// over a fresh exact optimum at 1,000 random points.
int Measure(const char* name, const QueryTemplate& t) {
  std::printf("== %s\n", name);
  PrepareOptions options;
  options.grid = 16;
  options.workers = 2;
  absl::StatusOr<PreparedPlans> prepared;
  std::mt19937_64 rng(7);
  const std::vector<double> fixed = Draw(t, rng);
  for (double ratio : {1.0, 1.01, 1.2}) {  // the last one is measured below
    options.max_ratio = ratio;
    prepared = PrepareTemplate(t, options);
    if (!prepared.ok()) {
      std::fprintf(stderr, "%s\n", prepared.status().ToString().c_str());
      return 1;
    }
    std::printf(
        "prepare, max-ratio %.2f: %zu grid points in %.2f s, %zu distinct optima, %zu plans "
        "kept, worst ratio on the grid %.4f, bound in the box %.4g\n",
        ratio, prepared->grid_points, prepared->seconds, prepared->distinct_optima,
        prepared->plans.size(), prepared->worst_ratio, prepared->box_ratio_bound.value_or(0));
    constexpr int kCalls = 10000;
    const auto start = Clock::now();
    double sink = 0;
    for (int i = 0; i < kCalls; ++i) {
      sink += ChooseStoredPlan(t, *prepared, fixed, false)->plan.root().cost;
    }
    const double per_call = std::chrono::duration<double>(Clock::now() - start).count() / kCalls;
    std::printf("  choose: %.1f us per call in process (%zu stored plans)%s\n", per_call * 1e6,
                prepared->plans.size(), sink > 0 ? "" : " ");
    if (prepared->plans.size() > 12) {  // the target's count: the first 12
      PreparedPlans twelve = *prepared;
      twelve.plans.resize(12);
      twelve.plan_worst.resize(12);
      const auto t12 = Clock::now();
      for (int i = 0; i < kCalls; ++i) {
        sink += ChooseStoredPlan(t, twelve, fixed, false)->plan.root().cost;
      }
      std::printf("  choose: %.1f us per call in process (12 of them)%s\n",
                  std::chrono::duration<double>(Clock::now() - t12).count() / kCalls * 1e6,
                  sink > 0 ? "" : " ");
    }
  }
  std::vector<double> ratios;
  for (int i = 0; i < 1000; ++i) {
    const std::vector<double> v = Draw(t, rng);
    const double chosen = ChooseStoredPlan(t, *prepared, v, false)->plan.root().cost;
    SearchControl control;
    auto exact = SolveSlice(*t.At(v), SearchOptions{}, {0, 1}, control);
    ratios.push_back(chosen / exact->plan->root().cost);
  }
  std::printf("1,000 random points: chosen over the exact optimum p50 %.4f, p99 %.4f, worst %.4f\n",
              Quantile(ratios, 0.5), Quantile(ratios, 0.99), Quantile(ratios, 1.0));
  return 0;
}

// Over loopback RPC: prepare on 2 workers through the coordinator, then
// 5,000 ChooseTemplatePlan calls on one channel (latency p50, p99).
int MeasureRpc(const QueryTemplate& t, const char* worker_bin, const char* coordinator_bin) {
  std::vector<std::unique_ptr<testing::ServerProcess>> workers;
  std::string list;
  for (int i = 0; i < 2; ++i) {
    auto p = testing::ServerProcess::Start({worker_bin, "--listen=127.0.0.1:0", "--threads=1"});
    if (!p.ok()) return 1;
    list += (list.empty() ? "" : ",") + (*p)->address();
    workers.push_back(*std::move(p));
  }
  auto coordinator =
      testing::ServerProcess::Start({coordinator_bin, "--listen=127.0.0.1:0", "--workers=" + list});
  if (!coordinator.ok()) return 1;
  v1::PrepareTemplateRequest request;
  request.set_template_json(t.text());
  request.set_grid(16);
  request.set_max_ratio(1.2);
  const auto start = Clock::now();
  auto prepared = cli::PrepareRemote({(*coordinator)->address(), {}, ""}, request, {});
  const double wall = std::chrono::duration<double>(Clock::now() - start).count();
  if (!prepared.ok()) {
    std::fprintf(stderr, "%s\n", prepared.status().ToString().c_str());
    return 1;
  }
  std::printf("== over loopback RPC, 2 workers\nprepare: %.2f s wall, %u plans kept\n", wall,
              prepared->report().stored_plans());
  auto stub = v1::Coordinator::NewStub(
      grpc::CreateChannel((*coordinator)->address(), grpc::InsecureChannelCredentials()));
  std::mt19937_64 rng(9);
  std::vector<double> latency;
  for (int i = 0; i < 5200; ++i) {
    v1::ChooseTemplatePlanRequest choose;
    choose.set_template_id(prepared->template_id());
    const std::vector<double> v = Draw(t, rng);
    for (size_t k = 0; k < v.size(); ++k) {
      auto* value = choose.add_values();
      value->set_name(t.parameters()[k].name);
      value->set_value(v[k]);
    }
    grpc::ClientContext context;
    v1::ChooseTemplatePlanResponse response;
    const auto t0 = Clock::now();
    const grpc::Status status = stub->ChooseTemplatePlan(&context, choose, &response);
    const double s = std::chrono::duration<double>(Clock::now() - t0).count();
    if (!status.ok()) {
      std::fprintf(stderr, "choose: %s\n", status.error_message().c_str());
      return 1;
    }
    if (i >= 200) latency.push_back(s);  // the first 200 warm the channel
  }
  std::printf("ChooseTemplatePlan: p50 %.0f us, p99 %.0f us over 5,000 calls\n",
              Quantile(latency, 0.5) * 1e6, Quantile(latency, 0.99) * 1e6);
  return 0;
}

}  // namespace
}  // namespace sliceplan

int main(int argc, char** argv) {
  using namespace sliceplan;
  const Query base = testing::MakeQuery(testing::GraphShape::kRandom, 14, 5);
  auto easy = QueryTemplate::Parse(TemplateJson(base, {}));
  Shape two_tables;
  two_tables.rows_param = 0;
  two_tables.second = 13;
  two_tables.sel_param = -1;
  two_tables.rows_min = 1e2;
  two_tables.rows_max = 1e6;
  auto hard = QueryTemplate::Parse(TemplateJson(base, two_tables));
  if (!easy.ok() || !hard.ok()) {
    std::fprintf(stderr, "template refused\n");
    return 1;
  }
  if (Measure("relation 0's rows [1e4, 1e8] and predicate 0's selectivity [1e-6, 1e-2]", *easy) ||
      Measure("relations 0 and 13's rows, each [1e2, 1e6]", *hard)) {
    return 1;
  }
  if (argc == 3) return MeasureRpc(*hard, argv[1], argv[2]);
  return 0;
}
