// Running a gRPC server the way both sliceplan servers do: health checking
// (grpc.health.v1) and reflection on, exactly one listening socket, the
// bound address printed as "listening on HOST:PORT" on stdout (port 0
// picks a free one, which tests and the local-cluster script read back),
// and a bounded, clean shutdown on SIGINT or SIGTERM.
#ifndef SLICEPLAN_RPC_SERVE_H_
#define SLICEPLAN_RPC_SERVE_H_

#include <chrono>
#include <cstdint>
#include <functional>
#include <memory>
#include <string>
#include <vector>

#include "absl/status/status.h"
#include "grpcpp/grpcpp.h"
#include "prometheus/collectable.h"

namespace sliceplan {

// Blocks SIGINT, SIGTERM and SIGHUP in the calling thread (and the threads it
// starts later). Call first in main, before any thread exists.
void BlockStopSignals();

// INVALID_ARGUMENT naming `flag` unless `address` is HOST:PORT (or
// [V6]:PORT) with a port of decimal digits in 0..65535.
absl::Status ValidateListenAddress(const std::string& address, const char* flag = "--listen");

// True when `address` (HOST:PORT) names a loopback host: localhost,
// 127.0.0.0/8 or ::1. Anything else, the wildcard 0.0.0.0 and [::]
// included, is reachable from other hosts.
bool IsLoopbackAddress(const std::string& address);

// FAILED_PRECONDITION naming the address when `listen` is off-host and
// `allow_off_host` is false (no TLS, no --insecure). Mains call it before
// they start anything, so the refusal comes first.
absl::Status CheckPlaintextAllowed(const std::string& listen, bool allow_off_host);

struct ServeOptions {
  // A plaintext listener on an address other than loopback is refused
  // (FAILED_PRECONDITION) unless this is set (the servers' --insecure
  // flag), and then logged.
  bool allow_plaintext_off_host = false;
  // TLS (rpc/tls.h); null: plaintext. A TLS server may listen anywhere.
  std::shared_ptr<grpc::ServerCredentials> credentials;
  // Largest request accepted (gRPC's receive limit); larger ones fail with
  // RESOURCE_EXHAUSTED before they are parsed.
  int64_t max_request_bytes = int64_t{16} << 20;
  // Threads the server may run calls on (gRPC's resource quota); 0: its
  // default. Each call a thread serves holds its parsed request, so this
  // bounds the memory of a flood of large calls; a call past it is
  // refused by gRPC (RESOURCE_EXHAUSTED "Server Threadpool Exhausted",
  // which the coordinator takes as busy).
  int max_threads = 0;
  // With max_threads: the bytes gRPC may hold for calls (its memory
  // quota; reading stops past it); 0: unbounded.
  int64_t max_buffer_bytes = 0;
  // On a stop signal: stop accepting calls, let running ones finish for
  // this long (their answers are delivered), then cancel the rest.
  std::chrono::milliseconds shutdown_grace{5000};
  // Runs after the stop signal, before the shutdown (e.g. to end
  // background threads).
  std::function<void()> on_stop;
  // Runs on each SIGHUP (e.g. to re-read the token file); serving goes on.
  std::function<void()> on_reload;
  // HOST:PORT of a second, plaintext listener serving grpc.health.v1 only
  // (empty: none), for probes that cannot speak TLS (Kubernetes' built-in
  // gRPC probe). It tells whether the server is up and nothing else, so it
  // may listen off-host; it is announced as "health on HOST:PORT" after
  // the listening line and stops with the server.
  std::string health_listen;
  // HOST:PORT of a plaintext HTTP listener serving `metrics` as
  // Prometheus text at /metrics (empty: none). Announced as "metrics on
  // HOST:PORT" after the listening (and health) line; stops with the
  // server. Like the health port it carries no query and takes no call,
  // and the flag that sets it is the operator's say-so for where it
  // listens; a listener off loopback is logged as a warning.
  std::string metrics_listen;
  std::vector<std::weak_ptr<prometheus::Collectable>> metrics;
};

// Serves `services` on `listen` until a stop signal. Errors:
// INVALID_ARGUMENT for a malformed address or port, FAILED_PRECONDITION for
// an off-host address without allow_plaintext_off_host, UNAVAILABLE when
// an address (the gRPC, health or metrics one) cannot be bound.
absl::Status Serve(const std::string& listen, const std::vector<grpc::Service*>& services,
                   const ServeOptions& options = {});

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_SERVE_H_
