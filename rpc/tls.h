// Transport security for both servers and the clients (CLI, coordinator to
// workers): credentials from PEM files named by flags.
//
// A server with a certificate and key serves TLS; with a CA as well it
// requires client certificates signed by it (mutual TLS). A client with a
// CA verifies the server against it; with a certificate and key it also
// presents them. No files at all: plaintext (loopback only unless the
// server was told --insecure, rpc/serve.h). Thread-safe (plain functions).
//
// Rotation: with `reload_seconds` > 0 the files are watched (gRPC's file
// watcher, which reads a certificate and its key as one consistent pair):
// new connections use the new files within that many seconds, with no
// restart, and connections already open keep their session. Files are
// always read once up front, so a bad file is refused at start by name.
#ifndef SLICEPLAN_RPC_TLS_H_
#define SLICEPLAN_RPC_TLS_H_

#include <memory>
#include <string>

#include "absl/status/statusor.h"
#include "grpcpp/security/credentials.h"
#include "grpcpp/security/server_credentials.h"

namespace sliceplan {

// Paths; empty means not given.
inline constexpr int kMaxTlsReloadSeconds = 86400;

struct TlsFiles {
  std::string cert;  // --tls-cert
  std::string key;   // --tls-key
  std::string ca;    // --tls-ca
  // --tls-reload-seconds: how often the files are re-read; 0: read once.
  int reload_seconds = 0;
  bool any() const { return !cert.empty() || !key.empty() || !ca.empty(); }
};

// Errors (INVALID_ARGUMENT naming the flag): a certificate without its key
// or the reverse, a file that cannot be read or holds no PEM block; a
// server CA without a server certificate; reload_seconds outside
// 0..kMaxTlsReloadSeconds.
absl::StatusOr<std::shared_ptr<grpc::ServerCredentials>> ServerCredentialsFor(
    const TlsFiles& files);
absl::StatusOr<std::shared_ptr<grpc::ChannelCredentials>> ChannelCredentialsFor(
    const TlsFiles& files);

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_TLS_H_
