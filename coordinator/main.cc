// sliceplan-coordinator: the service query engines call.
//
//   sliceplan-coordinator --listen=HOST:PORT --workers=HOST:PORT,...
#include <iostream>
#include <string>
#include <vector>

#include "absl/flags/flag.h"
#include "coordinator/coordinator_service.h"
#include "coordinator/worker_pool.h"
#include "rpc/serve.h"
#include "rpc/server_log.h"
#include "rpc/server_setup.h"
#include "rpc/tls.h"
#include "spdlog/spdlog.h"

ABSL_FLAG(std::string, listen, "127.0.0.1:0", "address to serve on (port 0: any free port)");
ABSL_FLAG(bool, insecure, false, "allow a plaintext listener on an address other than loopback");
ABSL_FLAG(std::string, health_listen, "",
          "also serve grpc.health.v1 alone, in plaintext, on HOST:PORT (for probes without TLS)");
ABSL_FLAG(std::string, metrics_listen, "",
          "serve Prometheus metrics as plaintext HTTP at http://HOST:PORT/metrics (empty: none)");
ABSL_FLAG(std::string, log_format, "text",
          "log lines on stderr as text, or json (one object per line, for log collectors)");
ABSL_FLAG(std::string, tls_cert, "", "PEM certificate to serve TLS with (with --tls-key)");
ABSL_FLAG(std::string, tls_key, "", "PEM private key of --tls-cert");
ABSL_FLAG(std::string, tls_ca, "",
          "PEM CA: clients must present a certificate it signed (mutual TLS)");
ABSL_FLAG(int, tls_reload_seconds, 10,
          "re-read the TLS files this often, in seconds, so rotated certificates need no restart "
          "(0: read once)");
ABSL_FLAG(std::string, workers, "",
          "worker addresses HOST:PORT,... (a name with many addresses gives many workers)");
ABSL_FLAG(double, hedge_after_seconds, 2.0,
          "start a second copy of a slice running this long (0: never hedge)");
ABSL_FLAG(int, health_interval_ms, 1000, "how often to check the workers' health");
ABSL_FLAG(int64_t, max_request_bytes, int64_t{16} << 20, "largest request accepted, in bytes");
ABSL_FLAG(int64_t, max_relations, 10000, "most relations per query");
ABSL_FLAG(int64_t, max_predicates, 100000, "most predicates per query");
ABSL_FLAG(int64_t, max_node_counts, 16, "most node counts a cluster-model request may list");
ABSL_FLAG(int64_t, max_sample_rates, 16, "most sample rates a cluster-model request may list");
ABSL_FLAG(int64_t, max_frontier_plans, 10000, "most plans of a Pareto set an answer returns");
ABSL_FLAG(double, max_deadline_seconds, 3600,
          "longest a request may run; a longer or absent deadline is cut to it");
ABSL_FLAG(double, default_budget_seconds, 10,
          "the time the auto and idp tiers plan for when a request gives no deadline");
ABSL_FLAG(int, max_concurrent_requests, 16, "requests run at once");
ABSL_FLAG(int, max_queued_requests, 64,
          "requests that may wait for a place; more are refused with RESOURCE_EXHAUSTED");
ABSL_FLAG(std::string, token_file, "",
          "bearer tokens, one per line; client calls without one are UNAUTHENTICATED");
ABSL_FLAG(double, shutdown_grace_seconds, 5,
          "on SIGTERM, how long running requests may go on before they are cancelled");

namespace {

int Refuse(const absl::Status& status) {
  std::cerr << "sliceplan-coordinator: " << status.message() << "\n";
  return 2;
}

absl::StatusOr<sliceplan::CoordinatorConfig> ConfigFromFlags() {
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
  limits.max_relations = absl::GetFlag(FLAGS_max_relations);
  limits.max_predicates = absl::GetFlag(FLAGS_max_predicates);
  limits.max_query_bytes = absl::GetFlag(FLAGS_max_request_bytes);
  limits.max_node_counts = absl::GetFlag(FLAGS_max_node_counts);
  limits.max_sample_rates = absl::GetFlag(FLAGS_max_sample_rates);
  limits.max_deadline_seconds = absl::GetFlag(FLAGS_max_deadline_seconds);
  limits.max_frontier_plans = absl::GetFlag(FLAGS_max_frontier_plans);
  if (!(limits.max_deadline_seconds > 0 && limits.max_deadline_seconds <= 1e7)) {
    return absl::InvalidArgumentError("--max_deadline_seconds: must be in (0, 1e7]");
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

}  // namespace

int main(int argc, char** argv) {
  sliceplan::BlockStopSignals();
  sliceplan::ParseServerCommandLine(
      argc, argv, "sliceplan-coordinator --listen=HOST:PORT --workers=HOST:PORT,...",
      "coordinator/main.cc");
  // Logs go to stderr: stdout carries only the announced addresses.
  const auto format = sliceplan::ParseLogFormat(absl::GetFlag(FLAGS_log_format));
  if (!format.ok()) return Refuse(format.status());
  sliceplan::SetUpServerLog(*format, "coordinator");
  const std::string listen = absl::GetFlag(FLAGS_listen);
  const bool insecure = absl::GetFlag(FLAGS_insecure);
  const sliceplan::TlsFiles tls{absl::GetFlag(FLAGS_tls_cert), absl::GetFlag(FLAGS_tls_key),
                                absl::GetFlag(FLAGS_tls_ca),
                                absl::GetFlag(FLAGS_tls_reload_seconds)};
  sliceplan::ServeOptions serve;
  serve.health_listen = absl::GetFlag(FLAGS_health_listen);
  serve.metrics_listen = absl::GetFlag(FLAGS_metrics_listen);
  if (auto s = sliceplan::PrepareListener(listen, tls, insecure, "coordinator", serve); !s.ok()) {
    return Refuse(s);
  }
  // Toward the workers the coordinator is a client: its own certificate as
  // its identity, the CA to verify them.
  auto worker_credentials = sliceplan::ChannelCredentialsFor(tls);
  if (!worker_credentials.ok()) return Refuse(worker_credentials.status());
  auto entries = sliceplan::ParseWorkerList(absl::GetFlag(FLAGS_workers));
  if (!entries.ok()) return Refuse(entries.status());
  auto config = ConfigFromFlags();
  if (!config.ok()) return Refuse(config.status());
  if (const std::string path = absl::GetFlag(FLAGS_token_file); !path.empty()) {
    auto tokens = sliceplan::BearerTokens::Load(path);
    if (!tokens.ok()) return Refuse(tokens.status());
    config->tokens = *std::move(tokens);
  }
  const double grace = absl::GetFlag(FLAGS_shutdown_grace_seconds);
  if (!(grace >= 0 && grace <= 3600)) {
    return Refuse(absl::InvalidArgumentError("--shutdown_grace_seconds: must be in [0, 3600]"));
  }
  sliceplan::WorkerPool pool(*entries,
                             std::chrono::milliseconds(absl::GetFlag(FLAGS_health_interval_ms)),
                             tls.any() ? *worker_credentials : nullptr);
  sliceplan::CoordinatorService service(pool, *config);
  spdlog::info("coordinator: {} worker entries, hedge after {:.1f} s", entries->size(),
               absl::GetFlag(FLAGS_hedge_after_seconds));
  serve.max_request_bytes = config->limits.max_query_bytes;
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
  serve.shutdown_grace = std::chrono::milliseconds(static_cast<int64_t>(grace * 1000));
  const auto status = sliceplan::Serve(listen, {&service}, serve);
  if (!status.ok()) {
    std::cerr << "sliceplan-coordinator: " << status.message() << "\n";
    return 1;
  }
  spdlog::info("coordinator: stopped");
  return 0;
}
