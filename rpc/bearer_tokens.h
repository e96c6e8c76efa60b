// The coordinator's bearer tokens (--token-file: one token per line, blank
// lines and lines starting with '#' ignored). A client call carries
// "authorization: Bearer TOKEN" metadata; a call without a listed token is
// refused with UNAUTHENTICATED. Tokens are compared in constant time.
// Immutable after Load; thread-safe.
#ifndef SLICEPLAN_RPC_BEARER_TOKENS_H_
#define SLICEPLAN_RPC_BEARER_TOKENS_H_

#include <string>
#include <vector>

#include "absl/status/statusor.h"
#include "grpcpp/server_context.h"

namespace sliceplan {

class BearerTokens {
 public:
  // Errors (INVALID_ARGUMENT naming --token-file): unreadable, over 1 MiB,
  // or no token in it.
  static absl::StatusOr<BearerTokens> Load(const std::string& path);

  // OK when the call's authorization metadata names a listed token, else
  // UNAUTHENTICATED (the token itself is never echoed).
  absl::Status Check(const grpc::ServerContext& context) const;

  const std::string& first() const { return tokens_.front(); }

 private:
  explicit BearerTokens(std::vector<std::string> tokens) : tokens_(std::move(tokens)) {}
  std::vector<std::string> tokens_;
};

// A client's token: the first token line of `path` (same format).
// Errors as Load.
absl::StatusOr<std::string> ReadClientToken(const std::string& path);

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_BEARER_TOKENS_H_
