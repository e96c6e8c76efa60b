// Start-up steps both servers share, between their flag definitions (which
// stay in each main.cc) and Serve(): parsing the command line, and turning
// the listen address, TLS files and --insecure into serve options.
#ifndef SLICEPLAN_RPC_SERVER_SETUP_H_
#define SLICEPLAN_RPC_SERVER_SETUP_H_

#include <string>

#include "absl/status/status.h"
#include "rpc/serve.h"
#include "rpc/tls.h"

namespace sliceplan {

// Parses argv with Abseil: dashed flag names accepted (flag_names.h),
// `usage` as the program's usage line, and --help listing only the flags
// defined in `main_file` (e.g. "worker/main.cc") and the shared ones
// (server_flags.h), not Abseil's or gRPC's.
void ParseServerCommandLine(int argc, char** argv, const char* usage, const char* main_file);

// Checks `listen`, serve.health_listen and serve.metrics_listen when set
// (ValidateListenAddress; a metrics listener off loopback is logged as a warning), builds the
// server credentials of `tls` (rpc/tls.h), and refuses plaintext off loopback unless `insecure`
// (CheckPlaintextAllowed); fills serve.credentials and serve.allow_plaintext_off_host. Logs a
// warning, naming `server`, for a plaintext listener reachable from other hosts. Errors as those
// three.
absl::Status PrepareListener(const std::string& listen, const TlsFiles& tls, bool insecure,
                             const char* server, ServeOptions& serve);

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_SERVER_SETUP_H_
