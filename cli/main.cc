// sliceplan: the command-line front end. Parses flags into a config, runs
// the embedded coordinator (or, later, the RPC one) and prints the result.
#include <iostream>
#include <string>
#include <thread>
#include <vector>

#include "cli/cli_config.h"
#include "cli/render.h"
#include "core/embedded_pool.h"
#include "core/query_proto.h"
#include "core/slice_planner.h"

namespace sliceplan::cli {
namespace {

// Exit statuses of interfaces.md.
constexpr int kExitOk = 0;
constexpr int kExitFailure = 1;
constexpr int kExitBadInput = 2;

// Bad input is what the caller can fix in the file or the flags, a query
// too large for the limits included.
int ExitCodeFor(const absl::Status& status) {
  switch (status.code()) {
    case absl::StatusCode::kInvalidArgument:
    case absl::StatusCode::kNotFound:
    case absl::StatusCode::kPermissionDenied:
    case absl::StatusCode::kOutOfRange:
    case absl::StatusCode::kResourceExhausted:
      return kExitBadInput;
    default:
      return kExitFailure;
  }
}

int Fail(const absl::Status& status) {
  std::cerr << "sliceplan: " << status.message() << "\n";
  return ExitCodeFor(status);
}

int Optimize(const std::vector<std::string>& args) {
  const int cores = static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
  auto config = ParseOptimizeArgs(args, cores);
  if (!config.ok()) return Fail(config.status());
  if (config->coordinator) {
    return Fail(absl::UnimplementedError(
        "--coordinator: the RPC path is not in this build yet; omit the flag "
        "to run embedded"));
  }
  auto query = ReadQueryFile(config->query_path);
  if (!query.ok()) return Fail(query.status());
  RunInfo info{&*query, config->search, config->workers, !config->slices};
  const uint32_t slices = config->slices.value_or(
      ChooseSliceCount(*query, config->search, config->workers));
  auto result = OptimizeEmbedded(*query, config->search, slices, config->workers);
  if (!result.ok()) return Fail(result.status());
  switch (config->format) {
    case OutputFormat::kText: std::cout << RenderText(*result, info); break;
    case OutputFormat::kJson: std::cout << RenderJson(*result, info); break;
    case OutputFormat::kDot: std::cout << RenderDot(*result, info); break;
  }
  std::cout.flush();
  return std::cout ? kExitOk : kExitFailure;
}

}  // namespace
}  // namespace sliceplan::cli

int main(int argc, char** argv) {
  using namespace sliceplan::cli;
  std::vector<std::string> args(argv + 1, argv + argc);
  if (args.empty() || args[0] == "--help" || args[0] == "help") {
    (args.empty() ? std::cerr : std::cout) << Usage();
    return args.empty() ? kExitBadInput : kExitOk;
  }
  if (args[0] != "optimize") {
    std::cerr << "sliceplan: unknown command \"" << args[0] << "\"\n" << Usage();
    return kExitBadInput;
  }
  args.erase(args.begin());
  for (const std::string& a : args) {
    if (a == "--help") {
      std::cout << Usage();
      return kExitOk;
    }
  }
  return Optimize(args);
}
