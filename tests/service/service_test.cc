// Process-level checks of the service: real worker and coordinator
// processes on loopback (ports chosen by the servers, processes always
// reaped), against the embedded mode and under failures.
#include <signal.h>

#include <atomic>
#include <chrono>
#include <cstdio>
#include <thread>

#include "cli/rpc_client.h"
#include "grpcpp/grpcpp.h"
#include "gtest/gtest.h"
#include "rpc/rpc_status.h"
#include "schedule/embedded_pool.h"
#include "sliceplan.grpc.pb.h"
#include "tests/support/process.h"
#include "tests/support/reference_dp.h"
#include "tests/support/servers.h"
#include "tests/support/test_queries.h"
#include "tests/support/wide_queries.h"
#include "wire/query_proto.h"

namespace sliceplan {
namespace {

using namespace std::chrono_literals;
using testing::GraphShape;
using testing::ServerProcess;
using Clock = std::chrono::steady_clock;

using testing::StartCoordinator;
using testing::StartWorker;

struct Cluster {
  std::vector<std::unique_ptr<ServerProcess>> workers;
  std::unique_ptr<ServerProcess> coordinator;
};

Cluster StartCluster(int n, std::vector<std::string> coordinator_flags = {}) {
  Cluster c;
  for (int i = 0; i < n; ++i) c.workers.push_back(StartWorker());
  c.coordinator = StartCoordinator(c.workers, coordinator_flags);
  return c;
}

// The optimum from the independent subset DP (tests/support/reference_dp.h)
// for n <= 14, else the unsliced engine search (checked against that DP
// at 14 relations in slice_solver_test). Sliced runs may return another
// tree of equal cost whose sum rounds differently in the last place, hence
// EXPECT_NEAR.
double Optimum(const Query& q) {
  if (q.size() <= 14) return testing::DpBestBushy(q, true);
  SearchControl control;
  return SolveSlice(q, {}, {0, 1}, control)->plan->root().cost;
}

absl::StatusOr<ScheduleOutcome> Remote(const std::string& coordinator, const Query& q,
                                       SearchOptions options, uint32_t p, double deadline = 0,
                                       bool partial = false) {
  cli::RemoteRequest r{coordinator, options, p, deadline, partial};
  return cli::OptimizeRemote(r, q, {});
}

TEST(ServiceTest, RpcAnswerEqualsEmbeddedAnswer) {
  Cluster c = StartCluster(3);
  ASSERT_TRUE(c.coordinator);
  int checked = 0;
  for (GraphShape g :
       {GraphShape::kChain, GraphShape::kStar, GraphShape::kRandom, GraphShape::kCycle}) {
    for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
      const Query q = testing::MakeQuery(g, shape == PlanShape::kBushy ? 12 : 10, 11);
      for (uint32_t p : {1u, 2u, 4u, 8u, 16u}) {
        if (std::countr_zero(p) > MaxSliceBits(q.size(), shape)) continue;
        const SearchOptions options{shape, g != GraphShape::kCycle, CostModelKind::kCout};
        auto remote = Remote(c.coordinator->address(), q, options, p);
        ASSERT_TRUE(remote.ok()) << remote.status();
        auto local = OptimizeEmbedded(q, options, p, 2);
        ASSERT_TRUE(local.ok());
        EXPECT_EQ(remote->result.plan.root().cost, local->plan.root().cost);
        if (shape == PlanShape::kBushy && options.cross_products) {  // an outside oracle too
          const double want = testing::DpBestBushy(q, true);
          EXPECT_NEAR(remote->result.plan.root().cost, want, 1e-12 * want);
        }
        EXPECT_EQ(TreeString(remote->result.plan, q), TreeString(local->plan, q));
        EXPECT_EQ(remote->result.slices.size(), p);
        EXPECT_TRUE(remote->proven_optimal);
        ++checked;
      }
    }
  }
  EXPECT_EQ(checked, 40);  // 4 graphs x 2 shapes x P = 1..16
}

TEST(ServiceTest, ClusterFrontierOverRpcEqualsEmbedded) {
  Cluster c = StartCluster(2);
  ASSERT_TRUE(c.coordinator);
  const Query q = testing::MakeQuery(GraphShape::kRandom, 7, 3);
  SearchOptions options;
  options.cost = CostModelKind::kCluster;
  options.cluster.params.sample_rates = {1.0, 0.1};
  options.cluster.params.node_counts = {4, 16};
  options.cluster.choice.bounds.push_back({Metric::kCompleteness, false, 0.5});
  options.cluster.choice.prefer = {0, 1, 0};
  for (uint32_t p : {1u, 4u}) {
    auto remote = Remote(c.coordinator->address(), q, options, p);
    ASSERT_TRUE(remote.ok()) << remote.status();
    auto local = OptimizeEmbedded(q, options, p, 2);
    ASSERT_TRUE(local.ok());
    ASSERT_EQ(remote->result.frontier.size(), local->frontier.size());
    ASSERT_FALSE(local->frontier.empty());
    for (size_t i = 0; i < local->frontier.size(); ++i) {
      const ClusterCosts& a = remote->result.frontier[i].root().metrics;
      const ClusterCosts& b = local->frontier[i].root().metrics;
      EXPECT_EQ(a.latency_s, b.latency_s);
      EXPECT_EQ(a.node_seconds, b.node_seconds);
      EXPECT_EQ(a.completeness, b.completeness);
      EXPECT_EQ(TreeString(remote->result.frontier[i], q), TreeString(local->frontier[i], q));
    }
    EXPECT_EQ(remote->result.chosen, local->chosen);
    ASSERT_TRUE(local->chosen.has_value());
    EXPECT_GE(local->plan.root().metrics.completeness, 0.5);
  }
}

// Past 64 relations the coordinator answers the cluster model with the
// anytime set, one part on each worker, plans in the form of any size:
// each a tree over all 120 relations with its physical choices, as the
// coordinator sent them. A
// set too large for the answer's limit (here 300 kB, about 14 plans) is
// thinned to fit and says so, never refused after its deadline.
TEST(ServiceTest, AClusterQueryPastSixtyFourRelationsGetsASetOverRpc) {
  Cluster c = StartCluster(2, {"--max_response_bytes=300000"});
  ASSERT_TRUE(c.coordinator);
  const WideQuery q = testing::MakeWideQuery(testing::WideShape::kSnowflake, 120, 5);
  cli::RemoteRequest r;
  r.coordinator = c.coordinator->address();
  r.options.cost = CostModelKind::kCluster;
  r.options.cluster.params.node_counts = {4, 16};
  r.options.cluster.params.sample_rates = {1.0, 0.1};
  r.deadline_seconds = 2.5;  // room for an event at 1 s that the answer does not supersede
  uint64_t events = 0;
  auto out = cli::OptimizeRemote(r, q, [&](const ScheduleProgress& p) {
    if (p.frontier_plans) ++events;
  });
  ASSERT_TRUE(out.ok()) << out.status();
  EXPECT_EQ(out->tier, SearchTier::kAnytime);
  EXPECT_FALSE(out->proven_optimal);
  ASSERT_FALSE(out->frontier.empty());
  ASSERT_TRUE(out->chosen.has_value());
  for (const WidePlan& plan : out->frontier) {
    EXPECT_TRUE(CheckWidePlan(plan, q.size()).ok());
    EXPECT_GT(plan.root().metrics.latency_s, 0);
  }
  EXPECT_EQ(WideTreeString(out->plan, q), WideTreeString(out->frontier[*out->chosen], q));
  EXPECT_NE(out->reason.find("plans are returned (the answer's limit of 300000 bytes"),
            std::string::npos)
      << out->reason;
  EXPECT_GE(out->frontier.size(), 5u);
  // One part on each worker, both answered and checked (the sanitized
  // build's workers, several times slower on two loaded cores, may still
  // miss the deadline with one: then it is named, and the other's set
  // stands).
  EXPECT_NE(out->reason.find("; 2 parts, "), std::string::npos) << out->reason;
#ifndef __SANITIZE_ADDRESS__
  EXPECT_EQ(out->reason.find("gave nothing"), std::string::npos) << out->reason;
#endif
  EXPECT_GE(events, 1u);  // the set's size at least once a second (and at the end)
}

TEST(ServiceTest, KilledWorkerMidRunStillGivesTheOptimum) {
  Cluster c = StartCluster(3);
  ASSERT_TRUE(c.coordinator);
  // 8 slices on 3 workers: when the first slice is done, worker 0 holds
  // one (its first, or its next, dispatched before the news reaches us),
  // whatever the machine's speed. Killed then, its slice is re-dispatched.
  const Query q = testing::MakeQuery(GraphShape::kRandom, 20, 5);
  const double want = Optimum(q);
  std::atomic<bool> killed{false};
  cli::RemoteRequest r{c.coordinator->address(), {}, 8, 0, false};
  auto remote = cli::OptimizeRemote(r, q, [&](const ScheduleProgress&) {
    if (!killed.exchange(true)) c.workers[0]->Signal(SIGKILL);
  });
  ASSERT_TRUE(remote.ok()) << remote.status();
  EXPECT_TRUE(killed);
  EXPECT_TRUE(remote->proven_optimal);
  EXPECT_NEAR(remote->result.plan.root().cost, want, 1e-12 * want);
  EXPECT_GE(remote->retries, 1u);
}

TEST(ServiceTest, HangingWorkerIsHedgedWithinTheDeadline) {
  std::vector<std::unique_ptr<ServerProcess>> workers;
  workers.push_back(StartWorker({"--test_only_hang_seconds=600"}));
  workers.push_back(StartWorker());
  workers.push_back(StartWorker());
  auto coordinator = StartCoordinator(workers, {"--hedge_after_seconds=0.3"});
  ASSERT_TRUE(coordinator);
  const Query q = testing::MakeQuery(GraphShape::kRandom, 14, 2);
  const auto start = Clock::now();
  auto remote = Remote(coordinator->address(), q, {}, 4, /*deadline=*/20);
  ASSERT_TRUE(remote.ok()) << remote.status();
  EXPECT_LT(Clock::now() - start, 10s);
  EXPECT_TRUE(remote->proven_optimal);
  EXPECT_GE(remote->hedges, 1u);
  const double want = Optimum(q);
  EXPECT_NEAR(remote->result.plan.root().cost, want, 1e-12 * want);
}

// max_workers caps the workers a request uses; `sliceplan workers` lists
// the pool with each worker's solved count.
TEST(ServiceTest, MaxWorkersAndThePoolListing) {
  Cluster c = StartCluster(3);
  ASSERT_TRUE(c.coordinator);
  auto stub = v1::Coordinator::NewStub(
      grpc::CreateChannel(c.coordinator->address(), grpc::InsecureChannelCredentials()));
  v1::OptimizeRequest r;
  *r.mutable_query() = QueryToProto(testing::MakeQuery(GraphShape::kChain, 12, 1));
  r.set_slice_count(8);
  r.set_max_workers(1);
  grpc::ClientContext context;
  context.set_deadline(std::chrono::system_clock::now() + 20s);
  v1::OptimizeResponse out;
  ASSERT_TRUE(stub->Optimize(&context, r, &out).ok());
  EXPECT_EQ(out.workers_used(), 1u);
  ASSERT_EQ(out.slices_size(), 8);
  for (const v1::SliceStats& s : out.slices()) EXPECT_EQ(s.worker(), out.slices(0).worker());

  const std::string cmd =
      std::string(SLICEPLAN_CLI_BIN) + " workers --coordinator=" + c.coordinator->address();
  const testing::CommandResult run = testing::RunCommand(cmd);
  const std::string& listing = run.output;
  EXPECT_EQ(run.exit_status, 0);
  EXPECT_NE(listing.find("3 of 3 workers healthy"), std::string::npos) << listing;
  EXPECT_NE(listing.find(out.slices(0).worker()), std::string::npos) << listing;
  // The worker that did all eight slices says so.
  const size_t row = listing.find(out.slices(0).worker());
  const std::string line = listing.substr(row, listing.find('\n', row) - row);
  EXPECT_NE(line.find(" 8 "), std::string::npos) << line;
}

TEST(ServiceTest, WorkersReportThreadsPerSliceAndConcurrentSlices) {
  std::vector<std::unique_ptr<ServerProcess>> workers;
  workers.push_back(StartWorker({"--threads=3", "--concurrent-slices=2"}));
  workers.push_back(StartWorker());
  auto coordinator = StartCoordinator(workers);
  ASSERT_TRUE(coordinator);
  auto worker_stub = v1::SliceWorker::NewStub(
      grpc::CreateChannel(workers[0]->address(), grpc::InsecureChannelCredentials()));
  grpc::ClientContext context;
  v1::DescribeWorkerResponse info;
  ASSERT_TRUE(worker_stub->DescribeWorker(&context, {}, &info).ok());
  EXPECT_EQ(info.threads_per_slice(), 3u);
  EXPECT_EQ(info.concurrent_slices(), 2u);
  // A 16-relation search on three threads a slice (more than this
  // machine's cores) still returns the optimum.
  const Query q = testing::MakeQuery(GraphShape::kRandom, 16, 4);
  auto remote = Remote(coordinator->address(), q, {}, 2);
  ASSERT_TRUE(remote.ok()) << remote.status();
  EXPECT_NEAR(remote->result.plan.root().cost, Optimum(q), 1e-9 * Optimum(q));
  const testing::CommandResult run = testing::RunCommand(
      std::string(SLICEPLAN_CLI_BIN) + " workers --coordinator=" + coordinator->address());
  const size_t row = run.output.find(workers[0]->address());
  ASSERT_NE(row, std::string::npos) << run.output;
  const std::string line = run.output.substr(row, run.output.find('\n', row) - row);
  EXPECT_NE(line.find("healthy        2       3"), std::string::npos) << run.output;
  EXPECT_NE(run.output.find("slices threads"), std::string::npos) << run.output;
}

TEST(ServiceTest, CapacityTableOverRpcEqualsTheLocalOne) {
  std::vector<std::unique_ptr<ServerProcess>> workers;
  workers.push_back(StartWorker({"--threads=2"}));
  workers.push_back(StartWorker({"--threads=3"}));
  auto coordinator = StartCoordinator(workers);
  ASSERT_TRUE(coordinator);
  const std::string query = std::string(SLICEPLAN_SOURCE_DIR) + "/examples/port_logistics.json";
  const std::string common = std::string(SLICEPLAN_CLI_BIN) + " capacity " + query +
                             " --deadline-seconds=0.3 --seconds-per-split=1e-9 --format=json";
  // The coordinator learns each worker's threads by describing it after
  // start; until then it plans with one. Wait for both descriptions (a
  // loaded machine made this race visible), at most 10 s.
  auto stub = v1::Coordinator::NewStub(
      grpc::CreateChannel(coordinator->address(), grpc::InsecureChannelCredentials()));
  const auto described = [&] {
    grpc::ClientContext context;
    v1::ListWorkersResponse out;
    if (!stub->ListWorkers(&context, {}, &out).ok() || out.workers_size() != 2) return false;
    for (const auto& w : out.workers()) {
      if (w.threads_per_slice() < 2) return false;
    }
    return true;
  };
  for (int i = 0; i < 200 && !described(); ++i) {
    std::this_thread::sleep_for(std::chrono::milliseconds(50));
  }
  ASSERT_TRUE(described());
  // The pool's threads per worker: its slowest worker's, 2.
  const testing::CommandResult remote =
      testing::RunCommand(common + " --coordinator=" + coordinator->address());
  const testing::CommandResult local = testing::RunCommand(common + " --threads-per-worker=2");
  ASSERT_EQ(remote.exit_status, 0) << remote.output;
  ASSERT_EQ(local.exit_status, 0) << local.output;
  EXPECT_EQ(remote.output, local.output);
  EXPECT_NE(remote.output.find("\"threads_per_worker\": 2"), std::string::npos) << remote.output;
  EXPECT_EQ(remote.output.find("\"enough_workers\": null"), std::string::npos) << remote.output;

  v1::CapacityRequest r;
  *r.mutable_query() = QueryToProto(testing::MakeQuery(GraphShape::kChain, 12, 1));
  r.set_deadline_seconds(0);
  grpc::ClientContext context;
  v1::CapacityResponse out;
  const grpc::Status bad = stub->PlanCapacity(&context, r, &out);
  EXPECT_EQ(bad.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_NE(bad.error_message().find("deadline"), std::string::npos) << bad.error_message();
  r.set_deadline_seconds(1);
  r.set_seconds_per_split(-1);
  grpc::ClientContext context2;
  const grpc::Status bad_rate = stub->PlanCapacity(&context2, r, &out);
  EXPECT_EQ(bad_rate.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_NE(bad_rate.error_message().find("seconds_per_split"), std::string::npos);
}

TEST(ServiceTest, AllWorkersDownIsUnavailableNotAHang) {
  auto w = StartWorker();
  ASSERT_TRUE(w);
  const std::string dead = w->address();
  w->Signal(SIGKILL);
  std::vector<std::unique_ptr<ServerProcess>> none;
  auto coordinator = StartCoordinator(none, {}, dead);
  ASSERT_TRUE(coordinator);
  std::this_thread::sleep_for(500ms);  // a health round marks it down
  const auto start = Clock::now();
  auto remote = Remote(coordinator->address(), testing::MakeQuery(GraphShape::kChain, 8, 1), {}, 2);
  EXPECT_LT(Clock::now() - start, 5s);
  ASSERT_FALSE(remote.ok());
  EXPECT_EQ(remote.status().code(), absl::StatusCode::kUnavailable) << remote.status();
  EXPECT_NE(remote.status().message().find("no worker available"), std::string::npos)
      << remote.status();
  EXPECT_NE(remote.status().message().find(dead + ": "), std::string::npos) << remote.status();
}

TEST(ServiceTest, DeadlineExceededOrPartialAsRequested) {
  // Too large for its deadline: 3^24/2 splits would take minutes.
  Cluster c = StartCluster(2);
  ASSERT_TRUE(c.coordinator);
  const Query big = testing::MakeQuery(GraphShape::kRandom, 24, 3);
  auto start = Clock::now();
  auto remote = Remote(c.coordinator->address(), big, {}, 4, /*deadline=*/1.5);
  EXPECT_LT(Clock::now() - start, 6s);  // a 1.5 s deadline, with room for a slow machine
  ASSERT_FALSE(remote.ok());
  EXPECT_EQ(remote.status().code(), absl::StatusCode::kDeadlineExceeded) << remote.status();

  // A hung worker holds one slice: the partial answer covers the rest.
  std::vector<std::unique_ptr<ServerProcess>> workers;
  workers.push_back(StartWorker({"--test_only_hang_seconds=600"}));
  workers.push_back(StartWorker());
  auto coordinator = StartCoordinator(workers, {"--hedge_after_seconds=0"});
  ASSERT_TRUE(coordinator);
  const Query q = testing::MakeQuery(GraphShape::kRandom, 12, 3);
  start = Clock::now();
  remote = Remote(coordinator->address(), q, {}, 4, /*deadline=*/1.5, /*partial=*/true);
  EXPECT_LT(Clock::now() - start, 6s);
  ASSERT_TRUE(remote.ok()) << remote.status();
  EXPECT_FALSE(remote->proven_optimal);
  EXPECT_DOUBLE_EQ(remote->coverage, 0.75);
}

// The CLI's --deadline-seconds and --partial-on-deadline end to end: a
// hung worker holds one slice of four, the answer covers the other three.
TEST(ServiceTest, CliPartialAnswerOnDeadline) {
  std::vector<std::unique_ptr<ServerProcess>> workers;
  workers.push_back(StartWorker({"--test_only_hang_seconds=600"}));
  workers.push_back(StartWorker());
  auto coordinator = StartCoordinator(workers, {"--hedge_after_seconds=0"});
  ASSERT_TRUE(coordinator);
  const std::string query = std::string(SLICEPLAN_SOURCE_DIR) + "/examples/port_calls_small.json";
  const std::string cmd = std::string(SLICEPLAN_CLI_BIN) + " optimize " + query +
                          " --slices=4 --format=json --deadline-seconds=1.5 "
                          "--partial-on-deadline=true --quiet --coordinator=" +
                          coordinator->address();
  const testing::CommandResult run = testing::RunCommand(cmd);
  const std::string& json = run.output;
  EXPECT_EQ(run.exit_status, 0);
  EXPECT_NE(json.find("\"proven_optimal\": false"), std::string::npos) << json;
  EXPECT_NE(json.find("\"coverage\": 0.75"), std::string::npos) << json;
}

template <class Stub, class Request, class Response, class Method>
grpc::Status Call(Stub& stub, Method method, const Request& request, Response* response) {
  grpc::ClientContext context;
  context.set_deadline(std::chrono::system_clock::now() + 5s);
  return (stub.*method)(&context, request, response);
}

TEST(ServiceTest, BadRpcInputIsInvalidArgumentNamingTheField) {
  Cluster c = StartCluster(1);
  ASSERT_TRUE(c.coordinator);
  auto coordinator = v1::Coordinator::NewStub(
      grpc::CreateChannel(c.coordinator->address(), grpc::InsecureChannelCredentials()));
  auto worker = v1::SliceWorker::NewStub(
      grpc::CreateChannel(c.workers[0]->address(), grpc::InsecureChannelCredentials()));
  const v1::Query query = QueryToProto(testing::MakeQuery(GraphShape::kChain, 6, 1));
  v1::OptimizeResponse out;
  v1::SolveSliceResponse slice_out;

  v1::OptimizeRequest missing;
  grpc::Status s = Call(*coordinator, &v1::Coordinator::Stub::Optimize, missing, &out);
  EXPECT_EQ(s.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_EQ(s.error_message(), "query: missing");

  v1::OptimizeRequest three;
  *three.mutable_query() = query;
  three.set_slice_count(3);
  s = Call(*coordinator, &v1::Coordinator::Stub::Optimize, three, &out);
  EXPECT_EQ(s.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_NE(s.error_message().find("slice_count: 3 is not a power of two"), std::string::npos);

  v1::OptimizeRequest unknown;
  *unknown.mutable_query() = query;
  unknown.mutable_query()->mutable_predicates(0)->set_relations(1, "tugboats");
  s = Call(*coordinator, &v1::Coordinator::Stub::Optimize, unknown, &out);
  EXPECT_EQ(s.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_NE(s.error_message().find("query.predicates[0].relations[1]: unknown relation"),
            std::string::npos)
      << s.error_message();

  v1::SolveSliceRequest no_query;
  no_query.set_slice_count(1);
  s = Call(*worker, &v1::SliceWorker::Stub::SolveSlice, no_query, &slice_out);
  EXPECT_EQ(s.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_EQ(s.error_message(), "query: missing");

  v1::SolveSliceRequest bad_count;
  *bad_count.mutable_query() = query;
  bad_count.set_slice_count(6);
  s = Call(*worker, &v1::SliceWorker::Stub::SolveSlice, bad_count, &slice_out);
  EXPECT_EQ(s.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_NE(s.error_message().find("slice_count: 6"), std::string::npos);

  v1::SolveSliceRequest bad_index;
  *bad_index.mutable_query() = query;
  bad_index.set_slice_count(2);
  bad_index.set_slice_index(2);
  s = Call(*worker, &v1::SliceWorker::Stub::SolveSlice, bad_index, &slice_out);
  EXPECT_EQ(s.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_NE(s.error_message().find("slice_index: 2"), std::string::npos);

  v1::SolveSliceRequest zero;
  *zero.mutable_query() = query;
  s = Call(*worker, &v1::SliceWorker::Stub::SolveSlice, zero, &slice_out);
  EXPECT_EQ(s.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_EQ(s.error_message(), "slice_count: 0 is not a power of two (1, 2, 4, 8, ...)");

  v1::SolveSliceRequest too_many;  // 6 relations hold 2 triples at most
  *too_many.mutable_query() = query;
  too_many.set_slice_count(8);
  s = Call(*worker, &v1::SliceWorker::Stub::SolveSlice, too_many, &slice_out);
  EXPECT_EQ(s.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_NE(s.error_message().find("slice_count: 8 slices need 3 disjoint triples"),
            std::string::npos)
      << s.error_message();

  v1::SolveSliceRequest bad_query;
  *bad_query.mutable_query() = query;
  bad_query.set_slice_count(1);
  bad_query.mutable_query()->mutable_relations(2)->set_rows(-3);
  s = Call(*worker, &v1::SliceWorker::Stub::SolveSlice, bad_query, &slice_out);
  EXPECT_EQ(s.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_NE(s.error_message().find("query.relations[2] (r2).rows: must be a finite number > 0"),
            std::string::npos)
      << s.error_message();

  v1::SolveSliceRequest bad_options;
  *bad_options.mutable_query() = query;
  bad_options.set_slice_count(1);
  bad_options.mutable_options()->set_cost(v1::COST_MODEL_CLUSTER);
  bad_options.mutable_options()->mutable_cluster()->add_node_counts(0);
  s = Call(*worker, &v1::SliceWorker::Stub::SolveSlice, bad_options, &slice_out);
  EXPECT_EQ(s.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_NE(s.error_message().find("node_counts[0]: must be a whole number in 1..1000000, got 0"),
            std::string::npos)
      << s.error_message();

  v1::SolveSliceRequest too_big;  // memo over the worker's limit
  *too_big.mutable_query() = QueryToProto(testing::MakeQuery(GraphShape::kChain, 34, 1));
  too_big.set_slice_count(1);
  s = Call(*worker, &v1::SliceWorker::Stub::SolveSlice, too_big, &slice_out);
  EXPECT_EQ(s.error_code(), grpc::StatusCode::RESOURCE_EXHAUSTED);
}

}  // namespace
}  // namespace sliceplan
