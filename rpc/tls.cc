#include "rpc/tls.h"

#include <fstream>
#include <sstream>

#include "absl/strings/str_cat.h"
#include "core/input_limits.h"
#include "core/status_macros.h"
#include "core/user_text.h"

namespace sliceplan {
namespace {

// The PEM text of `path`, or "" when `path` is "".
absl::StatusOr<std::string> ReadPem(const std::string& path, const char* flag) {
  if (path.empty()) return std::string();
  std::ifstream in(path, std::ios::binary | std::ios::ate);
  if (!in) return absl::InvalidArgumentError(absl::StrCat(flag, ": cannot read ", ShortName(path)));
  if (in.tellg() > (int64_t{1} << 20)) {
    return absl::InvalidArgumentError(absl::StrCat(flag, ": ", ShortName(path), " is over 1 MiB"));
  }
  in.seekg(0);
  std::ostringstream text;
  text << in.rdbuf();
  if (text.str().find("-----BEGIN ") == std::string::npos) {
    return absl::InvalidArgumentError(
        absl::StrCat(flag, ": ", ShortName(path), " holds no PEM block"));
  }
  return text.str();
}

absl::Status CheckPair(const TlsFiles& files) {
  if (files.cert.empty() != files.key.empty()) {
    return absl::InvalidArgumentError(
        "--tls-cert and --tls-key: give both (a certificate and its private key) or neither");
  }
  return absl::OkStatus();
}

}  // namespace

absl::StatusOr<std::shared_ptr<grpc::ServerCredentials>> ServerCredentialsFor(
    const TlsFiles& files) {
  RETURN_IF_ERROR(CheckPair(files));
  if (files.cert.empty()) {
    if (!files.ca.empty()) {
      return absl::InvalidArgumentError("--tls-ca: needs --tls-cert and --tls-key on a server");
    }
    return grpc::InsecureServerCredentials();
  }
  ASSIGN_OR_RETURN(const std::string cert, ReadPem(files.cert, "--tls-cert"));
  ASSIGN_OR_RETURN(const std::string key, ReadPem(files.key, "--tls-key"));
  ASSIGN_OR_RETURN(const std::string ca, ReadPem(files.ca, "--tls-ca"));
  grpc::SslServerCredentialsOptions options(
      ca.empty() ? GRPC_SSL_DONT_REQUEST_CLIENT_CERTIFICATE
                 : GRPC_SSL_REQUEST_AND_REQUIRE_CLIENT_CERTIFICATE_AND_VERIFY);
  options.pem_root_certs = ca;
  options.pem_key_cert_pairs.push_back({key, cert});
  return grpc::SslServerCredentials(options);
}

absl::StatusOr<std::shared_ptr<grpc::ChannelCredentials>> ChannelCredentialsFor(
    const TlsFiles& files) {
  RETURN_IF_ERROR(CheckPair(files));
  if (!files.any()) return grpc::InsecureChannelCredentials();
  grpc::SslCredentialsOptions options;
  ASSIGN_OR_RETURN(options.pem_root_certs, ReadPem(files.ca, "--tls-ca"));
  ASSIGN_OR_RETURN(options.pem_cert_chain, ReadPem(files.cert, "--tls-cert"));
  ASSIGN_OR_RETURN(options.pem_private_key, ReadPem(files.key, "--tls-key"));
  return grpc::SslCredentials(options);
}

}  // namespace sliceplan
