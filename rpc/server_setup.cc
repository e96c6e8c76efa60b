#include "rpc/server_setup.h"

#include <vector>

#include "absl/flags/parse.h"
#include "absl/flags/usage.h"
#include "absl/flags/usage_config.h"
#include "absl/strings/match.h"
#include "core/model/status_macros.h"
#include "rpc/flag_names.h"
#include "rpc/server_flags.h"
#include "spdlog/spdlog.h"

namespace sliceplan {

void ParseServerCommandLine(int argc, char** argv, const char* usage, const char* main_file) {
  absl::SetProgramUsageMessage(usage);
  absl::FlagsUsageConfig config;
  const std::string file = main_file;
  // The server's own flags and those both servers share (server_flags.cc).
  config.contains_help_flags = [file](absl::string_view f) {
    return absl::StrContains(f, file) || absl::StrContains(f, kServerFlagsFile);
  };
  config.contains_helpshort_flags = config.contains_help_flags;
  absl::SetFlagsUsageConfig(config);
  std::vector<std::string> storage;  // flag values are copied by the parse
  std::vector<char*> args = UnderscoreFlagNames(argc, argv, storage);
  absl::ParseCommandLine(static_cast<int>(args.size()), args.data());
}

absl::Status PrepareListener(const std::string& listen, const TlsFiles& tls, bool insecure,
                             const char* server, ServeOptions& serve) {
  RETURN_IF_ERROR(ValidateListenAddress(listen));
  if (!serve.health_listen.empty()) {
    RETURN_IF_ERROR(ValidateListenAddress(serve.health_listen, "--health-listen"));
  }
  if (!serve.metrics_listen.empty()) {
    RETURN_IF_ERROR(ValidateListenAddress(serve.metrics_listen, "--metrics-listen"));
    if (!IsLoopbackAddress(serve.metrics_listen)) {
      spdlog::warn("{}: metrics served as plaintext HTTP on {}, reachable from other hosts", server,
                   serve.metrics_listen);
    }
  }
  ASSIGN_OR_RETURN(std::shared_ptr<grpc::ServerCredentials> credentials, ServerCredentialsFor(tls));
  RETURN_IF_ERROR(CheckPlaintextAllowed(listen, tls.any() || insecure));
  if (tls.any()) serve.credentials = std::move(credentials);
  serve.allow_plaintext_off_host = insecure;
  if (!tls.any() && insecure && !IsLoopbackAddress(listen)) {
    spdlog::warn("{}: serving plaintext on {}, reachable from other hosts (--insecure)", server,
                 listen);
  }
  return absl::OkStatus();
}

}  // namespace sliceplan
