// Status conversion at the service edge: absl and gRPC codes map one to
// one, so each side converts once, where a call enters or leaves. Used by
// both servers and the CLI's client. Pure functions; thread-safe.
#ifndef SLICEPLAN_RPC_RPC_STATUS_H_
#define SLICEPLAN_RPC_RPC_STATUS_H_

#include <string>

#include "absl/status/status.h"
#include "grpcpp/support/status.h"

namespace sliceplan {

inline grpc::Status ToGrpc(const absl::Status& s) {
  if (s.ok()) return grpc::Status::OK;
  return grpc::Status(static_cast<grpc::StatusCode>(s.code()), std::string(s.message()));
}

inline absl::Status FromGrpc(const grpc::Status& s) {
  if (s.ok()) return absl::OkStatus();
  return absl::Status(static_cast<absl::StatusCode>(s.error_code()), s.error_message());
}

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_RPC_STATUS_H_
