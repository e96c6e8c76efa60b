// sliceplan: the command-line front end. Parses flags into a config, runs
// the embedded coordinator or calls a remote one, and prints the result.
#include <iostream>
#include <optional>
#include <string>
#include <thread>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "cli/capacity_render.h"
#include "cli/cli_config.h"
#include "cli/frontier_plot.h"
#include "cli/output_file.h"
#include "cli/progress_bar.h"
#include "cli/render.h"
#include "cli/rpc_client.h"
#include "cli/template_commands.h"
#include "core/capacity/capacity_table.h"
#include "core/model/input_limits.h"
#include "core/model/status_macros.h"
#include "core/model/wide_query.h"
#include "core/slice_planner.h"
#include "schedule/embedded_pool.h"
#include "tiers/join_forest.h"
#include "wire/query_proto.h"
#include "wire/version.h"

namespace sliceplan::cli {
namespace {

// Exit statuses of docs/interfaces.md.
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

absl::StatusOr<TieredOutcome> Solve(const OptimizeConfig& config, const WideQuery& query,
                                    ProgressBar& bar, TimedTiers& timer) {
  const auto progress = [&bar](const ScheduleProgress& p) { bar.Update(p); };
  if (config.coordinator) {
    RemoteRequest request;
    request.coordinator = *config.coordinator;
    request.options = config.search;
    request.slice_count = config.slices.value_or(0);
    request.tier = config.tier;
    request.budget_seconds = config.budget_seconds;
    request.deadline_seconds = config.deadline_seconds;
    request.partial_on_deadline = config.partial_on_deadline;
    request.tls = config.tls;
    request.token_file = config.token_file;
    return OptimizeRemote(request, query, progress);
  }
  TierRequest tiers;
  tiers.tier = config.tier;
  tiers.slice_count = config.slices.value_or(0);
  tiers.budget_seconds =
      config.deadline_seconds > 0 ? config.deadline_seconds : config.budget_seconds;
  ScheduleOptions schedule;
  schedule.on_progress = progress;
  schedule.partial_on_deadline = config.partial_on_deadline;
  if (config.deadline_seconds > 0) schedule.deadline = SteadyAfter(config.deadline_seconds);
  return RunEmbeddedTiers(query, config.search, tiers, config.workers, schedule, &timer);
}

// --slices fixes the exact search's slice count: checked against the query.
absl::Status CheckSlicesFlag(const OptimizeConfig& config, const WideQuery& query) {
  if (!config.slices) return absl::OkStatus();
  if (query.size() > kMaxRelations) {
    return absl::InvalidArgumentError(
        absl::StrCat("--slices: slices divide the exact search, which takes at most ",
                     kMaxRelations, " relations (", query.size(), " given)"));
  }
  return ValidateSlice({0, *config.slices}, query.size(), config.search.shape,
                       {"--slices", "slice index"});
}

// In-process workers past the cores run no faster and can run much slower
// (every thread waits its turn for a core): said with the numbers.
// Threads up to twice the cores pass silently (common practice).
void WarnIfOversubscribed(const OptimizeConfig& config, int cores) {
  if (config.coordinator) return;
  const int64_t threads = int64_t{config.workers} * config.search.threads;
  if (threads <= 2 * int64_t{cores}) return;
  std::cerr << "sliceplan: warning: " << config.workers << " workers x " << config.search.threads
            << " threads = " << threads << " search threads on " << cores
            << " cores; expect it slower than with at most " << cores
            << " threads (--workers, --threads-per-worker)\n";
}

int Optimize(const std::vector<std::string>& args) {
  const int cores = static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
  auto config = ParseOptimizeArgs(args, cores);
  if (!config.ok()) return Fail(config.status());
  if (auto s = ValidateSearchOptions(config->search); !s.ok()) return Fail(s);
  if (auto s = CheckOptionLimits(config->search, InputLimits{}); !s.ok()) return Fail(s);
  if (!config->plot_path.empty() && config->search.cost != CostModelKind::kCluster) {
    return Fail(absl::InvalidArgumentError("--plot: needs --cost=cluster (a frontier to plot)"));
  }
  auto query = ReadWideQueryFile(config->query_path, config->limits);
  if (!query.ok()) return Fail(query.status());
  if (auto s = CheckSlicesFlag(*config, *query); !s.ok()) return Fail(s);
  // Checked before the search: an unwritable plot must cost no search.
  std::optional<OutputFile> plot;
  if (!config->plot_path.empty()) {
    auto prepared = OutputFile::Prepare(config->plot_path, "--plot", {config->query_path});
    if (!prepared.ok()) return Fail(prepared.status());
    plot.emplace(*std::move(prepared));
  }
  WarnIfOversubscribed(*config, cores);
  std::optional<Query> exact;
  if (query->size() <= kMaxRelations) exact = *ToExactQuery(*query);
  // With a deadline the tiers run on its thread and the answer comes by
  // the deadline; a run cut off there is joined when the command returns.
  TimedTiers timer;
  absl::StatusOr<TieredOutcome> outcome;
  {
    ProgressBar bar(!config->quiet);
    outcome = Solve(*config, *query, bar, timer);
  }
  if (!outcome.ok()) return Fail(outcome.status());
  RunInfo info{&*query, exact ? &*exact : nullptr, config->search, config->workers,
               !config->slices};
  if (config->coordinator) info.workers = static_cast<int>(outcome->schedule.workers_used);
  switch (config->format) {
    case OutputFormat::kText:
      std::cout << RenderText(*outcome, info);
      break;
    case OutputFormat::kJson:
      std::cout << RenderJson(*outcome, info);
      break;
    case OutputFormat::kDot:
      std::cout << RenderDot(*outcome, info);
      break;
  }
  // The answer is printed first: a plot that fails to write loses nothing.
  if (plot) {
    std::cout.flush();
    const absl::Status written = plot->Commit(
        FrontierSvg(outcome->frontier, *query, outcome->chosen, config->search.cluster.choice));
    if (!written.ok()) return Fail(written);
  }
  std::cout.flush();
  return std::cout ? kExitOk : kExitFailure;
}

int Capacity(const std::vector<std::string>& args) {
  auto config = ParseCapacityArgs(args);
  if (!config.ok()) return Fail(config.status());
  if (auto s = ValidateSearchOptions(config->search); !s.ok()) return Fail(s);
  auto query = ReadWideQueryFile(config->query_path);
  if (!query.ok()) return Fail(query.status());
  std::optional<OutputFile> plot;
  if (!config->plot_path.empty()) {
    auto prepared = OutputFile::Prepare(config->plot_path, "--plot", {config->query_path});
    if (!prepared.ok()) return Fail(prepared.status());
    plot.emplace(*std::move(prepared));
  }
  if (!config->search.cross_products && !IsConnected(*query)) {
    return Fail(absl::InvalidArgumentError(
        "the join graph is not connected, so every plan has a cross product; plan with "
        "--cross-products=true"));
  }
  CapacityInfo info{query->size(), config->search, !config->RateGiven()};
  absl::StatusOr<CapacityTable> table;
  if (config->coordinator) {
    RemoteCapacity request{*config->coordinator,     config->tls,
                           config->token_file,       config->search,
                           config->deadline_seconds, config->threads_per_worker.value_or(0)};
    if (config->split_rate_given) request.seconds_per_split = config->rates.dense_split_seconds;
    if (config->set_rate_given) {
      request.seconds_per_connected_set = config->rates.connected_set_seconds;
    }
    auto remote = CapacityRemote(request, *query);
    if (!remote.ok()) return Fail(remote.status());
    table = std::move(remote->first);
  } else {
    table =
        PlanCapacityFor(*query, config->search, config->deadline_seconds,
                        config->threads_per_worker.value_or(1), config->rates, config->RateGiven());
  }
  if (query->size() > kMaxRelations) info.calibrated = false;
  if (!table.ok()) return Fail(table.status());
  std::cout << (config->json ? RenderCapacityJson(*table, info) : RenderCapacityText(*table, info));
  std::cout.flush();
  if (plot) {
    if (const absl::Status written = plot->Commit(CapacitySvg(*table, info)); !written.ok()) {
      return Fail(written);
    }
  }
  return std::cout ? kExitOk : kExitFailure;
}

int Workers(const std::vector<std::string>& args) {
  auto config = ParseWorkersArgs(args);
  if (!config.ok()) return Fail(config.status());
  auto pool = ListWorkersRemote(config->coordinator, config->tls, config->token_file);
  if (!pool.ok()) return Fail(pool.status());
  std::cout << absl::StrFormat("%-28s %-9s %6s %7s %8s %8s  %s\n", "worker", "health", "slices",
                               "threads", "solved", "failed", "last error");
  int healthy = 0;
  for (const auto& w : pool->workers()) {
    healthy += w.healthy();
    std::cout << absl::StrFormat("%-28s %-9s %6u %7u %8u %8u  %s\n", w.address(),
                                 w.healthy() ? "healthy" : "down", w.concurrent_slices(),
                                 w.threads_per_slice(), w.slices_solved(), w.failures(),
                                 w.last_error());
  }
  std::cout << healthy << " of " << pool->workers_size() << " workers healthy\n";
  return kExitOk;
}

}  // namespace
}  // namespace sliceplan::cli

int main(int argc, char** argv) {
  using namespace sliceplan::cli;
  std::vector<std::string> args(argv + 1, argv + argc);
  if (!args.empty() && (args[0] == "--version" || args[0] == "version")) {
    std::cout << sliceplan::VersionLine("sliceplan") << "\n";
    return kExitOk;
  }
  if (args.empty() || args[0] == "--help" || args[0] == "help") {
    (args.empty() ? std::cerr : std::cout) << Usage();
    return args.empty() ? kExitBadInput : kExitOk;
  }
  const std::string command = args[0];
  args.erase(args.begin());
  for (const std::string& a : args) {
    if (a == "--help" || a == "-h") {
      std::string help = CommandUsage(command);
      if (help.empty()) help = TemplateCommandUsage(command);
      std::cout << (help.empty() ? Usage() : help);
      return kExitOk;
    }
  }
  if (command == "optimize") return Optimize(args);
  if (command == "workers") return Workers(args);
  if (command == "capacity") return Capacity(args);
  if (command == "prepare" || command == "choose") {
    const int cores = static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
    auto out = command == "prepare" ? RunPrepare(args, cores) : RunChoose(args);
    if (!out.ok()) return Fail(out.status());
    std::cout << *out;
    std::cout.flush();
    return std::cout ? kExitOk : kExitFailure;
  }
  const std::string meant =
      DidYouMean(command, {"optimize", "workers", "capacity", "prepare", "choose"});
  std::cerr << "sliceplan: unknown command \"" << command << "\""
            << (meant.empty() ? "" : absl::StrCat("; did you mean ", meant, "?")) << "\n"
            << Usage();
  return kExitBadInput;
}
