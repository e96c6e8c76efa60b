#include "cli/cli_config.h"

#include <charconv>
#include <cmath>
#include <cstdlib>

#include "absl/functional/function_ref.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"
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

// The connection flags shared by `optimize --coordinator` and `workers`.
// REQUIRES: flag is one of tls-ca, tls-cert, tls-key, token-file.
void SetConnectionFlag(const std::string& flag, const std::string& value, TlsFiles& tls,
                       std::string& token_file) {
  if (flag == "tls-ca") tls.ca = value;
  if (flag == "tls-cert") tls.cert = value;
  if (flag == "tls-key") tls.key = value;
  if (flag == "token-file") token_file = value;
}

// The flags that shape the searched space, shared by optimize and capacity.
// REQUIRES: flag is shape, cross-products or memo-limit.
absl::Status SetSearchSpaceFlag(SearchOptions& search, const std::string& flag,
                                const std::string& value) {
  if (flag == "shape") {
    if (value == "bushy")
      search.shape = PlanShape::kBushy;
    else if (value == "left-deep")
      search.shape = PlanShape::kLeftDeep;
    else
      return BadFlag(flag, value, "bushy or left-deep");
  } else if (flag == "cross-products") {
    ASSIGN_OR_RETURN(search.cross_products, ParseBool(flag, value));
  } else {
    auto bytes = ParseBytes(value);
    if (!bytes.ok()) return BadFlag(flag, value, "bytes, e.g. 512MiB or 8GiB");
    search.memo_limit_bytes = *bytes;
  }
  return absl::OkStatus();
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

absl::Status SetCapacityFlag(CapacityConfig& config, const std::string& flag,
                             const std::string& value) {
  if (flag == "shape" || flag == "cross-products" || flag == "memo-limit") {
    return SetSearchSpaceFlag(config.search, flag, value);
  } else if (flag == "deadline-seconds") {
    ASSIGN_OR_RETURN(config.deadline_seconds, ParsePositiveSeconds(flag, value, 1e6));
  } else if (flag == "threads-per-worker") {
    ASSIGN_OR_RETURN(config.threads_per_worker, ParseCount(flag, value, kMaxSearchThreads));
  } else if (flag == "coordinator") {
    if (value.empty()) return BadFlag(flag, value, "HOST:PORT");
    config.coordinator = value;
  } else if (flag == "tls-ca" || flag == "tls-cert" || flag == "tls-key" || flag == "token-file") {
    if (value.empty()) return BadFlag(flag, value, "a file name");
    SetConnectionFlag(flag, value, config.tls, config.token_file);
  } else if (flag == "format") {
    if (value == "text")
      config.json = false;
    else if (value == "json")
      config.json = true;
    else
      return BadFlag(flag, value, "text or json");
  } else if (flag == "plot") {
    if (value.empty()) return BadFlag(flag, value, "a file name");
    config.plot_path = value;
  } else if (flag == "seconds-per-split") {
    ASSIGN_OR_RETURN(const double r, ParsePositiveSeconds(flag, value, 1));
    config.rates.dense_split_seconds = r;
    config.split_rate_given = true;
  } else if (flag == "seconds-per-connected-set") {
    ASSIGN_OR_RETURN(const double r, ParsePositiveSeconds(flag, value, 1));
    config.rates.connected_set_seconds = r;
    config.set_rate_given = true;
  } else {
    return absl::InvalidArgumentError(absl::StrCat("--", flag, ": unknown flag"));
  }
  return absl::OkStatus();
}

absl::Status SetFlag(OptimizeConfig& config, const std::string& flag, const std::string& value) {
  if (flag == "shape" || flag == "cross-products" || flag == "memo-limit") {
    return SetSearchSpaceFlag(config.search, flag, value);
  } else if (flag == "cost") {
    if (value == "cout")
      config.search.cost = CostModelKind::kCout;
    else if (value == "cluster")
      config.search.cost = CostModelKind::kCluster;
    else
      return BadFlag(flag, value, "cout or cluster");
  } else if (flag == "objectives") {
    auto o = ParseObjectives(value);
    if (!o.ok()) return o.status();
    config.search.cluster.objectives = *o;
  } else if (flag == "alpha") {
    ASSIGN_OR_RETURN(config.search.cluster.alpha, ParseDouble(flag, value));
  } else if (flag == "node-counts") {
    std::vector<int> counts;
    for (absl::string_view part : absl::StrSplit(value, ',')) {
      ASSIGN_OR_RETURN(const uint64_t m, ParseUnsigned(flag, std::string(part)));
      counts.push_back(static_cast<int>(std::min<uint64_t>(m, 1u << 30)));
    }
    config.search.cluster.params.node_counts = counts;
  } else if (flag == "sample-rates") {
    std::vector<double> rates;
    for (absl::string_view part : absl::StrSplit(value, ',')) {
      ASSIGN_OR_RETURN(const double f, ParseDouble(flag, std::string(part)));
      rates.push_back(f);
    }
    config.search.cluster.params.sample_rates = rates;
  } else if (flag == "net-bytes-per-s") {
    ASSIGN_OR_RETURN(config.search.cluster.params.net_bytes_per_s, ParseDouble(flag, value));
  } else if (flag == "cpu-rows-per-s") {
    ASSIGN_OR_RETURN(config.search.cluster.params.cpu_rows_per_s, ParseDouble(flag, value));
  } else if (flag == "scan-bytes-per-s") {
    ASSIGN_OR_RETURN(config.search.cluster.params.scan_bytes_per_s, ParseDouble(flag, value));
  } else if (flag == "stage-startup-s") {
    ASSIGN_OR_RETURN(config.search.cluster.params.stage_startup_s, ParseDouble(flag, value));
  } else if (flag == "bound") {
    ASSIGN_OR_RETURN(const Bound b, ParseBound(value));
    config.search.cluster.choice.bounds.push_back(b);
  } else if (flag == "prefer") {
    ASSIGN_OR_RETURN(config.search.cluster.choice.prefer, ParsePreference(value));
  } else if (flag == "plot") {
    if (value.empty()) return BadFlag(flag, value, "a file name");
    config.plot_path = value;
  } else if (flag == "slices") {
    // Checked with the query, by ValidateSlice (cli/main.cc).
    ASSIGN_OR_RETURN(const uint64_t p, ParseUnsigned(flag, value));
    if (p > (uint64_t{1} << 31)) return BadFlag(flag, value, "at most 2^31 slices");
    config.slices = static_cast<uint32_t>(p);
  } else if (flag == "workers") {
    ASSIGN_OR_RETURN(config.workers, ParseCount(flag, value, 1024));
  } else if (flag == "threads-per-worker") {
    ASSIGN_OR_RETURN(config.threads_per_worker, ParseCount(flag, value, kMaxSearchThreads));
  } else if (flag == "coordinator") {
    if (value.empty()) return BadFlag(flag, value, "HOST:PORT");
    config.coordinator = value;
  } else if (flag == "format") {
    if (value == "text")
      config.format = OutputFormat::kText;
    else if (value == "json")
      config.format = OutputFormat::kJson;
    else if (value == "dot")
      config.format = OutputFormat::kDot;
    else
      return BadFlag(flag, value, "text, json or dot");
  } else if (flag == "deadline-seconds") {
    const auto d = ParseDouble(flag, value);
    if (!d.ok() || !(*d > 0)) return BadFlag(flag, value, "a number of seconds > 0");
    config.deadline_seconds = *d;
  } else if (flag == "tier") {
    const auto tier = ParseTier(value);
    if (!tier) return BadFlag(flag, value, "auto, exact, idp, linear or greedy");
    config.tier = *tier;
  } else if (flag == "budget-seconds") {
    ASSIGN_OR_RETURN(config.budget_seconds, ParsePositiveSeconds(flag, value, 3600));
  } else if (flag == "partial-on-deadline") {
    ASSIGN_OR_RETURN(config.partial_on_deadline, ParseBool(flag, value));
  } else if (flag == "tls-ca" || flag == "tls-cert" || flag == "tls-key" || flag == "token-file") {
    if (value.empty()) return BadFlag(flag, value, "a file name");
    SetConnectionFlag(flag, value, config.tls, config.token_file);
  } else {
    return absl::InvalidArgumentError(absl::StrCat("--", flag, ": unknown flag"));
  }
  return absl::OkStatus();
}

// The arguments of a command over one query file: the file, --flag=VALUE
// pairs handed to `set_flag`, and bare flags `bare_flag` takes (it returns
// true when it took one).
absl::Status ParseQueryAndFlags(
    const std::vector<std::string>& args, std::string& query_path,
    absl::FunctionRef<absl::Status(const std::string&, const std::string&)> set_flag,
    absl::FunctionRef<bool(const std::string&)> bare_flag) {
  for (const std::string& arg : args) {
    if (bare_flag(arg)) continue;
    if (arg.rfind("--", 0) != 0) {
      if (!query_path.empty()) {
        return absl::InvalidArgumentError(
            absl::StrCat("QUERY.json: a second query file \"", arg, "\" was given"));
      }
      query_path = arg;
      continue;
    }
    const size_t eq = arg.find('=');
    if (eq == std::string::npos) {
      return absl::InvalidArgumentError(
          absl::StrCat(arg, ": flags take a value, as in ", arg, "=VALUE"));
    }
    RETURN_IF_ERROR(set_flag(arg.substr(2, eq - 2), arg.substr(eq + 1)));
  }
  if (query_path.empty()) return absl::InvalidArgumentError("QUERY.json: no query file given");
  return absl::OkStatus();
}

}  // namespace

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
  RETURN_IF_ERROR(ParseQueryAndFlags(
      args, config.query_path,
      [&](const std::string& flag, const std::string& value) {
        return SetFlag(config, flag, value);
      },
      [&](const std::string& arg) {
        if (arg != "--quiet") return false;
        config.quiet = true;
        return true;
      }));
  if (config.threads_per_worker && config.coordinator) {
    return absl::InvalidArgumentError(
        "--threads-per-worker: in-process workers only (a worker's --threads sets its own)");
  }
  config.search.threads = config.threads_per_worker.value_or(std::max(1, cores / config.workers));
  if ((config.tls.any() || !config.token_file.empty()) && !config.coordinator) {
    return absl::InvalidArgumentError(
        "--tls-ca, --tls-cert, --tls-key and --token-file: need --coordinator");
  }
  return config;
}

absl::StatusOr<CapacityConfig> ParseCapacityArgs(const std::vector<std::string>& args) {
  CapacityConfig config;
  RETURN_IF_ERROR(ParseQueryAndFlags(
      args, config.query_path,
      [&](const std::string& flag, const std::string& value) {
        return SetCapacityFlag(config, flag, value);
      },
      [](const std::string&) { return false; }));
  if (!(config.deadline_seconds > 0)) {
    return absl::InvalidArgumentError("--deadline-seconds=S: missing (the time to plan for)");
  }
  if ((config.tls.any() || !config.token_file.empty()) && !config.coordinator) {
    return absl::InvalidArgumentError(
        "--tls-ca, --tls-cert, --tls-key and --token-file: need --coordinator");
  }
  return config;
}

absl::StatusOr<WorkersConfig> ParseWorkersArgs(const std::vector<std::string>& args) {
  WorkersConfig config;
  for (const std::string& arg : args) {
    const size_t eq = arg.find('=');
    const std::string flag =
        arg.rfind("--", 0) == 0 && eq != std::string::npos ? arg.substr(2, eq - 2) : std::string();
    const std::string value = eq == std::string::npos ? "" : arg.substr(eq + 1);
    if (flag == "coordinator" && !value.empty()) {
      config.coordinator = value;
    } else if ((flag == "tls-ca" || flag == "tls-cert" || flag == "tls-key" ||
                flag == "token-file") &&
               !value.empty()) {
      SetConnectionFlag(flag, value, config.tls, config.token_file);
    } else {
      return absl::InvalidArgumentError(absl::StrCat(arg, ": unknown argument"));
    }
  }
  if (config.coordinator.empty()) {
    return absl::InvalidArgumentError("--coordinator=HOST:PORT: missing");
  }
  return config;
}

std::string Usage() {
  return R"(usage: sliceplan optimize QUERY.json [flags]

Finds the optimal join order of QUERY.json by solving slices of the plan
space on workers and merging their optima.

  --shape=bushy|left-deep        plan shape (default bushy)
  --cross-products=true|false    allow cross products (default true)
  --cost=cout|cluster            cost model (default cout)
  --slices=P                     slice count, a power of two (default: chosen
                                 from the query and the worker count)
  --workers=N                    in-process workers (default: the cores)
  --threads-per-worker=T         threads solving one slice together in each
                                 in-process worker (default: the cores over
                                 the workers)
  --coordinator=HOST:PORT        solve on a running coordinator
  --format=text|json|dot         output (default text)
  --tier=auto|exact|idp|linear|greedy
                                 how to search (default auto: exact when it
                                 fits the time on this pool, else idp from the
                                 best of greedy and linear; any query size)
  --budget-seconds=S             the time auto and idp plan for without a
                                 deadline (default 10)
  --memo-limit=BYTES             per-slice memo limit (default 8GiB)

The cluster model (--cost=cluster) returns the Pareto set of plans:
  --objectives=LIST              of latency_s,node_seconds,completeness (all)
  --alpha=A                      precision, >= 1 (1: exact frontier)
  --node-counts=4,16,64          node counts a join stage may rent
  --sample-rates=1               leaf sample rates (e.g. 1,0.1,0.01)
  --net-bytes-per-s=1.25e9 --cpu-rows-per-s=5e7 --scan-bytes-per-s=5e8
  --stage-startup-s=0.5          per-node throughputs and stage start-up
  --bound=METRIC<=V|>=V          repeatable, e.g. --bound=completeness>=0.99
  --prefer=METRIC|weights:M=W,.. which frontier plan to name (latency_s)
  --plot=FILE.svg                latency against node-seconds, one point a plan
  --tls-ca=FILE                  with --coordinator: verify it against this CA (TLS)
  --tls-cert=FILE --tls-key=FILE with --coordinator: present this certificate
  --token-file=FILE              with --coordinator: send its first bearer token
  --deadline-seconds=S           answer within S seconds: auto and idp return
                                 the best plan found by then
  --partial-on-deadline=true     --tier=exact or the cluster model: at the
                                 deadline, print the best plan so far (marked
                                 not proven optimal) instead of failing
  --quiet                        no progress bar on stderr

usage: sliceplan capacity QUERY.json --deadline-seconds=S [flags]

Predicts the exact search's wall time on pools of 1, 2, 4, ... 1,024
workers and marks the smallest that meets the deadline.

  --shape, --cross-products, --memo-limit   as for optimize
  --threads-per-worker=T         threads solving one slice together in each
                                 worker (default 1; with --coordinator, the
                                 pool's)
  --coordinator=HOST:PORT        the table from a running coordinator: its
                                 pool's threads, its rates (with --tls-ca,
                                 --tls-cert, --tls-key, --token-file)
  --format=text|json             output (default text)
  --plot=FILE.svg                predicted seconds against workers, log-log
  --seconds-per-split=S          the dense kernel's rate (default: measured
                                 here in under a second)
  --seconds-per-connected-set=S  the connected-only search's rate (same)

usage: sliceplan workers --coordinator=HOST:PORT [--tls-ca=FILE [--tls-cert=FILE --tls-key=FILE]]
                         [--token-file=FILE]

Lists the coordinator's worker pool and its health.

Exit status: 0 success, 2 bad input, 1 any other failure.
)";
}

}  // namespace sliceplan::cli
