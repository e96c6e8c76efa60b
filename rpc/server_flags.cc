#include "rpc/server_flags.h"

#include <chrono>
#include <cstdint>

#include "absl/flags/flag.h"
#include "core/model/status_macros.h"
#include "rpc/server_log.h"
#include "rpc/server_setup.h"

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
ABSL_FLAG(int64_t, max_request_bytes, int64_t{16} << 20, "largest request accepted, in bytes");
ABSL_FLAG(int64_t, max_relations, 10000, "most relations per query");
ABSL_FLAG(int64_t, max_predicates, 100000, "most predicates per query");
ABSL_FLAG(int64_t, max_cardinalities, 1000000,
          "most listed row estimates (cardinalities) per query; raise --max_request_bytes with it");
ABSL_FLAG(int64_t, max_node_counts, 16, "most node counts a cluster-model request may list");
ABSL_FLAG(int64_t, max_sample_rates, 16, "most sample rates a cluster-model request may list");
ABSL_FLAG(double, max_deadline_seconds, 3600,
          "longest a call may run; a longer or absent deadline is cut to it");
ABSL_FLAG(double, shutdown_grace_seconds, 5,
          "on SIGTERM, how long running calls may go on before they are cancelled");

namespace sliceplan {

absl::StatusOr<ServerFlags> ReadServerFlags(const char* server) {
  ASSIGN_OR_RETURN(const LogFormat format, ParseLogFormat(absl::GetFlag(FLAGS_log_format)));
  SetUpServerLog(format, server);
  ServerFlags out;
  out.listen = absl::GetFlag(FLAGS_listen);
  out.tls = {absl::GetFlag(FLAGS_tls_cert), absl::GetFlag(FLAGS_tls_key),
             absl::GetFlag(FLAGS_tls_ca), absl::GetFlag(FLAGS_tls_reload_seconds)};
  out.serve.health_listen = absl::GetFlag(FLAGS_health_listen);
  out.serve.metrics_listen = absl::GetFlag(FLAGS_metrics_listen);
  RETURN_IF_ERROR(
      PrepareListener(out.listen, out.tls, absl::GetFlag(FLAGS_insecure), server, out.serve));
  InputLimits& limits = out.limits;
  limits.max_relations = absl::GetFlag(FLAGS_max_relations);
  limits.max_predicates = absl::GetFlag(FLAGS_max_predicates);
  limits.max_cardinalities = absl::GetFlag(FLAGS_max_cardinalities);
  limits.max_query_bytes = absl::GetFlag(FLAGS_max_request_bytes);
  limits.max_node_counts = absl::GetFlag(FLAGS_max_node_counts);
  limits.max_sample_rates = absl::GetFlag(FLAGS_max_sample_rates);
  limits.max_deadline_seconds = absl::GetFlag(FLAGS_max_deadline_seconds);
  if (!(limits.max_deadline_seconds > 0 && limits.max_deadline_seconds <= 1e7)) {
    return absl::InvalidArgumentError("--max_deadline_seconds: must be in (0, 1e7]");
  }
  const double grace = absl::GetFlag(FLAGS_shutdown_grace_seconds);
  if (!(grace >= 0 && grace <= 3600)) {
    return absl::InvalidArgumentError("--shutdown_grace_seconds: must be in [0, 3600]");
  }
  out.serve.shutdown_grace = std::chrono::milliseconds(static_cast<int64_t>(grace * 1000));
  out.serve.max_request_bytes = limits.max_query_bytes;
  return out;
}

}  // namespace sliceplan
