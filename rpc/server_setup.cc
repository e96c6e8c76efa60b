#include "rpc/server_setup.h"

#include <algorithm>
#include <cstdlib>
#include <iostream>
#include <string>
#include <vector>

#include "absl/flags/commandlineflag.h"
#include "absl/flags/parse.h"
#include "absl/flags/reflection.h"
#include "absl/flags/usage.h"
#include "absl/flags/usage_config.h"
#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_replace.h"
#include "core/model/status_macros.h"
#include "rpc/flag_names.h"
#include "rpc/server_flags.h"
#include "spdlog/spdlog.h"
#include "wire/version.h"

namespace sliceplan {

namespace {

// A flag of the server's own (defined in `main_file`) or shared by both
// servers (server_flags.h): the flags its help lists.
bool IsServerFlagFile(absl::string_view file, absl::string_view main_file) {
  return absl::StrContains(file, main_file) || absl::StrContains(file, kServerFlagsFile);
}

// The server's own flags and the shared ones, dashed, sorted, without the
// test-only ones: what --help prints.
std::string ServerHelp(const char* usage, const std::string& main_file) {
  std::vector<const absl::CommandLineFlag*> flags;
  for (const auto& [name, flag] : absl::GetAllFlags()) {
    const std::string file = flag->Filename();
    if (!IsServerFlagFile(file, main_file)) continue;
    if (absl::StartsWith(name, "test_only")) continue;
    flags.push_back(flag);
  }
  std::sort(flags.begin(), flags.end(),
            [](const auto* a, const auto* b) { return a->Name() < b->Name(); });
  std::string out = absl::StrCat("usage: ", usage, "\n\nflags:\n");
  for (const absl::CommandLineFlag* flag : flags) {
    const std::string name = absl::StrReplaceAll(flag->Name(), {{"_", "-"}});
    const std::string value = flag->DefaultValue();
    absl::StrAppend(&out, "  --", name, "\n      ", flag->Help(),
                    value.empty() ? "" : absl::StrCat(" (default: ", value, ")"), "\n");
  }
  absl::StrAppend(&out, "  --version\n      the version and build type\n");
  return out;
}

}  // namespace

void ParseServerCommandLine(int argc, char** argv, const char* usage, const char* main_file) {
  // --help and --version are answered here, exit status 0: Abseil's own
  // exit 1 and print its build paths and every linked library's flags.
  const std::string binary =
      absl::StrCat("sliceplan-", absl::StrContains(main_file, "worker") ? "worker" : "coordinator");
  for (int i = 1; i < argc; ++i) {
    const std::string_view arg = argv[i];
    if (arg == "--") break;
    if (arg == "--help" || arg == "-h" || arg == "--helpfull" || arg == "--helpshort") {
      std::cout << ServerHelp(usage, main_file);
      std::exit(0);
    }
    if (arg == "--version") {
      std::cout << VersionLine(binary) << "\n";
      std::exit(0);
    }
  }
  absl::SetProgramUsageMessage(usage);
  absl::FlagsUsageConfig config;
  const std::string file = main_file;
  // The server's own flags and those both servers share (server_flags.cc).
  config.contains_help_flags = [file](absl::string_view f) { return IsServerFlagFile(f, file); };
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
