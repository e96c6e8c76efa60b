#include "rpc/bearer_tokens.h"

#include "absl/strings/ascii.h"
#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"
#include "core/model/user_text.h"
#include "wire/bounded_file.h"

namespace sliceplan {
namespace {

// A token file holds a few tokens; past this it is no token file.
constexpr int64_t kMaxTokenFileBytes = int64_t{1} << 20;

// Equal in time that depends only on the lengths, not on where they differ.
bool ConstantTimeEqual(std::string_view a, std::string_view b) {
  if (a.size() != b.size()) return false;
  unsigned char diff = 0;
  for (size_t i = 0; i < a.size(); ++i) diff |= static_cast<unsigned char>(a[i] ^ b[i]);
  return diff == 0;
}

}  // namespace

absl::StatusOr<BearerTokens> BearerTokens::Load(const std::string& path) {
  absl::StatusOr<std::string> text = ReadBoundedFile(path, kMaxTokenFileBytes, "--token-file");
  if (!text.ok()) return absl::InvalidArgumentError(text.status().message());
  std::vector<std::string> tokens;
  for (absl::string_view line : absl::StrSplit(*text, '\n')) {
    const std::string token(absl::StripAsciiWhitespace(line));
    if (!token.empty() && token[0] != '#') tokens.push_back(token);
  }
  if (tokens.empty()) {
    return absl::InvalidArgumentError(
        absl::StrCat("--token-file: ", ShortName(path), " lists no token"));
  }
  return BearerTokens(std::move(tokens));
}

absl::StatusOr<std::string> ReadClientToken(const std::string& path) {
  absl::StatusOr<BearerTokens> tokens = BearerTokens::Load(path);
  if (!tokens.ok()) return tokens.status();
  return tokens->first();
}

absl::Status BearerTokens::Check(const grpc::ServerContext& context) const {
  const auto& metadata = context.client_metadata();
  const auto it = metadata.find("authorization");
  constexpr std::string_view kPrefix = "Bearer ";
  if (it != metadata.end()) {
    const std::string_view value(it->second.data(), it->second.size());
    // The scheme is case-insensitive (RFC 7235, section 2.1): "bearer"
    // and "BEARER" name it too.
    const std::string_view scheme = value.substr(0, kPrefix.size());
    if (absl::EqualsIgnoreCase(absl::string_view(scheme.data(), scheme.size()),
                               absl::string_view(kPrefix.data(), kPrefix.size()))) {
      const std::string_view token = value.substr(kPrefix.size());
      bool known = false;
      for (const std::string& t : tokens_) known |= ConstantTimeEqual(token, t);
      if (known) return absl::OkStatus();
    }
  }
  return absl::UnauthenticatedError(
      "missing or unknown bearer token (metadata \"authorization: Bearer TOKEN\")");
}

}  // namespace sliceplan
