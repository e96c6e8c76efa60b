#include "cli/cli_config.h"

#include <charconv>
#include <cmath>
#include <cstdlib>
#include <functional>
#include <utility>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"
#include "cli/command_table.h"
#include "core/cost/pareto.h"
#include "core/cost/plan_choice.h"
#include "core/model/search_tier.h"
#include "core/model/status_macros.h"

namespace sliceplan::cli {
namespace {

absl::Status BadFlag(const std::string& flag, const std::string& value,
                     const std::string& expected) {
  return absl::InvalidArgumentError(absl::StrCat("--", flag, "=", value, ": expected ", expected));
}

absl::StatusOr<uint64_t> ParseUnsigned(const std::string& flag, const std::string& value) {
  uint64_t out = 0;
  const auto [end, err] = std::from_chars(value.data(), value.data() + value.size(), out);
  if (err != std::errc() || end != value.data() + value.size()) {
    return BadFlag(flag, value, "a whole number");
  }
  return out;
}

absl::StatusOr<double> ParseDouble(const std::string& flag, const std::string& value) {
  char* end = nullptr;
  const double d = std::strtod(value.c_str(), &end);
  if (value.empty() || *end != '\0' || !std::isfinite(d)) return BadFlag(flag, value, "a number");
  return d;
}

absl::StatusOr<bool> ParseBool(const std::string& flag, const std::string& value) {
  if (value == "true") return true;
  if (value == "false") return false;
  return BadFlag(flag, value, "true or false");
}

// A count in 1..most (workers, threads).
absl::StatusOr<int> ParseCount(const std::string& flag, const std::string& value, int most) {
  ASSIGN_OR_RETURN(const uint64_t n, ParseUnsigned(flag, value));
  if (n == 0 || n > static_cast<uint64_t>(most)) {
    return BadFlag(flag, value, absl::StrCat("a number in 1..", most));
  }
  return static_cast<int>(n);
}

// A positive finite number of seconds (rates, deadlines).
absl::StatusOr<double> ParsePositiveSeconds(const std::string& flag, const std::string& value,
                                            double most) {
  const auto d = ParseDouble(flag, value);
  if (!d.ok() || !(*d > 0) || *d > most) {
    return BadFlag(flag, value, absl::StrCat("seconds in (0, ", most, "]"));
  }
  return *d;
}

// A non-empty value stored as is (file names, addresses), into a
// std::string or a std::optional<std::string>.
template <class Out>
std::function<absl::Status(const std::string&)> Text(const std::string& flag, Out& out,
                                                     const std::string& expected) {
  return [&out, flag, expected](const std::string& value) {
    if (value.empty()) return BadFlag(flag, value, expected);
    out = value;
    return absl::OkStatus();
  };
}

// A count in 1..most (ParseCount), into an int or a std::optional<int>.
template <class Out>
std::function<absl::Status(const std::string&)> Count(const std::string& flag, Out& out, int most) {
  return [&out, flag, most](const std::string& value) {
    ASSIGN_OR_RETURN(out, ParseCount(flag, value, most));
    return absl::OkStatus();
  };
}

// Seconds in (0, most] (ParsePositiveSeconds).
std::function<absl::Status(const std::string&)> Seconds(const std::string& flag, double& out,
                                                        double most) {
  return [&out, flag, most](const std::string& value) {
    ASSIGN_OR_RETURN(out, ParsePositiveSeconds(flag, value, most));
    return absl::OkStatus();
  };
}

// One of a few words, each mapped to a value.
template <class T>
std::function<absl::Status(const std::string&)> OneOf(const std::string& flag, T& out,
                                                      std::vector<std::pair<std::string, T>> words,
                                                      const std::string& expected) {
  return [&out, flag, words, expected](const std::string& value) {
    for (const auto& [word, v] : words) {
      if (value == word) {
        out = v;
        return absl::OkStatus();
      }
    }
    return BadFlag(flag, value, expected);
  };
}

std::function<absl::Status(const std::string&)> Number(const std::string& flag, double& out) {
  return [&out, flag](const std::string& value) {
    ASSIGN_OR_RETURN(out, ParseDouble(flag, value));
    return absl::OkStatus();
  };
}

// The rows that shape the searched space, shared by optimize and capacity.
std::vector<FlagRow> SearchSpaceRows(SearchOptions& search) {
  return {
      {"shape", "bushy|left-deep", "bushy", "plan shape",
       OneOf<PlanShape>("shape", search.shape,
                        {{"bushy", PlanShape::kBushy}, {"left-deep", PlanShape::kLeftDeep}},
                        "bushy or left-deep")},
      {"cross-products", "true|false", "true", "allow cross products",
       [&search](const std::string& v) {
         ASSIGN_OR_RETURN(search.cross_products, ParseBool("cross-products", v));
         return absl::OkStatus();
       }},
      {"memo-limit", "BYTES", "8GiB", "per-slice memo limit, e.g. 512MiB",
       [&search](const std::string& v) {
         auto bytes = ParseBytes(v);
         if (!bytes.ok()) return BadFlag("memo-limit", v, "bytes, e.g. 512MiB or 8GiB");
         search.memo_limit_bytes = *bytes;
         return absl::OkStatus();
       }},
  };
}

void Append(std::vector<FlagRow>& rows, std::vector<FlagRow> more) {
  for (FlagRow& row : more) rows.push_back(std::move(row));
}

// The cluster model's rows (--cost=cluster).
std::vector<FlagRow> ClusterRows(ClusterSearchConfig& cluster) {
  ClusterParams& params = cluster.params;
  return {
      {"objectives", "LIST", "latency_s,node_seconds,completeness",
       "the metrics the Pareto set trades",
       [&cluster](const std::string& v) {
         ASSIGN_OR_RETURN(cluster.objectives, ParseObjectives(v));
         return absl::OkStatus();
       }},
      {"alpha", "A", "1", "precision, >= 1 (1: the exact Pareto set)",
       Number("alpha", cluster.alpha)},
      {"node-counts", "N,N,...", "4,16,64", "node counts a join stage may rent",
       [&params](const std::string& v) {
         std::vector<int> counts;
         for (absl::string_view part : absl::StrSplit(v, ',')) {
           ASSIGN_OR_RETURN(const uint64_t m, ParseUnsigned("node-counts", std::string(part)));
           // Reported as given, not as clipped to an int.
           if (m > static_cast<uint64_t>(kMaxNodeCount)) {
             return BadFlag(
                 "node-counts", v,
                 absl::StrCat("node counts in 1..", kMaxNodeCount, " (", part, " is not)"));
           }
           counts.push_back(static_cast<int>(m));
         }
         params.node_counts = counts;
         return absl::OkStatus();
       }},
      {"sample-rates", "F,F,...", "1", "leaf sample rates, e.g. 1,0.1,0.01",
       [&params](const std::string& v) {
         std::vector<double> rates;
         for (absl::string_view part : absl::StrSplit(v, ',')) {
           ASSIGN_OR_RETURN(const double f, ParseDouble("sample-rates", std::string(part)));
           rates.push_back(f);
         }
         params.sample_rates = rates;
         return absl::OkStatus();
       }},
      {"net-bytes-per-s", "B", "1.25e9", "network throughput per node",
       Number("net-bytes-per-s", params.net_bytes_per_s)},
      {"cpu-rows-per-s", "R", "5e7", "join throughput per node",
       Number("cpu-rows-per-s", params.cpu_rows_per_s)},
      {"scan-bytes-per-s", "B", "5e8", "scan throughput per node",
       Number("scan-bytes-per-s", params.scan_bytes_per_s)},
      {"stage-startup-s", "S", "0.5", "start-up time of a join stage",
       Number("stage-startup-s", params.stage_startup_s)},
      {"bound", "METRIC<=V|METRIC>=V", "",
       "a bound the named plan must meet, repeatable, e.g. completeness>=0.99",
       [&cluster](const std::string& v) {
         ASSIGN_OR_RETURN(const Bound b, ParseBound(v));
         cluster.choice.bounds.push_back(b);
         return absl::OkStatus();
       }},
      {"prefer", "METRIC|weights:M=W,...", "latency_s", "which Pareto plan the answer names",
       [&cluster](const std::string& v) {
         ASSIGN_OR_RETURN(cluster.choice.prefer, ParsePreference(v));
         return absl::OkStatus();
       }},
  };
}

// optimize's rows on where the search runs: slices, workers, threads.
std::vector<FlagRow> PlacementRows(OptimizeConfig& config) {
  return {
      {"slices", "P", "chosen from the query and the worker count", "slice count, a power of two",
       [&config](const std::string& v) {
         // Checked with the query, by ValidateSlice (cli/main.cc).
         ASSIGN_OR_RETURN(const uint64_t p, ParseUnsigned("slices", v));
         if (p > (uint64_t{1} << 31)) return BadFlag("slices", v, "at most 2^31 slices");
         config.slices = static_cast<uint32_t>(p);
         return absl::OkStatus();
       }},
      {"workers", "N", "the cores", "in-process workers", Count("workers", config.workers, 1024)},
      {"threads-per-worker", "T", "the cores over the workers",
       "threads solving one slice together in each in-process worker",
       Count("threads-per-worker", config.threads_per_worker, kMaxSearchThreads)},
      {"coordinator", "HOST:PORT", "", "solve on a running coordinator",
       Text("coordinator", config.coordinator, "HOST:PORT")},
  };
}

// optimize's rows on how the search runs and what it prints.
std::vector<FlagRow> RunRows(OptimizeConfig& config) {
  return {
      {"format", "text|json|dot", "text", "output",
       OneOf<OutputFormat>("format", config.format,
                           {{"text", OutputFormat::kText},
                            {"json", OutputFormat::kJson},
                            {"dot", OutputFormat::kDot}},
                           "text, json or dot")},
      {"tier", "auto|exact|idp|linear|greedy|anytime", "auto",
       "how to search: auto takes the exact search when it fits the time on this pool, else "
       "idp from the best of greedy and linear (the cluster model: the exact Pareto search, "
       "else the anytime one)",
       [&config](const std::string& v) {
         const auto tier = ParseTier(v);
         if (!tier) return BadFlag("tier", v, "auto, exact, idp, linear, greedy or anytime");
         config.tier = *tier;
         return absl::OkStatus();
       }},
      {"max-cardinalities", "N", "1000000",
       "most listed row estimates (cardinalities) the query may carry",
       [&config](const std::string& v) {
         ASSIGN_OR_RETURN(const uint64_t n, ParseUnsigned("max-cardinalities", v));
         if (n > (uint64_t{1} << 40)) return BadFlag("max-cardinalities", v, "at most 2^40");
         config.limits.max_cardinalities = static_cast<int64_t>(n);
         return absl::OkStatus();
       }},
      {"max-query-bytes", "BYTES", "16777216", "largest query file read",
       [&config](const std::string& v) {
         ASSIGN_OR_RETURN(const uint64_t n, ParseUnsigned("max-query-bytes", v));
         if (n == 0 || n > (uint64_t{1} << 40)) {
           return BadFlag("max-query-bytes", v, "a number of bytes in 1..2^40");
         }
         config.limits.max_query_bytes = static_cast<int64_t>(n);
         return absl::OkStatus();
       }},
      {"budget-seconds", "S", "10", "the time auto and idp plan for without a deadline",
       Seconds("budget-seconds", config.budget_seconds, 3600)},
      {"deadline-seconds", "S", "",
       "answer within S seconds: auto and idp return the best plan found by then",
       [&config](const std::string& v) {
         const auto d = ParseDouble("deadline-seconds", v);
         if (!d.ok() || !(*d > 0)) return BadFlag("deadline-seconds", v, "a number of seconds > 0");
         config.deadline_seconds = *d;
         return absl::OkStatus();
       }},
      {"partial-on-deadline", "true|false", "false",
       "--tier=exact or the cluster model: at the deadline, print the best plan so far (marked "
       "not proven optimal) instead of failing",
       [&config](const std::string& v) {
         ASSIGN_OR_RETURN(config.partial_on_deadline, ParseBool("partial-on-deadline", v));
         return absl::OkStatus();
       }},
      {"plot", "FILE.svg", "", "--cost=cluster: latency against node-seconds, one point a plan",
       Text("plot", config.plot_path, "a file name")},
      {"quiet", "", "", "no progress bar on stderr",
       [&config](const std::string&) {
         config.quiet = true;
         return absl::OkStatus();
       }},
  };
}

CommandTable OptimizeTable(OptimizeConfig& config) {
  CommandTable table{"optimize",
                     "Finds the optimal join order of QUERY.json by solving slices of the plan "
                     "space on workers and merging their optima.",
                     "QUERY.json",
                     "query file",
                     [&config](const std::string& path) { config.query_path = path; },
                     SearchSpaceRows(config.search)};
  Append(
      table.flags,
      {{"cost", "cout|cluster", "cout",
        "cost model; cluster returns the Pareto set of latency, node-seconds and completeness",
        OneOf<CostModelKind>("cost", config.search.cost,
                             {{"cout", CostModelKind::kCout}, {"cluster", CostModelKind::kCluster}},
                             "cout or cluster")}});
  Append(table.flags, PlacementRows(config));
  Append(table.flags, RunRows(config));
  Append(table.flags, ClusterRows(config.search.cluster));
  Append(table.flags, ConnectionRows(config.tls, config.token_file));
  return table;
}

CommandTable CapacityTable(CapacityConfig& config) {
  CommandTable table{"capacity",
                     "Predicts the exact search's wall time on pools of 1, 2, 4, ... 1,024 "
                     "workers and marks the smallest that meets the deadline.",
                     "QUERY.json",
                     "query file",
                     [&config](const std::string& path) { config.query_path = path; },
                     SearchSpaceRows(config.search)};
  Append(
      table.flags,
      {{"cost", "cout|cluster", "cout",
        "cost model; cluster forecasts the exact Pareto search from short runs on parts of "
        "the query",
        OneOf<CostModelKind>("cost", config.search.cost,
                             {{"cout", CostModelKind::kCout}, {"cluster", CostModelKind::kCluster}},
                             "cout or cluster")}});
  Append(table.flags, ClusterRows(config.search.cluster));
  MachineRates& rates = config.rates;
  Append(table.flags,
         {{"deadline-seconds", "S", "", "the time to plan for (required)",
           Seconds("deadline-seconds", config.deadline_seconds, 1e6)},
          {"threads-per-worker", "T", "1; with --coordinator, the pool's",
           "threads solving one slice together in each worker",
           Count("threads-per-worker", config.threads_per_worker, kMaxSearchThreads)},
          {"coordinator", "HOST:PORT", "",
           "the table from a running coordinator: its pool's threads and rates",
           Text("coordinator", config.coordinator, "HOST:PORT")},
          {"format", "text|json", "text", "output",
           OneOf<bool>("format", config.json, {{"text", false}, {"json", true}}, "text or json")},
          {"plot", "FILE.svg", "", "predicted seconds against workers, log-log",
           Text("plot", config.plot_path, "a file name")},
          {"seconds-per-split", "S", "measured here in under a second", "the dense kernel's rate",
           [&config, &rates](const std::string& v) {
             ASSIGN_OR_RETURN(rates.dense_split_seconds,
                              ParsePositiveSeconds("seconds-per-split", v, 1));
             config.split_rate_given = true;
             return absl::OkStatus();
           }},
          {"seconds-per-connected-set", "S", "measured here in under a second",
           "the connected-only search's rate", [&config, &rates](const std::string& v) {
             ASSIGN_OR_RETURN(rates.connected_set_seconds,
                              ParsePositiveSeconds("seconds-per-connected-set", v, 1));
             config.set_rate_given = true;
             return absl::OkStatus();
           }}});
  Append(table.flags, ConnectionRows(config.tls, config.token_file));
  return table;
}

CommandTable WorkersTable(WorkersConfig& config) {
  CommandTable table{"workers",
                     "Lists the coordinator's worker pool and its health.",
                     "",
                     "",
                     {},
                     {{"coordinator", "HOST:PORT", "", "the coordinator to ask (required)",
                       Text("coordinator", config.coordinator, "HOST:PORT")}}};
  Append(table.flags, ConnectionRows(config.tls, config.token_file));
  return table;
}

absl::Status NeedCoordinator(const TlsFiles& tls, const std::string& token_file, bool coordinator) {
  if ((tls.any() || !token_file.empty()) && !coordinator) {
    return absl::InvalidArgumentError(
        "--tls-ca, --tls-cert, --tls-key and --token-file: need --coordinator");
  }
  return absl::OkStatus();
}

}  // namespace

// --tls-ca, --tls-cert, --tls-key, --token-file: with --coordinator.
std::vector<FlagRow> ConnectionRows(TlsFiles& tls, std::string& token_file) {
  return {
      {"tls-ca", "FILE", "", "with --coordinator: verify it against this CA (TLS)",
       Text("tls-ca", tls.ca, "a file name")},
      {"tls-cert", "FILE", "", "with --coordinator: present this certificate (with --tls-key)",
       Text("tls-cert", tls.cert, "a file name")},
      {"tls-key", "FILE", "", "with --coordinator: the certificate's private key",
       Text("tls-key", tls.key, "a file name")},
      {"token-file", "FILE", "", "with --coordinator: send its first bearer token",
       Text("token-file", token_file, "a file name")},
  };
}

absl::StatusOr<uint64_t> ParseBytes(const std::string& text) {
  static constexpr std::pair<const char*, uint64_t> kSuffixes[] = {
      {"GiB", uint64_t{1} << 30}, {"MiB", uint64_t{1} << 20}, {"KiB", uint64_t{1} << 10}, {"", 1}};
  for (const auto& [suffix, scale] : kSuffixes) {
    const std::string s(suffix);
    if (text.size() <= s.size() || text.compare(text.size() - s.size(), s.size(), s) != 0) {
      continue;
    }
    ASSIGN_OR_RETURN(const uint64_t n,
                     ParseUnsigned("memo-limit", text.substr(0, text.size() - s.size())));
    if (n == 0 || n > (~uint64_t{0}) / scale) break;
    return n * scale;
  }
  return absl::InvalidArgumentError(absl::StrCat("bad byte count: ", text));
}

absl::StatusOr<OptimizeConfig> ParseOptimizeArgs(const std::vector<std::string>& args, int cores) {
  OptimizeConfig config;
  config.workers = cores;
  RETURN_IF_ERROR(ParseCommand(OptimizeTable(config), args));
  if (config.threads_per_worker && config.coordinator) {
    return absl::InvalidArgumentError(
        "--threads-per-worker: in-process workers only (a worker's --threads sets its own)");
  }
  config.search.threads = config.threads_per_worker.value_or(std::max(1, cores / config.workers));
  RETURN_IF_ERROR(NeedCoordinator(config.tls, config.token_file, config.coordinator.has_value()));
  return config;
}

absl::StatusOr<CapacityConfig> ParseCapacityArgs(const std::vector<std::string>& args) {
  CapacityConfig config;
  RETURN_IF_ERROR(ParseCommand(CapacityTable(config), args));
  if (!(config.deadline_seconds > 0)) {
    return absl::InvalidArgumentError("--deadline-seconds=S: missing (the time to plan for)");
  }
  RETURN_IF_ERROR(NeedCoordinator(config.tls, config.token_file, config.coordinator.has_value()));
  return config;
}

absl::StatusOr<WorkersConfig> ParseWorkersArgs(const std::vector<std::string>& args) {
  WorkersConfig config;
  RETURN_IF_ERROR(ParseCommand(WorkersTable(config), args));
  if (config.coordinator.empty()) {
    return absl::InvalidArgumentError("--coordinator=HOST:PORT: missing");
  }
  return config;
}

std::string CommandUsage(const std::string& command) {
  OptimizeConfig optimize;
  CapacityConfig capacity;
  WorkersConfig workers;
  if (command == "optimize") return CommandHelp(OptimizeTable(optimize));
  if (command == "capacity") return CommandHelp(CapacityTable(capacity));
  if (command == "workers") return CommandHelp(WorkersTable(workers));
  return "";
}

std::string Usage() {
  return absl::StrCat(
      "usage: sliceplan COMMAND [ARGS] (sliceplan COMMAND --help for one command)\n\n",
      "Finds optimal join orders of large queries by slicing the plan space over workers.\n\n",
      "commands:\n", "  optimize QUERY.json [flags]                  the best plan of a query\n",
      "  capacity QUERY.json --deadline-seconds=S     the pool a deadline needs\n",
      "  workers --coordinator=HOST:PORT              a coordinator's worker pool\n",
      "  prepare TEMPLATE.json --out=PLANS            a prepared query's plan set\n",
      "  choose PLANS --set=NAME=VALUE,...            its plan for given values\n",
      "  --version                                    the version and build type\n\n",
      "Exit status: 0 success, 2 bad input, 1 any other failure.\n");
}

}  // namespace sliceplan::cli
