#include "rpc/tls.h"

#include "absl/strings/str_cat.h"
#include "core/model/input_limits.h"
#include "core/model/status_macros.h"
#include "core/model/user_text.h"
#include "grpcpp/security/tls_certificate_provider.h"
#include "grpcpp/security/tls_certificate_verifier.h"
#include "grpcpp/security/tls_credentials_options.h"
#include "rpc/pem_check.h"
#include "wire/bounded_file.h"

namespace sliceplan {
namespace {

// PEM files are a few KiB; past this a file is no certificate or key.
constexpr int64_t kMaxPemBytes = int64_t{1} << 20;

// The PEM text of `path`, or "" when `path` is "".
absl::StatusOr<std::string> ReadPem(const std::string& path, const char* flag) {
  if (path.empty()) return std::string();
  absl::StatusOr<std::string> text = ReadBoundedFile(path, kMaxPemBytes, flag);
  if (!text.ok()) {
    return absl::InvalidArgumentError(text.status().message());  // a flag's value is bad
  }
  if (text->find("-----BEGIN ") == std::string::npos) {
    return absl::InvalidArgumentError(
        absl::StrCat(flag, ": ", ShortName(path), " holds no PEM block"));
  }
  return text;
}

absl::Status CheckPair(const TlsFiles& files) {
  if (files.cert.empty() != files.key.empty()) {
    return absl::InvalidArgumentError(
        "--tls-cert and --tls-key: give both (a certificate and its private key) or neither");
  }
  if (files.reload_seconds < 0 || files.reload_seconds > kMaxTlsReloadSeconds) {
    return absl::InvalidArgumentError(absl::StrCat("--tls-reload-seconds: ", files.reload_seconds,
                                                   " is outside 0..", kMaxTlsReloadSeconds));
  }
  return absl::OkStatus();
}

using grpc::experimental::FileWatcherCertificateProvider;

// A provider watching whichever of the identity pair and the CA are given
// (at least one is).
std::shared_ptr<grpc::experimental::CertificateProviderInterface> WatchFiles(
    const TlsFiles& files) {
  const auto seconds = static_cast<unsigned>(files.reload_seconds);
  if (files.cert.empty())
    return std::make_shared<FileWatcherCertificateProvider>(files.ca, seconds);
  if (files.ca.empty()) {
    return std::make_shared<FileWatcherCertificateProvider>(files.key, files.cert, seconds);
  }
  return std::make_shared<FileWatcherCertificateProvider>(files.key, files.cert, files.ca, seconds);
}

std::shared_ptr<grpc::ServerCredentials> WatchedServerCredentials(const TlsFiles& files) {
  grpc::experimental::TlsServerCredentialsOptions options(WatchFiles(files));
  options.watch_identity_key_cert_pairs();
  if (!files.ca.empty()) {
    options.watch_root_certs();
    options.set_cert_request_type(GRPC_SSL_REQUEST_AND_REQUIRE_CLIENT_CERTIFICATE_AND_VERIFY);
  }
  return grpc::experimental::TlsServerCredentials(options);
}

std::shared_ptr<grpc::ChannelCredentials> WatchedChannelCredentials(const TlsFiles& files) {
  grpc::experimental::TlsChannelCredentialsOptions options;
  options.set_certificate_provider(WatchFiles(files));
  if (!files.ca.empty()) options.watch_root_certs();  // else the system's roots
  if (!files.cert.empty()) options.watch_identity_key_cert_pairs();
  options.set_certificate_verifier(
      std::make_shared<grpc::experimental::HostNameCertificateVerifier>());
  return grpc::experimental::TlsCredentials(options);
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
  // Checked before anything listens: a mismatched pair fails every handshake.
  RETURN_IF_ERROR(CheckKeyPair(cert, key));
  if (!ca.empty()) RETURN_IF_ERROR(CheckCaFile(ca));
  if (files.reload_seconds > 0) return WatchedServerCredentials(files);
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
  if (!options.pem_cert_chain.empty()) {
    RETURN_IF_ERROR(CheckKeyPair(options.pem_cert_chain, options.pem_private_key));
  }
  if (!options.pem_root_certs.empty()) RETURN_IF_ERROR(CheckCaFile(options.pem_root_certs));
  if (files.reload_seconds > 0) return WatchedChannelCredentials(files);
  return grpc::SslCredentials(options);
}

}  // namespace sliceplan
