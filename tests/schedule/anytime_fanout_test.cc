// The anytime search across the pool (schedule/anytime_fanout.h), through
// the tiers: one part per concurrent slice, each with its own part index;
// the answer's set is exactly the dominance filter of the union of the
// parts' sets; a part with a made-up figure, a failed part or a worker
// that runs no parts leaves the others' sets standing and is named; with
// no part answering (or no healthy worker) the coordinator runs a part
// itself; progress comes at least once a second, the last the merged
// set's size.
#include "schedule/anytime_fanout.h"

#include <gtest/gtest.h>

#include <atomic>
#include <thread>

#include "core/cost/pareto.h"
#include "schedule/local_worker.h"
#include "schedule/tiered_search.h"
#include "tests/support/physical_plans.h"
#include "tests/support/wide_queries.h"

namespace sliceplan {
namespace {

using namespace std::chrono_literals;

SearchOptions Cluster() {
  SearchOptions o;
  o.cost = CostModelKind::kCluster;
  o.cluster = testing::SmallClusterConfig();
  return o;
}

// Answers each anytime part at once with that part's set after a fixed
// number of moves (deterministic), altered when asked; `slots` parts at
// once. Runs no slices.
class FixedPartWorker : public SliceWorker {
 public:
  enum class Fault { kNone, kMadeUpLatency, kFails };
  FixedPartWorker(std::string name, int slots, Fault fault = Fault::kNone)
      : name_(std::move(name)), slots_(slots), fault_(fault) {}
  std::string Name() const override { return name_; }
  int ConcurrentSlices() const override { return slots_; }
  std::unique_ptr<SliceCall> Start(const SliceTask&, SliceDone done) override {
    done(absl::UnimplementedError("no slices here"));
    return std::make_unique<Answered>();
  }
  std::unique_ptr<SliceCall> StartAnytime(const AnytimeTask& task, AnytimeDone done) override {
    parts_seen.push_back(task.part);
    if (fault_ == Fault::kFails) {
      done(absl::UnavailableError("connection lost"));
      return std::make_unique<Answered>();
    }
    SearchControl control;
    AnytimeAnswer answer = RunAnytimePart(*task.query, task.options, task.part, control, {}, 40);
    if (fault_ == Fault::kMadeUpLatency) answer.frontier[0].nodes.back().metrics.latency_s *= 0.1;
    done(std::move(answer));
    return std::make_unique<Answered>();
  }
  std::vector<AnytimePartSpec> parts_seen;

 private:
  class Answered : public SliceCall {
   public:
    void Cancel() override {}
  };
  std::string name_;
  int slots_;
  Fault fault_;
};

absl::StatusOr<TieredOutcome> Anytime(const WideQuery& q, std::vector<SliceWorker*> workers,
                                      double seconds = 0.5, ScheduleOptions schedule = {}) {
  TierRequest request;
  request.tier = SearchTier::kAnytime;
  request.budget_seconds = seconds;
  return RunTiers(q, Cluster(), request, workers, schedule);
}

std::vector<ClusterCosts> CostsOf(const std::vector<WidePlan>& plans) {
  std::vector<ClusterCosts> out;
  for (const WidePlan& p : plans) out.push_back(p.root().metrics);
  return out;
}

TEST(AnytimeFanoutTest, TheSetIsTheDominanceFilterOfThePartsUnion) {
  const WideQuery q = testing::MakeWideQuery(testing::WideShape::kTreeWithCycles, 40, 8);
  FixedPartWorker a("a", 2), b("b", 1);
  auto out = Anytime(q, {&a, &b});
  ASSERT_TRUE(out.ok()) << out.status();
  // One part per slot, numbered across the pool.
  ASSERT_EQ(a.parts_seen.size(), 2u);
  ASSERT_EQ(b.parts_seen.size(), 1u);
  EXPECT_EQ(a.parts_seen[0].part, 0u);
  EXPECT_EQ(a.parts_seen[1].part, 1u);
  EXPECT_EQ(b.parts_seen[0].part, 2u);
  EXPECT_EQ(b.parts_seen[0].parts, 3u);
  // The union of the three parts' sets, filtered here.
  std::vector<ClusterCosts> all;
  for (uint32_t k = 0; k < 3; ++k) {
    SearchControl control;
    for (const ClusterCosts& c :
         CostsOf(RunAnytimePart(q, Cluster(), {k, 3}, control, {}, 40).frontier)) {
      all.push_back(c);
    }
  }
  std::vector<ClusterCosts> want;
  for (size_t i : FrontierIndices(all, Cluster().cluster.objectives)) want.push_back(all[i]);
  const std::vector<ClusterCosts> got = CostsOf(out->frontier);
  ASSERT_EQ(got.size(), want.size());
  for (size_t i = 0; i < got.size(); ++i) {
    EXPECT_EQ(got[i].latency_s, want[i].latency_s) << i;
    EXPECT_EQ(got[i].node_seconds, want[i].node_seconds) << i;
    EXPECT_EQ(got[i].completeness, want[i].completeness) << i;
  }
  EXPECT_NE(out->reason.find("; 3 parts, "), std::string::npos) << out->reason;
}

TEST(AnytimeFanoutTest, AFaultyPartIsDroppedAndNamed) {
  const WideQuery q = testing::MakeWideQuery(testing::WideShape::kSnowflake, 30, 2);
  FixedPartWorker good("good", 1);
  FixedPartWorker liar("liar", 1, FixedPartWorker::Fault::kMadeUpLatency);
  FixedPartWorker lost("lost", 1, FixedPartWorker::Fault::kFails);
  auto out = Anytime(q, {&good, &liar, &lost});
  ASSERT_TRUE(out.ok()) << out.status();
  // Only the good part's set: its plans, none of the liar's.
  SearchControl control;
  const AnytimeAnswer own = RunAnytimePart(q, Cluster(), {0, 3}, control, {}, 40);
  std::vector<ClusterCosts> want;
  const std::vector<ClusterCosts> costs = CostsOf(own.frontier);
  for (size_t i : FrontierIndices(costs, Cluster().cluster.objectives)) want.push_back(costs[i]);
  const std::vector<ClusterCosts> got = CostsOf(out->frontier);
  ASSERT_EQ(got.size(), want.size());
  for (size_t i = 0; i < got.size(); ++i) {
    EXPECT_EQ(got[i].latency_s, want[i].latency_s) << i;
    EXPECT_EQ(got[i].node_seconds, want[i].node_seconds) << i;
  }
  EXPECT_NE(out->reason.find("2 parts gave nothing (first: part 1 on liar: bad answer: anytime "
                             "plan 0: node "),
            std::string::npos)
      << out->reason;
}

// With every part failed and nothing else found, the coordinator runs one
// part itself: an answer, never nothing, and the failure named.
TEST(AnytimeFanoutTest, EveryPartFailingLeavesAPartOnTheCoordinator) {
  const WideQuery q = testing::MakeWideQuery(testing::WideShape::kTree, 20, 2);
  FixedPartWorker lost("lost", 2, FixedPartWorker::Fault::kFails);
  auto out = Anytime(q, {&lost});
  ASSERT_TRUE(out.ok()) << out.status();
  EXPECT_FALSE(out->frontier.empty());
  EXPECT_NE(out->reason.find("every part on the pool failed (part 0 on lost: connection lost), "
                             "so one ran on the coordinator"),
            std::string::npos)
      << out->reason;
}

// A worker that runs no anytime parts (the interface's default) counts as
// a failed part; with no healthy worker the coordinator runs the part.
TEST(AnytimeFanoutTest, WorkersWithoutPartsOrHealthLeaveThePartHere) {
  const WideQuery q = testing::MakeWideQuery(testing::WideShape::kTree, 20, 3);
  class SlicesOnly : public SliceWorker {
   public:
    std::string Name() const override { return "slices-only"; }
    bool Healthy() const override { return healthy; }
    std::unique_ptr<SliceCall> Start(const SliceTask&, SliceDone) override { return nullptr; }
    bool healthy = true;
  } old;
  auto out = Anytime(q, {&old});
  ASSERT_TRUE(out.ok()) << out.status();
  EXPECT_NE(out->reason.find("(part 0 on slices-only: worker slices-only does not run parts of "
                             "the anytime search)"),
            std::string::npos)
      << out->reason;
  old.healthy = false;
  out = Anytime(q, {&old});
  ASSERT_TRUE(out.ok()) << out.status();
  EXPECT_NE(out->reason.find("no worker is healthy, so one part ran on the coordinator; 1 part, "),
            std::string::npos)
      << out->reason;
}

// In-process workers run their parts for the whole time, report their
// sets' sizes at least once a second, and stop before the deadline.
TEST(AnytimeFanoutTest, LocalPartsReportEverySecondAndStopInTime) {
  const WideQuery q = testing::MakeWideQuery(testing::WideShape::kTreeWithCycles, 60, 4);
  LocalWorker w0("w0"), w1("w1");
  std::vector<ScheduleProgress> events;
  ScheduleOptions schedule;
  schedule.on_progress = [&](const ScheduleProgress& p) { events.push_back(p); };
  const auto start = std::chrono::steady_clock::now();
  auto out = Anytime(q, {&w0, &w1}, 3.3, schedule);
  const auto took = std::chrono::steady_clock::now() - start;
  ASSERT_TRUE(out.ok()) << out.status();
  EXPECT_LT(took, 3300ms);
  EXPECT_GT(took, 2500ms);       // the parts stop their reserves (about 0.35 s) before the end
  ASSERT_GE(events.size(), 3u);  // at about 1 s and 2 s while the parts run, and at the end
  EXPECT_EQ(*events.back().frontier_plans, out->frontier.size());  // the merged set's
  EXPECT_GT(*events[0].frontier_plans, 0u);
  EXPECT_GT(events[0].trees, 0u);
  EXPECT_NE(out->reason.find("; 2 parts, "), std::string::npos) << out->reason;
}

}  // namespace
}  // namespace sliceplan
