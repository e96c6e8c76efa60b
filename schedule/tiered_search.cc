#include "schedule/tiered_search.h"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <optional>
#include <utility>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "core/capacity/capacity_table.h"
#include "core/capacity/cluster_forecast.h"
#include "core/capacity/rate_calibration.h"
#include "core/cost/cluster_range.h"
#include "core/cost/pareto.h"
#include "core/merge.h"
#include "core/model/input_limits.h"
#include "core/model/status_macros.h"
#include "core/model/value_range.h"
#include "core/search/search_control.h"
#include "core/slice_planner.h"
#include "core/slice_solver.h"
#include "schedule/anytime_fanout.h"
#include "schedule/local_worker.h"
#include "tiers/greedy.h"
#include "tiers/join_forest.h"
#include "tiers/linear_dp.h"

namespace sliceplan {
namespace {

using Clock = std::chrono::steady_clock;

// The options the capacity model forecasts with: a slice runs on the
// threads the caller asked for, or on those the slowest healthy worker
// puts on one, whichever is more (remote workers set their own).
SearchOptions ForecastOptions(const SearchOptions& options, std::span<SliceWorker* const> workers) {
  SearchOptions out = options;
  out.threads = std::max(options.threads, FewestThreadsPerSlice(workers));
  return out;
}

int PoolConcurrentSlices(std::span<SliceWorker* const> workers) {
  int concurrent = 0;
  for (SliceWorker* w : workers) {
    if (w->Healthy()) concurrent += w->ConcurrentSlices();
  }
  return std::max(1, concurrent);
}

// The tier checks that need no search. Messages name the tier as both
// the CLI's --tier and the RPC's `tier` field ask for it.
absl::Status CheckTierFits(const WideQuery& query, const SearchOptions& options, SearchTier tier) {
  if (tier == SearchTier::kAnytime && options.cost != CostModelKind::kCluster) {
    return absl::InvalidArgumentError(
        "tier anytime: searches the cluster model's Pareto set (--cost=cluster); the cout "
        "model's tiers are exact, idp, linear and greedy");
  }
  if (tier == SearchTier::kAnytime && !query.joins().empty()) {
    return absl::InvalidArgumentError(
        "tier anytime: reorders inner joins only; a query with outer, semi or anti joins "
        "(`joins`) is searched by the exact tier (or auto)");
  }
  if (options.cost == CostModelKind::kCluster) {
    // Parameters that saturate every plan are refused before any search
    // (docs/numeric-range.md), in every tier.
    RETURN_IF_ERROR(ValidateClusterParams(options.cluster.params));
    RETURN_IF_ERROR(CheckClusterInRange(query.relations(), options.cluster.params));
    RETURN_IF_ERROR(CheckCoutInRange(query));  // the last stage's output rows
    if (tier != SearchTier::kAuto && tier != SearchTier::kExact && tier != SearchTier::kAnytime) {
      return absl::InvalidArgumentError(
          absl::StrCat("tier ", TierName(tier),
                       ": the cluster model is searched by the exact or the anytime tier"));
    }
    if (tier == SearchTier::kExact && query.size() > kMaxRelations) {
      return absl::InvalidArgumentError(absl::StrCat(
          "relations: ", query.size(), " relations given; the exact Pareto search takes at most ",
          kMaxRelations, " (the anytime tier, or auto, takes any size)"));
    }
  }
  if (tier == SearchTier::kIdp && options.shape == PlanShape::kLeftDeep) {
    return absl::InvalidArgumentError(
        "tier idp: idp builds bushy plans; for left-deep plans use exact, linear or greedy");
  }
  if (tier == SearchTier::kExact && query.size() > kMaxRelations) {
    return ToExactQuery(query).status();
  }
  if (tier == SearchTier::kLinear && query.size() > kMaxLinearRelations) {
    return CheckLinearSize(query);
  }
  const bool joins = !query.joins().empty();
  if (joins && tier != SearchTier::kAuto && tier != SearchTier::kExact) {
    return absl::InvalidArgumentError(absl::StrCat(
        "tier ", TierName(tier),
        ": the greedy, linear and idp tiers reorder inner joins only; a query with outer, semi "
        "or anti joins (`joins`) is searched by the exact tier (or auto)"));
  }
  if (!joins && !options.cross_products && !IsConnected(query)) {
    return absl::NotFoundError(
        "the join graph is not connected, so every plan has a cross product; allow them "
        "(cross products = true)");
  }
  return absl::OkStatus();
}

// The cluster model's forecast (core/capacity/cluster_forecast.h) spends
// a twentieth of the time left, at most a second. The exact tier asked
// for is refused when the forecast on the pool passes three times the
// time left: the forecast has been within 0.54x to 2.5x of the search
// (docs/tiers.md), so a search refused would not have finished.
constexpr double kClusterForecastShare = 0.05;
constexpr double kClusterRefuseFactor = 3;

// One run's state: the incumbent and what each tier did.
class TierRun {
 public:
  TierRun(const WideQuery& query, const SearchOptions& options, const TierRequest& request,
          std::span<SliceWorker* const> workers, const ScheduleOptions& schedule)
      : query_(query),
        options_(options),
        request_(request),
        workers_(workers),
        schedule_(schedule),
        start_(Clock::now()),
        deadline_(std::min(schedule.deadline.value_or(Clock::time_point::max()),
                           SteadyAfter(request.budget_seconds))),
        concurrent_slices_(PoolConcurrentSlices(workers)) {}

  absl::StatusOr<TieredOutcome> Run() {
    const SearchTier tier = request_.tier;
    if (options_.cost == CostModelKind::kCluster && tier != SearchTier::kExact &&
        query_.joins().empty()) {
      return ClusterTiers();
    }
    if (options_.cost == CostModelKind::kCluster || tier == SearchTier::kExact ||
        !query_.joins().empty()) {
      return ExactAlone();
    }
    // A join that saturates makes every plan's cost the ceiling: refused
    // at any size, as the exact tier refuses it (docs/numeric-range.md).
    RETURN_IF_ERROR(CheckCoutInRange(query_));
    WidePlan greedy = GreedyPlan(query_, options_.shape, deadline_, &greedy_);
    out_.start_cost = greedy.cost();
    Offer(std::move(greedy), SearchTier::kGreedy);
    if (query_.size() <= 2) out_.proven_optimal = true;  // one plan (up to sides)
    if (tier == SearchTier::kGreedy || query_.size() <= 2) {
      return Finish(tier == SearchTier::kGreedy ? "greedy: requested" : "greedy: one plan");
    }
    if (tier == SearchTier::kLinear || query_.size() <= kAutoLinearRelations) {
      RETURN_IF_ERROR(TryLinear(tier == SearchTier::kLinear));
      if (tier == SearchTier::kLinear) return Finish("linear: requested");
    }
    if (Cancelled()) return absl::CancelledError("the caller cancelled");
    if (tier == SearchTier::kAuto && query_.size() <= kMaxRelations) {
      ASSIGN_OR_RETURN(const bool done, TryExact());
      if (done) return Finish(reason_);
    } else if (tier == SearchTier::kAuto) {
      reason_ = absl::StrCat(query_.size(), " relations, past the exact search's ", kMaxRelations);
    }
    if (options_.shape == PlanShape::kLeftDeep) {
      return Finish(absl::StrCat(reason_,
                                 "; idp builds bushy plans, so the best of greedy and "
                                 "linear is returned"));
    }
    RunIdp();
    if (Cancelled()) return absl::CancelledError("the caller cancelled");
    return Finish(reason_);
  }

 private:
  bool Cancelled() const { return schedule_.cancelled && schedule_.cancelled(); }
  double Remaining() const { return std::max(0.0, SecondsBetween(Clock::now(), deadline_)); }

  void Offer(WidePlan plan, SearchTier tier) {
    if (!out_.plan.nodes.empty() && !(plan.cost() < out_.plan.cost())) return;
    out_.plan = std::move(plan);
    out_.tier = tier;
    Post(out_.plan, tier);
  }

  // Posts `plan` to the request's board, if it has one (the deadline
  // answer's candidates); `start_cost` defaults to greedy's.
  void Post(const WidePlan& plan, SearchTier tier, std::optional<double> start_cost = {}) const {
    if (request_.board == nullptr) return;
    request_.board->Post({plan, tier, start_cost.value_or(out_.start_cost)});
  }

  absl::StatusOr<TieredOutcome> Finish(std::string reason) {
    out_.reason = std::move(reason);
    if (greedy_.cut) {
      absl::StrAppend(&out_.reason, "; greedy reached the deadline after choosing ",
                      greedy_.greedy_joins, " of ", query_.size() - 1,
                      " joins and joined the rest along the predicates");
    }
    out_.wall_seconds = SecondsBetween(start_, Clock::now());
    return std::move(out_);
  }

  // The cluster model's exact search forecast, and its seconds on the
  // `p` slices over this pool's places.
  struct PoolForecast {
    ClusterForecast forecast;
    double pool_seconds = 0;
    uint32_t places = 1;
  };
  absl::StatusOr<PoolForecast> ForecastCluster(const Query& exact, uint32_t p) const {
    SearchControl control(nullptr, deadline_);
    if (schedule_.cancelled) control.set_cancel_check(schedule_.cancelled);
    const double budget = std::min(kClusterForecastMaxSeconds, kClusterForecastShare * Remaining());
    ASSIGN_OR_RETURN(ClusterForecast f, ForecastClusterSearch(exact, options_, budget, control));
    PoolForecast out{f, 0,
                     std::max<uint32_t>(1, std::min(p, static_cast<uint32_t>(concurrent_slices_)))};
    out.pool_seconds = f.seconds / out.places;
    return out;
  }

  // The exact search's run as the answer: its plan, proof and coverage.
  void TakeExact(ScheduleOutcome outcome) {
    out_.tier = SearchTier::kExact;
    out_.proven_optimal = outcome.proven_optimal;
    out_.coverage = outcome.coverage;
    out_.plan = FromExactPlan(outcome.result.plan);
    for (const Plan& p : outcome.result.frontier) out_.frontier.push_back(FromExactPlan(p));
    out_.chosen = outcome.result.chosen;
    out_.schedule = std::move(outcome);
    out_.exact_ran = true;
  }

  // The exact tier forced, or the cluster model: the scheduler's rules.
  absl::StatusOr<TieredOutcome> ExactAlone() {
    ASSIGN_OR_RETURN(const Query exact, ToExactQuery(query_));
    const uint32_t p = request_.slice_count != 0
                           ? request_.slice_count
                           : ChooseSliceCount(exact, options_, concurrent_slices_);
    std::optional<PoolForecast> forecast;
    if (options_.cost == CostModelKind::kCluster && query_.joins().empty()) {
      // Refused up front rather than left running to the deadline.
      ASSIGN_OR_RETURN(const PoolForecast f, ForecastCluster(exact, p));
      forecast = f;
      const double left = Remaining();
      if (!f.forecast.measured && f.pool_seconds > kClusterRefuseFactor * left) {
        return absl::ResourceExhaustedError(absl::StrFormat(
            "the cluster model's exact Pareto search is forecast at %s, so about %.3g s over %u "
            "places in parallel, more than %g times the %.3g s left; --tier=auto returns the "
            "anytime search's Pareto set by the deadline",
            f.forecast.Describe(), f.pool_seconds, f.places, kClusterRefuseFactor, left));
      }
    }
    const bool joins = !query_.joins().empty();
    const bool fallback =
        schedule_.partial_on_deadline && options_.cost == CostModelKind::kCout && !joins;
    std::optional<WidePlan> greedy;
    if (fallback) {  // posted first: a deadline answer is never nothing
      greedy = GreedyPlan(query_, options_.shape);
      if (!IsSaturated(greedy->cost())) Post(*greedy, SearchTier::kGreedy, greedy->cost());
    }
    absl::StatusOr<ScheduleOutcome> run = RunSlices(exact, options_, p, workers_, schedule_);
    if (absl::IsDeadlineExceeded(run.status()) && forecast) {
      run = absl::DeadlineExceededError(absl::StrFormat(
          "%s (the forecast: %s, so about %.3g s over %u places)", run.status().message(),
          forecast->forecast.Describe(), forecast->pool_seconds, forecast->places));
    }
    if (absl::IsDeadlineExceeded(run.status()) && fallback) {
      // Not one slice by the deadline: the best plan so far is greedy's
      // (milliseconds), marked unproven, never nothing.
      out_.plan = *std::move(greedy);
      out_.tier = SearchTier::kGreedy;
      out_.proven_optimal = false;
      out_.coverage = 0;
      return Finish(absl::StrCat("exact: ", run.status().message(),
                                 "; the greedy plan stands, not proven optimal"));
    }
    // Only a complete search shows every plan saturates (a partial merge
    // has seen some slices).
    if (options_.cost == CostModelKind::kCluster && absl::IsOutOfRange(run.status()) &&
        !schedule_.partial_on_deadline) {
      return ClusterPlansSaturated(query_.relations(), options_.cluster.params);
    }
    ASSIGN_OR_RETURN(ScheduleOutcome outcome, std::move(run));
    TakeExact(std::move(outcome));
    if (request_.tier == SearchTier::kExact) return Finish("exact: requested");
    if (options_.cost == CostModelKind::kCluster) return Finish("exact: the cluster model");
    return Finish(
        "exact: the query has outer, semi or anti joins, which the greedy, linear and idp "
        "tiers cannot reorder (they are skipped)");
  }

  // The cluster model, auto or anytime. Auto gives the exact Pareto search
  // half the time (its slices solved are kept if it does not finish); the
  // anytime search takes the rest, or all of it when asked for, and the
  // answer is the non-dominated union of both.
  absl::StatusOr<TieredOutcome> ClusterTiers() {
    std::vector<WidePlan> exact_plans;
    std::string reason = "anytime: requested";
    const int reach = options_.cross_products ? kClusterExactReach : kClusterExactReachConnected;
    if (request_.tier == SearchTier::kAuto && query_.size() > reach) {
      reason =
          absl::StrCat("anytime: ", query_.size(),
                       " relations, more than auto tries the exact Pareto search on (", reach, ")");
    } else if (request_.tier == SearchTier::kAuto) {
      ASSIGN_OR_RETURN(const Query exact, ToExactQuery(query_));
      const uint32_t p = request_.slice_count != 0
                             ? request_.slice_count
                             : ChooseSliceCount(exact, options_, concurrent_slices_);
      ASSIGN_OR_RETURN(const PoolForecast f, ForecastCluster(exact, p));
      if (!f.forecast.measured && f.pool_seconds > Remaining()) {
        return Anytime(
            {}, absl::StrFormat("anytime: the exact Pareto search is forecast at %s, "
                                "so about %.3g s over %u places, past the %.3g s left",
                                f.forecast.Describe(), f.pool_seconds, f.places, Remaining()));
      }
      ScheduleOptions half = schedule_;
      half.deadline = start_ + (deadline_ - start_) / 2;
      half.partial_on_deadline = true;
      absl::StatusOr<ScheduleOutcome> run = RunSlices(exact, options_, p, workers_, half);
      if (run.ok() && run->proven_optimal) {
        TakeExact(*std::move(run));
        return Finish("exact: the cluster model's Pareto search finished in half the time");
      }
      if (run.ok()) {
        for (const Plan& plan : run->result.frontier) exact_plans.push_back(FromExactPlan(plan));
        run->result.frontier.clear();
        out_.coverage = run->coverage;
        out_.schedule = *std::move(run);
        reason = absl::StrFormat(
            "anytime: the exact Pareto search solved %.0f%% of its slices "
            "in half the time; its plans are kept",
            100 * out_.coverage);
      } else if (absl::IsCancelled(run.status())) {
        return run.status();
      } else {
        reason = absl::StrCat("anytime: the exact Pareto search gave nothing in half the time (",
                              run.status().message(), ")");
      }
    }
    return Anytime(std::move(exact_plans), std::move(reason));
  }

  // The anytime search across the pool (schedule/anytime_fanout.h): a
  // part per concurrent slice, all stopped a reserve before the deadline,
  // since their sets are checked, merged and converted after they stop
  // and all that before a deadline answer must leave
  // (schedule/timed_tiers.h). With no healthy worker it runs here, as one
  // part.
  absl::StatusOr<TieredOutcome> Anytime(std::vector<WidePlan> plans, std::string reason) {
    AnytimeFanoutRequest fan;
    fan.query = &query_;
    fan.options = options_;
    fan.deadline = deadline_ - AnytimeReserve(Remaining(), query_.size());
    fan.cancelled = schedule_.cancelled;
    fan.request_id = schedule_.request_id;
    // At least once a second the parts' sets' sizes, and at the end the
    // merged set's.
    const auto report = [this](uint64_t kept, uint64_t trees) {
      if (!schedule_.on_progress) return;
      ScheduleProgress p;
      p.elapsed_seconds = SecondsBetween(start_, Clock::now());
      p.frontier_plans = kept;
      p.trees = trees;
      schedule_.on_progress(p);
    };
    fan.on_progress = report;
    LocalWorker here("coordinator");
    SliceWorker* one[] = {&here};
    absl::StatusOr<AnytimeFanout> run = RunAnytimeFanout(fan, workers_);
    if (absl::IsFailedPrecondition(run.status())) {  // no healthy worker: one part here
      absl::StrAppend(&reason, "; no worker is healthy, so one part ran on the coordinator");
      run = RunAnytimeFanout(fan, one);
    } else if (run.ok() && run->answered == 0 && plans.empty()) {
      // Every part failed and nothing else was found: a part here, for
      // what is left (past its deadline it still answers its seeds' set).
      absl::StrAppend(&reason, "; every part on the pool failed (", run->failure,
                      "), so one ran on the coordinator");
      run = RunAnytimeFanout(fan, one);
    }
    RETURN_IF_ERROR(run.status());
    for (WidePlan& p : run->plans) plans.push_back(std::move(p));
    if (plans.empty()) {  // no part answered, and no exact slice was solved
      return absl::UnavailableError(absl::StrCat("anytime: none of the ", run->parts,
                                                 " parts answered (", run->failure, ")"));
    }
    RETURN_IF_ERROR(TakeFrontier(std::move(plans)));
    report(out_.frontier.size(), run->trees);
    out_.tier = SearchTier::kAnytime;
    out_.proven_optimal = false;
    absl::StrAppendFormat(&reason, "; %d %s, %d trees evaluated, %d plans in the set", run->parts,
                          run->parts == 1 ? "part" : "parts", run->trees, out_.frontier.size());
    if (run->answered < run->parts) {
      const uint32_t failed = run->parts - run->answered;
      absl::StrAppendFormat(&reason, "; %d %s nothing (first: %s)", failed,
                            failed == 1 ? "part gave" : "parts gave", run->failure);
    }
    return Finish(std::move(reason));
  }

  // The answer's Pareto set: the non-dominated plans of `plans` on the
  // selected objectives, less those at the ceiling (no number to report,
  // docs/numeric-range.md), and the plan the choice rule names.
  absl::Status TakeFrontier(std::vector<WidePlan> plans) {
    std::erase_if(plans, [](const WidePlan& p) {
      return IsSaturated(p.root().metrics.latency_s) || IsSaturated(p.root().metrics.node_seconds);
    });
    if (plans.empty()) return ClusterPlansSaturated(query_.relations(), options_.cluster.params);
    std::vector<ClusterCosts> costs;
    for (const WidePlan& p : plans) costs.push_back(p.root().metrics);
    out_.frontier.clear();
    std::vector<ClusterCosts> kept;
    for (size_t k : FrontierIndices(costs, options_.cluster.objectives)) {
      out_.frontier.push_back(std::move(plans[k]));
      kept.push_back(costs[k]);
    }
    out_.chosen = ChoosePlan(kept, options_.cluster.choice);
    out_.plan = out_.frontier[out_.chosen.value_or(0)];
    return absl::OkStatus();
  }

  absl::Status TryLinear(bool forced) {
    SearchControl control(nullptr, deadline_);
    if (schedule_.cancelled) control.set_cancel_check(schedule_.cancelled);
    auto plan = LinearPlan(query_, options_.shape, options_.cross_products, control);
    if (plan.ok()) {
      Offer(*std::move(plan), SearchTier::kLinear);
      return absl::OkStatus();
    }
    // A forced linear tier reports why it has no plan, except where
    // greedy's plan is the honest answer (no connected plan along the
    // order; the deadline).
    if (forced && plan.status().code() == absl::StatusCode::kResourceExhausted) {
      return plan.status();
    }
    reason_ = absl::StrCat("linear: ", plan.status().message(), "; the greedy plan stands");
    return absl::OkStatus();
  }

  // Runs the exact search when the model says it fits. True when it
  // finished (the answer is proven optimal).
  absl::StatusOr<bool> TryExact() {
    ASSIGN_OR_RETURN(const Query exact, ToExactQuery(query_));
    const double remaining = Remaining();
    const SearchOptions forecast_options = ForecastOptions(options_, workers_);
    const ExactWork work = MeasureExactWork(exact, forecast_options);
    const auto forecast = [&](const MachineRates& rates) {
      return request_.slice_count != 0
                 ? ForecastExact(exact, forecast_options, work, concurrent_slices_, rates,
                                 request_.slice_count)
                 : FastestForecast(exact, forecast_options, work, concurrent_slices_, rates);
    };
    ExactForecast f = forecast(request_.rates);
    const char* rates_note = "";
    if (!(f.seconds <= kExactShare * remaining) && !request_.rates_given &&
        remaining >= kCalibrateFromSeconds) {
      // The defaults are cautious: measure before giving the search up,
      // in at most kCalibrationShare of the time left (else they stand).
      SearchControl control(nullptr, SteadyAfter(kCalibrationShare * remaining));
      if (schedule_.cancelled) control.set_cancel_check(schedule_.cancelled);
      if (auto measured = CalibrateRatesOnce(exact, forecast_options, control); measured.ok()) {
        f = forecast(*measured);
        rates_note = " (rates measured on this machine)";
      }
    }
    out_.forecast = f;
    if (!(f.seconds <= kExactShare * Remaining())) {
      reason_ = absl::StrFormat(
          "the exact search was predicted %.3g s%s%s on %d concurrent slices, past %.0f%% of the "
          "%.3g s left",
          f.seconds, f.estimated ? " (connected sets sampled)" : "", rates_note, concurrent_slices_,
          100 * kExactShare, remaining);
      return false;
    }
    ScheduleOptions schedule = schedule_;
    schedule.deadline = deadline_;
    schedule.partial_on_deadline = true;
    auto outcome = RunSlices(exact, options_, f.slices, workers_, schedule);
    if (!outcome.ok()) {
      const absl::StatusCode code = outcome.status().code();
      if (code != absl::StatusCode::kDeadlineExceeded &&
          code != absl::StatusCode::kResourceExhausted) {
        return outcome.status();
      }
      reason_ = absl::StrFormat("exact (predicted %.3g s) stopped: %s", f.seconds,
                                outcome.status().message());
      return false;
    }
    out_.coverage = outcome->coverage;
    const bool proven = outcome->proven_optimal;
    if (proven) {
      // The optimum: it stands even where an incumbent ties it.
      out_.plan = FromExactPlan(outcome->result.plan);
      out_.tier = SearchTier::kExact;
      out_.proven_optimal = true;
      Post(out_.plan, SearchTier::kExact);
    } else {
      Offer(FromExactPlan(outcome->result.plan), SearchTier::kExact);
    }
    reason_ = proven
                  ? absl::StrFormat(
                        "exact: predicted %.3g s%s on %d concurrent slices, within the %.3g s left",
                        f.seconds, rates_note, concurrent_slices_, remaining)
                  : absl::StrFormat(
                        "exact (predicted %.3g s) cut short by the deadline with "
                        "%.0f%% of the slices solved",
                        f.seconds, 100 * outcome->coverage);
    out_.schedule = *std::move(outcome);
    out_.exact_ran = true;
    return proven;
  }

  // The block size for the time left: the largest k whose predicted block
  // time, extrapolated from the last block (x3 per unit with cross
  // products, the growth of 3^k; x2 without, a tree block's 2^k bound),
  // fits the blocks still to come (about two passes' worth, less those
  // `searched` so far). The largest block grows with the pool:
  // 13 relations with cross products and 16 without on one concurrent
  // slice, one more for every factor of the growth in concurrent slices,
  // since a block's slices spread over them (the caps' measurements:
  // docs/benchmarks.md).
  int NextBlock(int last, double seconds, int searched) {
    const double growth = options_.cross_products ? 3.0 : 2.0;
    const int pool_extra = static_cast<int>(
        std::floor(std::log(static_cast<double>(concurrent_slices_)) / std::log(growth)));
    const int most =
        std::min({query_.size(), (options_.cross_products ? 13 : 16) + pool_extra, kMaxRelations});
    const double remaining = 0.8 * Remaining();
    int best = 3;
    for (int k = 3; k <= std::min(most, last + 2); ++k) {
      const double blocks = std::max(1.0, 2.0 * (query_.size() - 1) / (k - 1) - searched);
      const double predicted = std::max(seconds, 1e-5) * std::pow(growth, k - last);
      if (predicted * blocks <= remaining) best = k;
    }
    return best;
  }

  void RunIdp() {
    IdpConfig config;
    config.cross_products = options_.cross_products;
    config.block = std::min(query_.size(), 10);
    config.out_of_time = [this] { return Cancelled() || Clock::now() >= deadline_; };
    config.on_improved = [this](const WidePlan& plan) { Post(plan, SearchTier::kIdp); };
    config.next_block = [this](int k, double seconds, int searched) {
      return NextBlock(k, seconds, searched);
    };
    SearchOptions block_options = options_;
    block_options.shape = PlanShape::kBushy;
    const BlockSearch search = [&](const Query& block) -> absl::StatusOr<Plan> {
      ScheduleOptions schedule = schedule_;
      schedule.deadline = deadline_;
      schedule.partial_on_deadline = false;
      schedule.on_progress = nullptr;
      const uint32_t p = ChooseSliceCount(block, block_options, concurrent_slices_);
      ASSIGN_OR_RETURN(ScheduleOutcome o, RunSlices(block, block_options, p, workers_, schedule));
      ScheduleOutcome& all = out_.schedule;
      for (size_t i = 0; i < o.result.slices.size(); ++i) {
        all.result.slices.push_back(std::move(o.result.slices[i]));
        if (i < o.slice_workers.size()) all.slice_workers.push_back(o.slice_workers[i]);
      }
      all.retries += o.retries;
      all.hedges += o.hedges;
      all.workers_used = std::max(all.workers_used, o.workers_used);
      return std::move(o.result.plan);
    };
    const SearchTier seed = out_.tier;
    // A cut-short exact search's slices stay listed beside the blocks'.
    out_.exact_ran = false;
    out_.schedule.result.slice_count = 0;
    IdpResult r = ImproveByBlocks(query_, out_.plan, config, search);
    out_.idp = r.stats;
    const double before = out_.plan.cost();
    Offer(std::move(r.plan), SearchTier::kIdp);
    absl::StrAppendFormat(
        &reason_,
        "%sidp from the %s plan: %d blocks of up to %d relations searched exactly (%d more "
        "met again), %d improved, %d passes; cost %.4g -> %.4g",
        reason_.empty() ? "" : "; ", TierName(seed), r.stats.blocks - r.stats.failed,
        r.stats.largest_block, r.stats.reused, r.stats.improved, r.stats.passes, before,
        out_.plan.cost());
    if (r.stats.failed > 0) {
      absl::StrAppendFormat(
          &reason_, "; %d block searches failed, so those parts kept the %s plan (last: %s)",
          r.stats.failed, TierName(seed), r.stats.last_failure);
    }
  }

  const WideQuery& query_;
  const SearchOptions& options_;
  const TierRequest& request_;
  GreedyReport greedy_;
  std::span<SliceWorker* const> workers_;
  const ScheduleOptions& schedule_;
  const Clock::time_point start_;
  const Clock::time_point deadline_;
  const int concurrent_slices_;
  TieredOutcome out_;
  std::string reason_;
};

}  // namespace

absl::StatusOr<TieredOutcome> RunTiers(const WideQuery& query, const SearchOptions& options,
                                       const TierRequest& request,
                                       std::span<SliceWorker* const> workers,
                                       const ScheduleOptions& schedule) {
  RETURN_IF_ERROR(CheckTierFits(query, options, request.tier));
  return TierRun(query, options, request, workers, schedule).Run();
}

}  // namespace sliceplan
