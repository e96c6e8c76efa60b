// sliceplan-coordinator: the service query engines call.
//
//   sliceplan-coordinator --listen=HOST:PORT --workers=HOST:PORT,...
#include <iostream>
#include <string>
#include <vector>

#include "absl/flags/flag.h"
#include "absl/strings/str_cat.h"
#include "coordinator/coordinator_service.h"
#include "coordinator/worker_pool.h"
#include "rpc/serve.h"
#include "rpc/server_flags.h"
#include "rpc/server_setup.h"
#include "rpc/tls.h"
#include "spdlog/spdlog.h"

ABSL_FLAG(std::string, workers, "",
          "worker addresses HOST:PORT,... (a name with many addresses gives many workers)");
ABSL_FLAG(double, hedge_after_seconds, 2.0,
          "start a second copy of a slice running this long (0: never hedge)");
ABSL_FLAG(int, health_interval_ms, 1000, "how often to check the workers' health");
ABSL_FLAG(int64_t, max_frontier_plans, 10000, "most plans of a Pareto set an answer returns");
ABSL_FLAG(int64_t, max_response_bytes, int64_t{4} << 20,
          "largest answer sent, in bytes (gRPC clients receive 4 MiB unless raised)");
ABSL_FLAG(double, default_budget_seconds, 10,
          "the time the auto and idp tiers plan for when a request gives no deadline");
ABSL_FLAG(int, max_concurrent_requests, 16, "requests run at once");
ABSL_FLAG(int, max_queued_requests, 64,
          "requests that may wait for a place; more are refused with RESOURCE_EXHAUSTED");
ABSL_FLAG(std::string, plan_store, "",
          "SQLite file keeping prepared templates across restarts (created if absent; "
          "empty: in memory only)");
ABSL_FLAG(int64_t, max_templates, 1000, "prepared templates kept at once");
ABSL_FLAG(int64_t, max_grid_points, 4096, "grid points one template prepare optimizes");
ABSL_FLAG(std::string, token_file, "",
          "bearer tokens, one per line; client calls without one are UNAUTHENTICATED");

namespace {

int Refuse(const absl::Status& status) {
  std::cerr << "sliceplan-coordinator: " << status.message() << "\n";
  return 2;
}

absl::StatusOr<sliceplan::CoordinatorConfig> ConfigFromFlags(
    const sliceplan::InputLimits& shared_limits) {
  sliceplan::CoordinatorConfig config;
  const double hedge = absl::GetFlag(FLAGS_hedge_after_seconds);
  if (!(hedge >= 0 && hedge < 1e6)) {
    return absl::InvalidArgumentError("--hedge_after_seconds: must be in [0, 1e6)");
  }
  if (hedge > 0) {
    config.hedge_after = std::chrono::milliseconds(static_cast<int64_t>(hedge * 1000));
  } else {
    config.hedge_after.reset();
  }
  sliceplan::InputLimits& limits = config.limits;
  limits = shared_limits;
  limits.max_frontier_plans = absl::GetFlag(FLAGS_max_frontier_plans);
  config.max_response_bytes = absl::GetFlag(FLAGS_max_response_bytes);
  if (config.max_response_bytes < 1024 || config.max_response_bytes > (int64_t{64} << 20)) {
    return absl::InvalidArgumentError("--max_response_bytes: must be in 1024..67108864");
  }
  config.default_budget_seconds = absl::GetFlag(FLAGS_default_budget_seconds);
  if (!(config.default_budget_seconds > 0 &&
        config.default_budget_seconds <= limits.max_deadline_seconds)) {
    return absl::InvalidArgumentError(
        "--default_budget_seconds: must be in (0, --max_deadline_seconds]");
  }
  config.max_concurrent_requests = absl::GetFlag(FLAGS_max_concurrent_requests);
  config.max_queued_requests = absl::GetFlag(FLAGS_max_queued_requests);
  if (config.max_concurrent_requests < 1 || config.max_queued_requests < 0) {
    return absl::InvalidArgumentError(
        "--max_concurrent_requests: must be >= 1; --max_queued_requests: >= 0");
  }
  return config;
}

// The prepared templates: the plan store's, loaded, or an empty desk.
absl::StatusOr<std::unique_ptr<sliceplan::TemplateDesk>> OpenTemplates() {
  sliceplan::TemplateLimits limits;
  const int64_t templates = absl::GetFlag(FLAGS_max_templates);
  const int64_t points = absl::GetFlag(FLAGS_max_grid_points);
  if (templates < 1 || templates > 1000000) {
    return absl::InvalidArgumentError("--max_templates: must be in 1..1000000");
  }
  if (points < 1 || points > static_cast<int64_t>(sliceplan::kMaxGridPoints)) {
    return absl::InvalidArgumentError(
        absl::StrCat("--max_grid_points: must be in 1..", sliceplan::kMaxGridPoints));
  }
  limits.max_templates = static_cast<size_t>(templates);
  limits.max_grid_points = static_cast<size_t>(points);
  std::unique_ptr<sliceplan::PlanStore> store;
  if (const std::string path = absl::GetFlag(FLAGS_plan_store); !path.empty()) {
    auto opened = sliceplan::PlanStore::Open(path);
    if (!opened.ok()) return opened.status();
    store = *std::move(opened);
  }
  auto desk = sliceplan::TemplateDesk::Open(std::move(store), limits);
  if (desk.ok() && !absl::GetFlag(FLAGS_plan_store).empty()) {
    spdlog::info("coordinator: {} prepared templates loaded from {}", (*desk)->size(),
                 absl::GetFlag(FLAGS_plan_store));
  }
  return desk;
}

}  // namespace

int main(int argc, char** argv) {
  sliceplan::BlockStopSignals();
  sliceplan::ParseServerCommandLine(
      argc, argv, "sliceplan-coordinator --listen=HOST:PORT --workers=HOST:PORT,...",
      "coordinator/main.cc");
  // Logs go to stderr: stdout carries only the announced addresses.
  auto flags = sliceplan::ReadServerFlags("coordinator");
  if (!flags.ok()) return Refuse(flags.status());
  const sliceplan::TlsFiles& tls = flags->tls;
  sliceplan::ServeOptions& serve = flags->serve;
  // Toward the workers the coordinator is a client: its own certificate as
  // its identity, the CA to verify them.
  auto worker_credentials = sliceplan::ChannelCredentialsFor(tls);
  if (!worker_credentials.ok()) return Refuse(worker_credentials.status());
  auto entries = sliceplan::ParseWorkerList(absl::GetFlag(FLAGS_workers));
  if (!entries.ok()) return Refuse(entries.status());
  auto config = ConfigFromFlags(flags->limits);
  if (!config.ok()) return Refuse(config.status());
  if (const std::string path = absl::GetFlag(FLAGS_token_file); !path.empty()) {
    auto tokens = sliceplan::BearerTokens::Load(path);
    if (!tokens.ok()) return Refuse(tokens.status());
    config->tokens = *std::move(tokens);
  }
  sliceplan::WorkerPool pool(*entries,
                             std::chrono::milliseconds(absl::GetFlag(FLAGS_health_interval_ms)),
                             tls.any() ? *worker_credentials : nullptr);
  auto templates = OpenTemplates();
  if (!templates.ok()) return Refuse(templates.status());
  sliceplan::CoordinatorService service(pool, *config, *std::move(templates));
  spdlog::info("coordinator: {} worker entries, hedge after {:.1f} s", entries->size(),
               absl::GetFlag(FLAGS_hedge_after_seconds));
  serve.metrics = service.MetricsCollectables();
  if (const std::string path = absl::GetFlag(FLAGS_token_file); !path.empty()) {
    serve.on_reload = [&service, path] {  // SIGHUP: re-read the token file
      auto tokens = sliceplan::BearerTokens::Load(path);
      if (!tokens.ok()) {
        spdlog::error("coordinator: kept the old tokens: {}",
                      std::string(tokens.status().message()));
        return;
      }
      service.SetTokens(*std::move(tokens));
      spdlog::info("coordinator: re-read {}", path);
    };
  }
  const auto status = sliceplan::Serve(flags->listen, {&service}, serve);
  if (!status.ok()) {
    std::cerr << "sliceplan-coordinator: " << status.message() << "\n";
    return 1;
  }
  spdlog::info("coordinator: stopped");
  return 0;
}
