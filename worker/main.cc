// sliceplan-worker: a stateless slice solver behind gRPC.
//
//   sliceplan-worker --listen=HOST:PORT [--threads=T] [--concurrent-slices=C]
//                    [--memo_limit_gib=G]
#include <iostream>
#include <string>
#include <thread>
#include <vector>

#include "absl/flags/flag.h"
#include "absl/strings/str_cat.h"
#include "core/search_options.h"
#include "rpc/serve.h"
#include "rpc/server_log.h"
#include "rpc/server_setup.h"
#include "rpc/tls.h"
#include "spdlog/spdlog.h"
#include "worker/worker_service.h"

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
ABSL_FLAG(int, threads, 0,
          "threads solving one slice together (0: the machine's cores over --concurrent-slices)");
ABSL_FLAG(int, concurrent_slices, 1, "slices solved at once");
ABSL_FLAG(double, memo_limit_gib, 8.0, "per-slice memo limit in GiB");
ABSL_FLAG(int64_t, max_request_bytes, int64_t{16} << 20, "largest request accepted, in bytes");
ABSL_FLAG(int64_t, max_relations, 10000, "most relations per query");
ABSL_FLAG(int64_t, max_predicates, 100000, "most predicates per query");
ABSL_FLAG(int64_t, max_node_counts, 16, "most node counts a cluster-model request may list");
ABSL_FLAG(int64_t, max_sample_rates, 16, "most sample rates a cluster-model request may list");
ABSL_FLAG(double, max_deadline_seconds, 3600,
          "longest a slice may run; a longer or absent deadline is cut to it");
ABSL_FLAG(double, shutdown_grace_seconds, 5,
          "on SIGTERM, how long running slices may go on before they are cancelled");
ABSL_FLAG(double, test_only_hang_seconds, 0,
          "test-only fault: sleep this long at the start of every call");
ABSL_FLAG(int64_t, test_only_crash_on_slice, -1,
          "test-only fault: abort the process when asked for this slice index (-1: never)");

namespace {

int Refuse(const std::string& message) {
  std::cerr << "sliceplan-worker: " << message << "\n";
  return 2;
}

}  // namespace

int main(int argc, char** argv) {
  sliceplan::BlockStopSignals();
  sliceplan::ParseServerCommandLine(
      argc, argv, "sliceplan-worker --listen=HOST:PORT [--threads=T] [--concurrent-slices=C]",
      "worker/main.cc");
  // Logs go to stderr: stdout carries only the announced addresses.
  const auto format = sliceplan::ParseLogFormat(absl::GetFlag(FLAGS_log_format));
  if (!format.ok()) return Refuse(std::string(format.status().message()));
  sliceplan::SetUpServerLog(*format, "worker");
  const std::string listen = absl::GetFlag(FLAGS_listen);
  const sliceplan::TlsFiles tls{absl::GetFlag(FLAGS_tls_cert), absl::GetFlag(FLAGS_tls_key),
                                absl::GetFlag(FLAGS_tls_ca),
                                absl::GetFlag(FLAGS_tls_reload_seconds)};
  sliceplan::ServeOptions serve;
  serve.health_listen = absl::GetFlag(FLAGS_health_listen);
  serve.metrics_listen = absl::GetFlag(FLAGS_metrics_listen);
  if (auto s =
          sliceplan::PrepareListener(listen, tls, absl::GetFlag(FLAGS_insecure), "worker", serve);
      !s.ok()) {
    return Refuse(std::string(s.message()));
  }
  sliceplan::WorkerConfig config;
  config.concurrent_slices = absl::GetFlag(FLAGS_concurrent_slices);
  if (config.concurrent_slices < 1 || config.concurrent_slices > 4096) {
    return Refuse("--concurrent-slices: must be in 1..4096");
  }
  config.threads_per_slice = absl::GetFlag(FLAGS_threads);
  if (config.threads_per_slice < 0 || config.threads_per_slice > sliceplan::kMaxSearchThreads) {
    return Refuse(absl::StrCat("--threads: must be in 0..", sliceplan::kMaxSearchThreads,
                               " (0: the cores over --concurrent-slices)"));
  }
  if (config.threads_per_slice == 0) {
    const int cores = static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
    config.threads_per_slice = std::max(1, cores / config.concurrent_slices);
  }
  const double gib = absl::GetFlag(FLAGS_memo_limit_gib);
  if (!(gib > 0 && gib < 1e6)) return Refuse("--memo_limit_gib must be in (0, 1e6)");
  config.memo_limit_bytes = static_cast<uint64_t>(gib * (uint64_t{1} << 30));
  config.limits.max_relations = absl::GetFlag(FLAGS_max_relations);
  config.limits.max_predicates = absl::GetFlag(FLAGS_max_predicates);
  config.limits.max_query_bytes = absl::GetFlag(FLAGS_max_request_bytes);
  config.limits.max_node_counts = absl::GetFlag(FLAGS_max_node_counts);
  config.limits.max_sample_rates = absl::GetFlag(FLAGS_max_sample_rates);
  config.limits.max_deadline_seconds = absl::GetFlag(FLAGS_max_deadline_seconds);
  if (!(config.limits.max_deadline_seconds > 0 && config.limits.max_deadline_seconds <= 1e7)) {
    return Refuse("--max_deadline_seconds: must be in (0, 1e7]");
  }
  const double grace = absl::GetFlag(FLAGS_shutdown_grace_seconds);
  if (!(grace >= 0 && grace <= 3600))
    return Refuse("--shutdown_grace_seconds: must be in [0, 3600]");
  config.test_hang_seconds = absl::GetFlag(FLAGS_test_only_hang_seconds);
  config.test_crash_slice = absl::GetFlag(FLAGS_test_only_crash_on_slice);
  sliceplan::WorkerService service(config);
  spdlog::info("worker: {} slice{} at once on {} thread{} each, memo limit {:.1f} GiB{}",
               config.concurrent_slices, config.concurrent_slices == 1 ? "" : "s",
               config.threads_per_slice, config.threads_per_slice == 1 ? "" : "s", gib,
               config.test_hang_seconds > 0 ? " (test fault: hanging)" : "");
  serve.max_request_bytes = config.limits.max_query_bytes;
  serve.metrics = service.MetricsCollectables();
  serve.shutdown_grace = std::chrono::milliseconds(static_cast<int64_t>(grace * 1000));
  const auto status = sliceplan::Serve(listen, {&service}, serve);
  if (!status.ok()) {
    std::cerr << "sliceplan-worker: " << status.message() << "\n";
    return 1;
  }
  spdlog::info("worker: stopped");
  return 0;
}
