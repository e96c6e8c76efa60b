#include "cli/cli_config.h"

#include <charconv>
#include <cstdlib>

#include "absl/strings/str_cat.h"
#include "core/status_macros.h"

namespace sliceplan::cli {
namespace {

absl::Status BadFlag(const std::string& flag, const std::string& value,
                     const std::string& expected) {
  return absl::InvalidArgumentError(
      absl::StrCat("--", flag, "=", value, ": expected ", expected));
}

absl::StatusOr<uint64_t> ParseUnsigned(const std::string& flag,
                                       const std::string& value) {
  uint64_t out = 0;
  const auto [end, err] =
      std::from_chars(value.data(), value.data() + value.size(), out);
  if (err != std::errc() || end != value.data() + value.size()) {
    return BadFlag(flag, value, "a whole number");
  }
  return out;
}

absl::Status SetFlag(OptimizeConfig& config, const std::string& flag,
                     const std::string& value) {
  if (flag == "shape") {
    if (value == "bushy") config.search.shape = PlanShape::kBushy;
    else if (value == "left-deep") config.search.shape = PlanShape::kLeftDeep;
    else return BadFlag(flag, value, "bushy or left-deep");
  } else if (flag == "cross-products") {
    if (value == "true") config.search.cross_products = true;
    else if (value == "false") config.search.cross_products = false;
    else return BadFlag(flag, value, "true or false");
  } else if (flag == "cost") {
    if (value == "cout") config.search.cost = CostModelKind::kCout;
    else if (value == "cluster") {
      return absl::UnimplementedError(
          "--cost=cluster: the cluster cost model is not in this build yet");
    } else return BadFlag(flag, value, "cout or cluster");
  } else if (flag == "slices") {
    ASSIGN_OR_RETURN(const uint64_t p, ParseUnsigned(flag, value));
    if (p == 0 || (p & (p - 1)) != 0 || p > (uint64_t{1} << 31)) {
      return BadFlag(flag, value, "a power of two (1, 2, 4, 8, ...)");
    }
    config.slices = static_cast<uint32_t>(p);
  } else if (flag == "workers") {
    ASSIGN_OR_RETURN(const uint64_t w, ParseUnsigned(flag, value));
    if (w == 0 || w > 1024) return BadFlag(flag, value, "a number in 1..1024");
    config.workers = static_cast<int>(w);
  } else if (flag == "coordinator") {
    if (value.empty()) return BadFlag(flag, value, "HOST:PORT");
    config.coordinator = value;
  } else if (flag == "format") {
    if (value == "text") config.format = OutputFormat::kText;
    else if (value == "json") config.format = OutputFormat::kJson;
    else if (value == "dot") config.format = OutputFormat::kDot;
    else return BadFlag(flag, value, "text, json or dot");
  } else if (flag == "deadline-seconds") {
    char* end = nullptr;
    const double d = std::strtod(value.c_str(), &end);
    if (value.empty() || *end != '\0' || !(d > 0)) {
      return BadFlag(flag, value, "a number of seconds > 0");
    }
    config.deadline_seconds = d;
  } else if (flag == "partial-on-deadline") {
    if (value == "true") config.partial_on_deadline = true;
    else if (value == "false") config.partial_on_deadline = false;
    else return BadFlag(flag, value, "true or false");
  } else if (flag == "memo-limit") {
    auto bytes = ParseBytes(value);
    if (!bytes.ok()) return BadFlag(flag, value, "bytes, e.g. 512MiB or 8GiB");
    config.search.memo_limit_bytes = *bytes;
  } else {
    return absl::InvalidArgumentError(absl::StrCat("--", flag, ": unknown flag"));
  }
  return absl::OkStatus();
}

}  // namespace

absl::StatusOr<uint64_t> ParseBytes(const std::string& text) {
  static constexpr std::pair<const char*, uint64_t> kSuffixes[] = {
      {"GiB", uint64_t{1} << 30}, {"MiB", uint64_t{1} << 20},
      {"KiB", uint64_t{1} << 10}, {"", 1}};
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

absl::StatusOr<OptimizeConfig> ParseOptimizeArgs(
    const std::vector<std::string>& args, int default_workers) {
  OptimizeConfig config;
  config.workers = default_workers;
  for (const std::string& arg : args) {
    if (arg == "--quiet") {
      config.quiet = true;
      continue;
    }
    if (arg.rfind("--", 0) != 0) {
      if (!config.query_path.empty()) {
        return absl::InvalidArgumentError(absl::StrCat(
            "QUERY.json: a second query file \"", arg, "\" was given"));
      }
      config.query_path = arg;
      continue;
    }
    const size_t eq = arg.find('=');
    if (eq == std::string::npos) {
      return absl::InvalidArgumentError(
          absl::StrCat(arg, ": flags take a value, as in ", arg, "=VALUE"));
    }
    RETURN_IF_ERROR(SetFlag(config, arg.substr(2, eq - 2), arg.substr(eq + 1)));
  }
  if (config.query_path.empty()) {
    return absl::InvalidArgumentError("QUERY.json: no query file given");
  }
  return config;
}

absl::StatusOr<WorkersConfig> ParseWorkersArgs(const std::vector<std::string>& args) {
  WorkersConfig config;
  for (const std::string& arg : args) {
    if (arg.rfind("--coordinator=", 0) == 0 && arg.size() > 14) {
      config.coordinator = arg.substr(14);
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
  --coordinator=HOST:PORT        solve on a running coordinator
  --format=text|json|dot         output (default text)
  --memo-limit=BYTES             per-slice memo limit (default 8GiB)
  --deadline-seconds=S           give up after S seconds
  --partial-on-deadline=true     at the deadline, print the best plan so far
                                 (marked not proven optimal) instead of failing
  --quiet                        no progress bar on stderr

usage: sliceplan workers --coordinator=HOST:PORT

Lists the coordinator's worker pool and its health.

Exit status: 0 success, 2 bad input, 1 any other failure.
)";
}

}  // namespace sliceplan::cli
