#include "rpc/request_id.h"

#include <random>

#include "absl/strings/ascii.h"
#include "absl/strings/str_format.h"

namespace sliceplan {

bool IsValidRequestId(std::string_view id) {
  if (id.empty() || id.size() > kMaxRequestIdBytes) return false;
  for (const char c : id) {
    const bool ok = absl::ascii_isalnum(static_cast<unsigned char>(c)) || c == '.' || c == '_' ||
                    c == ':' || c == '-';
    if (!ok) return false;
  }
  return true;
}

std::string NewRequestId() {
  thread_local std::mt19937_64 random{std::random_device{}()};
  return absl::StrFormat("%016x", random());
}

std::string RequestIdOf(const grpc::ServerContext& context) {
  const auto& metadata = context.client_metadata();
  const auto it = metadata.find(kRequestIdKey);
  if (it != metadata.end()) {
    const std::string_view id(it->second.data(), it->second.size());
    if (IsValidRequestId(id)) return std::string(id);
  }
  return NewRequestId();
}

}  // namespace sliceplan
