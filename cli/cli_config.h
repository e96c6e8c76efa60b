// The command lines of `sliceplan` (optimize, capacity, workers), parsed into
// config structs from one flag table per command (cli/command_table.h): the
// only place flags exist; the library takes the structs.
#ifndef SLICEPLAN_CLI_CLI_CONFIG_H_
#define SLICEPLAN_CLI_CLI_CONFIG_H_

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "absl/status/statusor.h"
#include "cli/command_table.h"
#include "core/capacity/capacity_model.h"
#include "core/model/search_tier.h"
#include "core/slice_solver.h"
#include "rpc/tls.h"

namespace sliceplan::cli {

enum class OutputFormat { kText, kJson, kDot };

struct OptimizeConfig {
  std::string query_path;
  SearchOptions search;
  std::optional<uint32_t> slices;  // --slices=P; else the planner's choice
  int workers = 1;                 // --workers=N; default: the machine's cores
  // --threads-per-worker=T, into search.threads; default: the cores over
  // the workers (ParseOptimizeArgs).
  std::optional<int> threads_per_worker;
  std::optional<std::string> coordinator;
  OutputFormat format = OutputFormat::kText;
  SearchTier tier = SearchTier::kAuto;  // --tier
  double budget_seconds = 10;           // --budget-seconds: auto's time without a deadline
  double deadline_seconds = 0;          // 0: none
  bool partial_on_deadline = false;     // best plan so far instead of an error
  bool quiet = false;                   // no progress bar
  std::string plot_path;                // --plot=FILE.svg (cluster model)
  TlsFiles tls;                         // --tls-ca, --tls-cert, --tls-key (with --coordinator)
  std::string token_file;               // --token-file (with --coordinator)
  // --max-cardinalities, --max-query-bytes (the query file's limits here;
  // a coordinator applies its own).
  InputLimits limits;
};

// `sliceplan capacity QUERY.json --deadline-seconds=S`.
struct CapacityConfig {
  std::string query_path;
  SearchOptions search;
  double deadline_seconds = 0;  // required
  // Threads solving one slice in each worker; unset: 1, or with
  // --coordinator the pool's.
  std::optional<int> threads_per_worker;
  std::optional<std::string> coordinator;  // --coordinator: the table from there
  TlsFiles tls;
  std::string token_file;
  bool json = false;      // --format=json
  std::string plot_path;  // --plot=FILE.svg
  MachineRates rates;     // --seconds-per-split, --seconds-per-connected-set
  bool split_rate_given = false;
  bool set_rate_given = false;
  // The search's own rate was given, so nothing is measured.
  bool RateGiven() const { return search.cross_products ? split_rate_given : set_rate_given; }
};
// Parses the arguments after "capacity"; errors as ParseOptimizeArgs.
absl::StatusOr<CapacityConfig> ParseCapacityArgs(const std::vector<std::string>& args);

// `sliceplan workers --coordinator=HOST:PORT`.
struct WorkersConfig {
  std::string coordinator;
  TlsFiles tls;
  std::string token_file;
};
absl::StatusOr<WorkersConfig> ParseWorkersArgs(const std::vector<std::string>& args);

// Parses the arguments after "optimize"; `cores` (the machine's) is the
// default worker count, and the cores over the workers the default threads
// per worker. Errors (INVALID_ARGUMENT) name the flag: an unknown flag, a
// bad value, a missing or second query file.
absl::StatusOr<OptimizeConfig> ParseOptimizeArgs(const std::vector<std::string>& args, int cores);

// Parses a byte count: a number with an optional KiB, MiB or GiB suffix.
absl::StatusOr<uint64_t> ParseBytes(const std::string& text);

// The usage text of `sliceplan`: the commands, then each one's help.
std::string Usage();
// One command's help ("optimize", "capacity", "workers"); empty for
// another name.
std::string CommandUsage(const std::string& command);

// The flags that reach a coordinator securely (--tls-ca, --tls-cert,
// --tls-key, --token-file), for any command with --coordinator.
std::vector<FlagRow> ConnectionRows(TlsFiles& tls, std::string& token_file);

}  // namespace sliceplan::cli

#endif  // SLICEPLAN_CLI_CLI_CONFIG_H_
