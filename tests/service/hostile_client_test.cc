// The service probed as a careless or hostile client would: each test is
// one reproducer of a defect found that way, and asserts what the service
// must do instead (a precise refusal, work that stops, one socket, a pool
// that survives). Real worker and coordinator processes on loopback.
#include <arpa/inet.h>
#include <netinet/in.h>
#include <signal.h>
#include <sys/socket.h>
#include <unistd.h>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <limits>
#include <thread>

#include "cli/rpc_client.h"
#include "grpcpp/grpcpp.h"
#include "gtest/gtest.h"
#include "schedule/slice_worker.h"
#include "sliceplan.grpc.pb.h"
#include "tests/support/process.h"
#include "tests/support/servers.h"
#include "tests/support/test_queries.h"
#include "wire/query_proto.h"
#include "wire/service_proto.h"
#include "wire/tier_proto.h"

namespace sliceplan {
namespace {

using namespace std::chrono_literals;
using testing::GraphShape;
using testing::ServerProcess;
using Clock = std::chrono::steady_clock;

struct Cluster {
  std::vector<std::unique_ptr<ServerProcess>> workers;
  std::unique_ptr<ServerProcess> coordinator;
  std::unique_ptr<v1::Coordinator::Stub> stub;
};

Cluster StartCluster(int n, std::vector<std::string> worker_flags = {},
                     std::vector<std::string> coordinator_flags = {}) {
  Cluster c;
  for (int i = 0; i < n; ++i) {
    c.workers.push_back(testing::StartWorker(worker_flags));
    if (!c.workers.back()) return c;
  }
  c.coordinator = testing::StartCoordinator(c.workers, coordinator_flags);
  if (!c.coordinator) return c;
  c.stub = v1::Coordinator::NewStub(
      grpc::CreateChannel(c.coordinator->address(), grpc::InsecureChannelCredentials()));
  return c;
}

double PoolCpu(const Cluster& c) {
  double total = 0;
  for (const auto& w : c.workers) total += w->CpuSeconds();
  return total;
}

// CPU the workers burn over `window` once `settle` has passed: about zero
// when every slice stopped.
double CpuAfter(const Cluster& c, std::chrono::milliseconds settle,
                std::chrono::milliseconds window = 1000ms) {
  std::this_thread::sleep_for(settle);
  const double before = PoolCpu(c);
  std::this_thread::sleep_for(window);
  return PoolCpu(c) - before;
}

// The exact tier: these reproducers probe the slice machinery (auto would
// answer an endless search with a heuristic plan in milliseconds).
v1::OptimizeRequest Request(const Query& q, uint32_t p = 0) {
  v1::OptimizeRequest r;
  *r.mutable_query() = QueryToProto(q);
  r.set_slice_count(p);
  r.set_tier(v1::TIER_EXACT);
  return r;
}

grpc::Status Optimize(const Cluster& c, const v1::OptimizeRequest& request,
                      std::chrono::milliseconds timeout = 20s,
                      v1::OptimizeResponse* out = nullptr) {
  grpc::ClientContext context;
  context.set_deadline(std::chrono::system_clock::now() + timeout);
  v1::OptimizeResponse ignored;
  return c.stub->Optimize(&context, request, out ? out : &ignored);
}

// 3^22 / 2 splits: minutes of work, so only a cancel or deadline ends it.
Query Endless() { return testing::MakeQuery(GraphShape::kRandom, 22, 3); }

// A plaintext stub of one worker.
std::unique_ptr<v1::SliceWorker::Stub> WorkerStub(const testing::ServerProcess& w) {
  return v1::SliceWorker::NewStub(
      grpc::CreateChannel(w.address(), grpc::InsecureChannelCredentials()));
}

// The whole search of `q` as one slice.
v1::SolveSliceRequest OneSlice(const Query& q) {
  v1::SolveSliceRequest r;
  *r.mutable_query() = QueryToProto(q);
  r.set_slice_count(1);
  return r;
}

// One SolveSlice call within 10 s; `busy_mark` (if given) says whether the
// refusal carried the busy mark.
grpc::Status SolveOnce(v1::SliceWorker::Stub& stub, const v1::SolveSliceRequest& r,
                       bool* busy_mark = nullptr) {
  grpc::ClientContext context;
  context.set_deadline(std::chrono::system_clock::now() + 10s);
  v1::SolveSliceResponse out;
  const grpc::Status s = stub.SolveSlice(&context, r, &out);
  if (busy_mark) *busy_mark = context.GetServerTrailingMetadata().count(kBusyKey) != 0;
  return s;
}

TEST(HostileClientTest, EachServerListensOnExactlyTheAnnouncedPort) {
  Cluster c = StartCluster(1);
  ASSERT_TRUE(c.coordinator);
  for (const ServerProcess* s : {c.workers[0].get(), c.coordinator.get()}) {
    const int announced = std::stoi(s->address().substr(s->address().rfind(':') + 1));
    EXPECT_EQ(s->ListeningPorts(), std::vector<int>{announced}) << s->address();
  }
}

TEST(HostileClientTest, HelpAndVersionExitZeroAndShowOnlyTheServersFlags) {
  for (const std::string& bin :
       {std::string(SLICEPLAN_WORKER_BIN), std::string(SLICEPLAN_COORDINATOR_BIN)}) {
    const testing::CommandResult help = testing::RunCommand(bin + " --help 2>&1");
    EXPECT_EQ(help.exit_status, 0) << bin;
    EXPECT_NE(help.output.find("--tls-cert"), std::string::npos) << help.output;  // dashed
    EXPECT_EQ(help.output.find("tls_cert"), std::string::npos) << help.output;
    EXPECT_EQ(help.output.find("Flags from"), std::string::npos) << help.output;  // no paths
    EXPECT_EQ(help.output.find("test-only"), std::string::npos) << help.output;
    EXPECT_EQ(help.output.find("test_only"), std::string::npos) << help.output;
    const testing::CommandResult version = testing::RunCommand(bin + " --version 2>&1");
    EXPECT_EQ(version.exit_status, 0) << bin;
    EXPECT_NE(version.output.find(" 0."), std::string::npos) << version.output;
    EXPECT_NE(version.output.find(" build)"), std::string::npos) << version.output;
  }
}

TEST(HostileClientTest, PortOutsideTheRangeIsRefusedAtStart) {
  for (const std::string& bin :
       {std::string(SLICEPLAN_WORKER_BIN),
        std::string(SLICEPLAN_COORDINATOR_BIN) + " --workers=127.0.0.1:1"}) {
    const testing::CommandResult r = testing::RunCommand(bin + " --listen=127.0.0.1:99999 2>&1");
    EXPECT_EQ(r.exit_status, 2) << bin;
    EXPECT_NE(r.output.find("port past 65535"), std::string::npos) << r.output;
  }
}

// Plaintext only on loopback unless --insecure: nothing listens off-host
// without TLS unless told.
TEST(HostileClientTest, OffHostPlaintextNeedsInsecure) {
  for (const std::string& bin :
       {std::string(SLICEPLAN_WORKER_BIN),
        std::string(SLICEPLAN_COORDINATOR_BIN) + " --workers=127.0.0.1:1"}) {
    const testing::CommandResult r = testing::RunCommand(bin + " --listen=0.0.0.0:0 2>&1");
    EXPECT_EQ(r.exit_status, 2) << bin;
    EXPECT_NE(r.output.find("is reachable from other hosts"), std::string::npos) << r.output;
  }
  auto w = testing::StartWorker({"--listen=0.0.0.0:0", "--insecure"});
  ASSERT_TRUE(w);
  EXPECT_EQ(w->address().rfind("0.0.0.0:", 0), 0u) << w->address();
}

// A burst beyond the coordinator's limits is refused at once, not queued
// without bound.
TEST(HostileClientTest, RequestsPastTheConcurrencyLimitsAreRefused) {
  Cluster c = StartCluster(1, {}, {"--max_concurrent_requests=1", "--max_queued_requests=0"});
  ASSERT_TRUE(c.coordinator);
  grpc::ClientContext running;
  v1::OptimizeResponse out;
  std::thread first([&] { c.stub->Optimize(&running, Request(Endless(), 1), &out); });
  // The first is running once the worker burns CPU on it.
  const double idle = c.workers[0]->CpuSeconds();
  for (int i = 0; i < 500 && c.workers[0]->CpuSeconds() < idle + 0.05; ++i) {
    std::this_thread::sleep_for(10ms);
  }
  grpc::Status s;
  {
    grpc::ClientContext context;
    context.set_deadline(std::chrono::system_clock::now() + 5s);
    v1::OptimizeResponse refused;
    s = c.stub->Optimize(&context, Request(testing::MakeQuery(GraphShape::kChain, 4, 1)), &refused);
    // Marked busy: a client can tell "retry later" from a request past a limit.
    EXPECT_EQ(context.GetServerTrailingMetadata().count(kBusyKey), 1u);
  }
  EXPECT_EQ(s.error_code(), grpc::StatusCode::RESOURCE_EXHAUSTED) << s.error_message();
  EXPECT_NE(s.error_message().find("--max_concurrent_requests=1"), std::string::npos)
      << s.error_message();
  // The CLI says busy and exits 1 (not 2, the status of bad input).
  const testing::CommandResult cli = testing::RunCommand(
      std::string(SLICEPLAN_CLI_BIN) + " optimize " + SLICEPLAN_SOURCE_DIR +
      "/examples/port_calls_small.json --coordinator=" + c.coordinator->address() + " 2>&1");
  EXPECT_EQ(cli.exit_status, 1) << cli.output;
  EXPECT_NE(cli.output.find(": busy, retry later (RESOURCE_EXHAUSTED:"), std::string::npos)
      << cli.output;
  running.TryCancel();
  first.join();
  // Once the first has stopped (its cancel takes a poll to arrive),
  // requests run again.
  for (int i = 0; i < 100; ++i) {
    s = Optimize(c, Request(testing::MakeQuery(GraphShape::kChain, 4, 1)), 5s);
    if (s.ok()) break;
    std::this_thread::sleep_for(20ms);
  }
  EXPECT_TRUE(s.ok()) << s.error_message();
}

TEST(HostileClientTest, CancelledStreamStopsEveryWorker) {
  Cluster c = StartCluster(2);
  ASSERT_TRUE(c.coordinator);
  grpc::ClientContext context;
  auto reader = c.stub->OptimizeStream(&context, Request(Endless(), 4));
  std::thread cancel([&] {
    std::this_thread::sleep_for(1500ms);
    context.TryCancel();
  });
  v1::OptimizeEvent event;
  while (reader->Read(&event)) {
  }
  EXPECT_EQ(reader->Finish().error_code(), grpc::StatusCode::CANCELLED);
  cancel.join();
  // Cancelled within a second: the pool is idle from then on.
  EXPECT_LT(CpuAfter(c, 1000ms), 0.1);
}

TEST(HostileClientTest, CancelledUnaryCallStopsEveryWorker) {
  Cluster c = StartCluster(2);
  ASSERT_TRUE(c.coordinator);
  grpc::ClientContext context;
  v1::OptimizeResponse out;
  std::thread cancel([&] {
    std::this_thread::sleep_for(1000ms);
    context.TryCancel();
  });
  EXPECT_EQ(c.stub->Optimize(&context, Request(Endless(), 2), &out).error_code(),
            grpc::StatusCode::CANCELLED);
  cancel.join();
  EXPECT_LT(CpuAfter(c, 1000ms), 0.1);
}

TEST(HostileClientTest, ManyObjectiveSearchPastItsDeadlineIsRefusedUpFront) {
  Cluster c = StartCluster(2);
  ASSERT_TRUE(c.coordinator);
  // Ten relations, 16 node counts and 5 sample rates, exact: far past 2 s
  // (the 6-relation port-calls query once was, until the combination of
  // Pareto sets got 30 times faster and it finished in 0.9 s). The
  // forecast, from parts of the query, says so before the search starts.
  const Query query = testing::MakeQuery(GraphShape::kRandom, 10, 1);
  v1::OptimizeRequest r = Request(query, 1);
  r.mutable_options()->set_cost(v1::COST_MODEL_CLUSTER);
  for (uint32_t m = 1; m <= 16; ++m) r.mutable_options()->mutable_cluster()->add_node_counts(m);
  for (double f : {1.0, 0.5, 0.25, 0.1, 0.05}) {
    r.mutable_options()->mutable_cluster()->add_sample_rates(f);
  }
  r.set_deadline_seconds(2);
  const auto start = Clock::now();
  const grpc::Status s = Optimize(c, r);
  EXPECT_EQ(s.error_code(), grpc::StatusCode::RESOURCE_EXHAUSTED) << s.error_message();
  EXPECT_NE(s.error_message().find("is forecast at about"), std::string::npos);
  EXPECT_NE(s.error_message().find("--tier=auto"), std::string::npos);
  // A twentieth of the time left goes to the forecast.
  EXPECT_LT(Clock::now() - start, 500ms);
  EXPECT_LT(CpuAfter(c, 500ms), 0.1);
  // The pool is free again: a small query is answered at once.
  EXPECT_TRUE(Optimize(c, Request(testing::MakeQuery(GraphShape::kChain, 4, 1)), 5s).ok());

  // A thousand node counts would multiply the work by a thousand: refused.
  for (uint32_t m = 17; m <= 1000; ++m) r.mutable_options()->mutable_cluster()->add_node_counts(m);
  const grpc::Status refused = Optimize(c, r);
  EXPECT_EQ(refused.error_code(), grpc::StatusCode::RESOURCE_EXHAUSTED);
  EXPECT_NE(refused.error_message().find("node_counts: 1000 given; the limit is 16"),
            std::string::npos)
      << refused.error_message();
}

// The port-calls example under the cluster model with sample rates 1 and
// 0.1, one slice: a Pareto set of many plans.
v1::OptimizeRequest PortCallsFrontierRequest() {
  auto query = ReadQueryFile(std::string(SLICEPLAN_SOURCE_DIR) + "/examples/port_calls_small.json");
  EXPECT_TRUE(query.ok()) << query.status();
  v1::OptimizeRequest r =
      Request(query.ok() ? *query : testing::MakeQuery(GraphShape::kChain, 6, 1), 1);
  r.mutable_options()->set_cost(v1::COST_MODEL_CLUSTER);
  r.mutable_options()->mutable_cluster()->add_sample_rates(1.0);
  r.mutable_options()->mutable_cluster()->add_sample_rates(0.1);
  return r;
}

TEST(HostileClientTest, ParetoSetsPastTheLimitAreRefused) {
  Cluster c = StartCluster(1, {}, {"--max_frontier_plans=2"});
  ASSERT_TRUE(c.coordinator);
  const grpc::Status s = Optimize(c, PortCallsFrontierRequest());
  EXPECT_EQ(s.error_code(), grpc::StatusCode::RESOURCE_EXHAUSTED) << s.error_message();
  EXPECT_NE(s.error_message().find("over the limit of 2 (--max_frontier_plans)"), std::string::npos)
      << s.error_message();
}

// An answer larger than a default gRPC client receives (4 MiB) used to
// reach it as that library's own "message larger than max": the
// coordinator now refuses it by name. Here with the limit lowered to 2,000
// bytes and a Pareto set of many plans.
TEST(HostileClientTest, AnswersPastTheSizeLimitAreRefusedByName) {
  Cluster c = StartCluster(1, {}, {"--max_response_bytes=2000"});
  ASSERT_TRUE(c.coordinator);
  const grpc::Status s = Optimize(c, PortCallsFrontierRequest());
  EXPECT_EQ(s.error_code(), grpc::StatusCode::RESOURCE_EXHAUSTED) << s.error_message();
  EXPECT_NE(s.error_message().find("over the limit of 2000 (--max_response_bytes)"),
            std::string::npos)
      << s.error_message();
  // A single-plan answer fits.
  EXPECT_TRUE(Optimize(c, Request(testing::MakeQuery(GraphShape::kChain, 6, 1))).ok());
  const testing::CommandResult bad = testing::RunCommand(
      std::string(SLICEPLAN_COORDINATOR_BIN) +
      " --listen=127.0.0.1:0 --workers=127.0.0.1:1 --max_response_bytes=10 2>&1");
  EXPECT_EQ(bad.exit_status, 2) << bad.output;
  EXPECT_NE(bad.output.find("--max_response_bytes: must be in 1024..67108864"), std::string::npos)
      << bad.output;
}

TEST(HostileClientTest, DeadlineValuesAreCheckedOrCut) {
  Cluster c = StartCluster(1);
  ASSERT_TRUE(c.coordinator);
  const Query q = testing::MakeQuery(GraphShape::kChain, 6, 1);
  for (double bad : {std::nan(""), -1.0}) {
    v1::OptimizeRequest r = Request(q);
    r.set_deadline_seconds(bad);
    const grpc::Status s = Optimize(c, r);
    EXPECT_EQ(s.error_code(), grpc::StatusCode::INVALID_ARGUMENT) << bad;
    EXPECT_NE(s.error_message().find("deadline_seconds: must be a number >= 0"), std::string::npos)
        << s.error_message();
  }
  for (double huge : {std::numeric_limits<double>::infinity(), 1e308}) {
    v1::OptimizeRequest r = Request(q, 2);
    r.set_deadline_seconds(huge);
    const grpc::Status s = Optimize(c, r);
    EXPECT_TRUE(s.ok()) << huge << ": " << s.error_message();
  }
}

TEST(HostileClientTest, SliceThatKillsWorkersIsRefusedNamingIt) {
  Cluster c = StartCluster(3, {"--test_only_crash_on_slice=1"});
  ASSERT_TRUE(c.coordinator);
  const grpc::Status s = Optimize(c, Request(testing::MakeQuery(GraphShape::kChain, 10, 1), 2));
  EXPECT_EQ(s.error_code(), grpc::StatusCode::INTERNAL) << s.error_message();
  EXPECT_NE(s.error_message().find("slice 1 of 2 failed on 2 workers"), std::string::npos)
      << s.error_message();
  int alive = 0;
  for (const auto& w : c.workers) alive += !w->WaitExit(100ms).ok();
  EXPECT_EQ(alive, 1);  // the slice went to two workers, never the third
  // The survivor still serves what does not crash it.
  EXPECT_TRUE(Optimize(c, Request(testing::MakeQuery(GraphShape::kChain, 10, 1), 1)).ok());
}

int FreePort() {
  const int fd = socket(AF_INET, SOCK_STREAM, 0);
  sockaddr_in addr{};
  addr.sin_family = AF_INET;
  addr.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
  bind(fd, reinterpret_cast<sockaddr*>(&addr), sizeof addr);
  socklen_t len = sizeof addr;
  getsockname(fd, reinterpret_cast<sockaddr*>(&addr), &len);
  close(fd);
  return ntohs(addr.sin_port);
}

// A worker that died is out of the pool; started again at its address, the
// health check brings it back with no restart of the coordinator.
TEST(HostileClientTest, DeadWorkerComesBackWhenItIsBack) {
  const std::string at = "--listen=127.0.0.1:" + std::to_string(FreePort());
  Cluster c;
  c.workers.push_back(testing::StartWorker({at}));
  ASSERT_TRUE(c.workers[0]);
  auto p =
      ServerProcess::Start({SLICEPLAN_COORDINATOR_BIN, "--listen=127.0.0.1:0",
                            "--workers=" + c.workers[0]->address(), "--health_interval_ms=200"});
  ASSERT_TRUE(p.ok()) << p.status();
  c.coordinator = *std::move(p);
  c.stub = v1::Coordinator::NewStub(
      grpc::CreateChannel(c.coordinator->address(), grpc::InsecureChannelCredentials()));
  const v1::OptimizeRequest r = Request(testing::MakeQuery(GraphShape::kChain, 8, 1), 2);
  ASSERT_TRUE(Optimize(c, r).ok());
  c.workers[0]->Signal(SIGKILL);
  std::this_thread::sleep_for(500ms);
  EXPECT_EQ(Optimize(c, r, 5s).error_code(), grpc::StatusCode::UNAVAILABLE);
  c.workers[0] = testing::StartWorker({at});
  ASSERT_TRUE(c.workers[0]);
  grpc::Status s;
  for (int i = 0; i < 50 && !(s = Optimize(c, r, 5s)).ok(); ++i) {
    std::this_thread::sleep_for(100ms);
  }
  EXPECT_TRUE(s.ok()) << s.error_message();
}

// SIGTERM arrives when the first of four slices is done (an event, so the
// request is mid-way on any machine); the grace of 60 s covers the rest
// even on a machine ten times slower, and the coordinator exits as soon as
// the answer is out.
TEST(HostileClientTest, SigtermDeliversTheRunningAnswerAndExits) {
  Cluster c = StartCluster(2, {}, {"--shutdown_grace_seconds=60"});
  ASSERT_TRUE(c.coordinator);
  const Query q = testing::MakeQuery(GraphShape::kRandom, 19, 5);
  grpc::ClientContext context;
  context.set_deadline(std::chrono::system_clock::now() + 120s);
  auto reader = c.stub->OptimizeStream(&context, Request(q, 4));
  v1::OptimizeEvent event;
  bool signalled = false, answered = false;
  while (reader->Read(&event)) {
    if (event.has_progress() && !signalled) {
      c.coordinator->Signal(SIGTERM);
      signalled = true;
    }
    if (event.has_result()) {
      answered = event.result().proven_optimal() && event.result().plan().nodes_size() > 0;
    }
  }
  const grpc::Status s = reader->Finish();
  EXPECT_TRUE(s.ok()) << s.error_message();
  EXPECT_TRUE(signalled);
  EXPECT_TRUE(answered);
  auto exit = c.coordinator->WaitExit(5s);
  ASSERT_TRUE(exit.ok()) << exit.status();
  EXPECT_EQ(*exit, 0);
}

TEST(HostileClientTest, SigtermStopsAWorkerMidSliceWithinTheGrace) {
  auto w = testing::StartWorker({"--shutdown_grace_seconds=1"});
  ASSERT_TRUE(w);
  auto stub = WorkerStub(*w);
  const v1::SolveSliceRequest r = OneSlice(Endless());
  std::thread call([&] {
    grpc::ClientContext context;
    v1::SolveSliceResponse out;
    stub->SolveSlice(&context, r, &out);
  });
  std::this_thread::sleep_for(500ms);
  const auto start = Clock::now();
  w->Signal(SIGTERM);
  auto exit = w->WaitExit(4s);
  call.join();
  ASSERT_TRUE(exit.ok()) << exit.status();
  EXPECT_EQ(*exit, 0);
  EXPECT_LT(Clock::now() - start, 2500ms);
}

// A client that opens a stream and never reads it holds no place: the
// search's progress is coalesced, not awaited, so the next request runs
// as soon as that search ends (before, its writes blocked the search and
// kept the only place until the call's deadline).
TEST(HostileClientTest, AStreamNobodyReadsHoldsNoPlace) {
  Cluster c = StartCluster(2, {}, {"--max_concurrent_requests=1", "--max_queued_requests=0"});
  ASSERT_TRUE(c.coordinator);
  grpc::ChannelArguments args;
  args.SetInt(GRPC_ARG_HTTP2_STREAM_LOOKAHEAD_BYTES, 1024);  // a small window fills at once
  args.SetInt(GRPC_ARG_HTTP2_BDP_PROBE, 0);
  auto stalled_stub = v1::Coordinator::NewStub(grpc::CreateCustomChannel(
      c.coordinator->address(), grpc::InsecureChannelCredentials(), args));
  grpc::ClientContext stalled;
  stalled.set_deadline(std::chrono::system_clock::now() + 60s);
  // 64 slices of a 20-relation chain without cross products (each slice
  // quick): a progress event each, past the window.
  v1::OptimizeRequest heavy = Request(testing::MakeQuery(GraphShape::kChain, 20, 2), 64);
  heavy.mutable_options()->set_cross_products(false);
  auto reader = stalled_stub->OptimizeStream(&stalled, heavy);
  // The stalled stream holds the place first: its slices are being solved.
  const auto solved = [&] {
    grpc::ClientContext context;
    v1::ListWorkersResponse out;
    uint64_t n = 0;
    if (c.stub->ListWorkers(&context, {}, &out).ok()) {
      for (const auto& w : out.workers()) n += w.slices_solved();
    }
    return n;
  };
  for (int i = 0; i < 200 && solved() == 0; ++i) std::this_thread::sleep_for(10ms);
  ASSERT_GT(solved(), 0u);
  const auto start = Clock::now();
  grpc::Status s;
  for (int i = 0; i < 200; ++i) {  // until the stalled search has ended
    s = Optimize(c, Request(testing::MakeQuery(GraphShape::kChain, 4, 1)), 5s);
    if (s.ok()) break;
    std::this_thread::sleep_for(50ms);
  }
  EXPECT_TRUE(s.ok()) << s.error_message();
  EXPECT_LT(Clock::now() - start, 15s);
  // Read now: the answer is there, after fewer progress events than
  // slices (the writes did block, and the search went on without them).
  v1::OptimizeEvent event;
  int progress = 0;
  bool answered = false;
  while (reader->Read(&event)) {
    progress += event.has_progress();
    answered = answered || event.has_result();
  }
  EXPECT_TRUE(reader->Finish().ok());
  EXPECT_TRUE(answered);
  EXPECT_LT(progress, 64);
}

// Streams nobody reads do not hold a stopping coordinator past its
// grace: one stalled on its progress, two with long searches, then
// SIGTERM with a 1 s grace.
TEST(HostileClientTest, UnreadStreamsDoNotHoldShutdownPastTheGrace) {
  Cluster c = StartCluster(2, {}, {"--shutdown_grace_seconds=1"});
  ASSERT_TRUE(c.coordinator);
  grpc::ChannelArguments args;
  args.SetInt(GRPC_ARG_HTTP2_STREAM_LOOKAHEAD_BYTES, 1024);
  args.SetInt(GRPC_ARG_HTTP2_BDP_PROBE, 0);
  auto stalled_stub = v1::Coordinator::NewStub(grpc::CreateCustomChannel(
      c.coordinator->address(), grpc::InsecureChannelCredentials(), args));
  v1::OptimizeRequest chatty = Request(testing::MakeQuery(GraphShape::kChain, 20, 2), 64);
  chatty.mutable_options()->set_cross_products(false);
  std::vector<std::unique_ptr<grpc::ClientContext>> contexts;
  std::vector<std::unique_ptr<grpc::ClientReader<v1::OptimizeEvent>>> readers;
  for (const v1::OptimizeRequest& r : {chatty, Request(Endless(), 4), Request(Endless(), 8)}) {
    contexts.push_back(std::make_unique<grpc::ClientContext>());
    contexts.back()->set_deadline(std::chrono::system_clock::now() + 120s);
    readers.push_back(stalled_stub->OptimizeStream(contexts.back().get(), r));
  }
  std::this_thread::sleep_for(1s);  // every search running, none read
  const auto start = Clock::now();
  c.coordinator->Signal(SIGTERM);
  auto exit = c.coordinator->WaitExit(10s);
  ASSERT_TRUE(exit.ok()) << exit.status();
  EXPECT_EQ(*exit, 0);
  EXPECT_LT(Clock::now() - start, 2500ms);
  for (auto& context : contexts) context->TryCancel();
}

// A worker whose health says SERVING while its calls hang: a 1 s request
// is hedged in time (the delay scales with the deadline, not the server's
// 2 s), and after two slices lost to hedges the worker is demoted, shown
// with the reason, and not called again.
TEST(HostileClientTest, AHangingWorkerIsHedgedInTimeAndDemoted) {
  Cluster c;
  c.workers.push_back(testing::StartWorker({"--test_only_hang_seconds=600"}));
  c.workers.push_back(testing::StartWorker());
  c.coordinator = testing::StartCoordinator(c.workers);  // the default hedge delay, 2 s
  ASSERT_TRUE(c.coordinator);
  c.stub = v1::Coordinator::NewStub(
      grpc::CreateChannel(c.coordinator->address(), grpc::InsecureChannelCredentials()));
  const auto listing = [&] {
    grpc::ClientContext context;
    v1::ListWorkersResponse out;
    EXPECT_TRUE(c.stub->ListWorkers(&context, {}, &out).ok());
    return out;
  };
  for (int i = 0; i < 100 && !(listing().workers(0).healthy() && listing().workers(1).healthy());
       ++i) {
    std::this_thread::sleep_for(50ms);
  }
  v1::OptimizeRequest r = Request(testing::MakeQuery(GraphShape::kRandom, 10, 1), 2);
  r.set_deadline_seconds(1);
  for (int i = 0; i < 2; ++i) {
    v1::OptimizeResponse out;
    const grpc::Status s = Optimize(c, r, 5s, &out);
    ASSERT_TRUE(s.ok()) << s.error_message();  // before: "0 of 1 slices solved" past 1 s
    EXPECT_TRUE(out.proven_optimal());
    EXPECT_GE(out.hedges(), 1u);
  }
  const v1::ListWorkersResponse after = listing();
  EXPECT_FALSE(after.workers(0).healthy());
  EXPECT_NE(after.workers(0).last_error().find("demoted"), std::string::npos)
      << after.workers(0).last_error();
  EXPECT_TRUE(after.workers(1).healthy());
  // A health check later it is still out (its probe slice hangs too), and
  // requests no longer wait for it.
  std::this_thread::sleep_for(500ms);
  EXPECT_FALSE(listing().workers(0).healthy());
  v1::OptimizeResponse third;
  ASSERT_TRUE(Optimize(c, r, 5s, &third).ok());
  EXPECT_EQ(third.hedges(), 0u);
}

// A worker's queue is bounded: past its running slices and
// --max_queued_slices waiting calls, a call is refused at once
// (RESOURCE_EXHAUSTED, busy-marked for the coordinator), not parked.
TEST(HostileClientTest, AWorkerRefusesCallsPastItsQueue) {
  auto w = testing::StartWorker(
      {"--concurrent-slices=1", "--max_queued_slices=2", "--test_only_hang_seconds=2"});
  ASSERT_TRUE(w);
  auto stub = WorkerStub(*w);
  const v1::SolveSliceRequest r = OneSlice(testing::MakeQuery(GraphShape::kChain, 6, 1));
  constexpr int kCalls = 10;
  std::vector<grpc::Status> status(kCalls);
  std::vector<bool> busy_mark(kCalls, false);
  std::vector<std::thread> calls;
  const auto start = Clock::now();
  for (int i = 0; i < kCalls; ++i) {
    calls.emplace_back([&, i] {
      bool busy = false;
      status[i] = SolveOnce(*stub, r, &busy);
      busy_mark[i] = busy;
    });
    std::this_thread::sleep_for(20ms);  // the first three take the slot and the queue
  }
  for (std::thread& t : calls) t.join();
  int ok = 0, refused = 0;
  for (int i = 0; i < kCalls; ++i) {
    if (status[i].ok()) {
      ++ok;
    } else {
      ++refused;
      EXPECT_EQ(status[i].error_code(), grpc::StatusCode::RESOURCE_EXHAUSTED);
      EXPECT_NE(status[i].error_message().find("--max_queued_slices"), std::string::npos)
          << status[i].error_message();
      EXPECT_TRUE(busy_mark[i]);
    }
  }
  EXPECT_EQ(ok, 3);  // one running, two waiting (2 s each, one after another)
  EXPECT_EQ(refused, kCalls - 3);
  EXPECT_GT(Clock::now() - start, 5s);
}

// Admission comes before the request is read: with the worker full, a
// call whose bytes do not even parse is refused busy (its request never
// read), and once the slot is free the same call is refused for its bytes.
TEST(HostileClientTest, AWorkerRefusesABusyCallBeforeReadingIt) {
  auto w = testing::StartWorker(
      {"--concurrent-slices=1", "--max_queued_slices=0", "--test_only_hang_seconds=2"});
  ASSERT_TRUE(w);
  auto stub = WorkerStub(*w);
  const v1::SolveSliceRequest good = OneSlice(testing::MakeQuery(GraphShape::kChain, 4, 1));
  v1::SolveSliceRequest bad = good;
  bad.mutable_query()->mutable_relations(0)->set_name("\xff\xfe");  // sent unchecked
  grpc::Status first;
  std::thread holder([&] { first = SolveOnce(*stub, good); });
  std::this_thread::sleep_for(300ms);  // the good call holds the one slot
  bool busy_mark = false;
  const grpc::Status refused = SolveOnce(*stub, bad, &busy_mark);
  EXPECT_EQ(refused.error_code(), grpc::StatusCode::RESOURCE_EXHAUSTED) << refused.error_message();
  EXPECT_TRUE(busy_mark);
  holder.join();
  EXPECT_TRUE(first.ok()) << first.error_message();
  const grpc::Status unread = SolveOnce(*stub, bad);
  EXPECT_EQ(unread.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_NE(unread.error_message().find("could not be read"), std::string::npos)
      << unread.error_message();
}

// An anytime part sent straight to a worker: each bad field refused by
// name (INVALID_ARGUMENT), and a good part answers its set by its deadline
// with every plan a tree over the query.
TEST(HostileClientTest, AnytimePartsAreCheckedByTheWorker) {
  auto w = testing::StartWorker();
  ASSERT_TRUE(w);
  auto stub = WorkerStub(*w);
  const Query q = testing::MakeQuery(GraphShape::kRandom, 12, 3);
  const auto part = [&](uint32_t k, uint32_t n, CostModelKind cost) {
    v1::SolveSliceRequest r = OneSlice(q);
    SearchOptions options;
    options.cost = cost;
    *r.mutable_options() = SearchOptionsToProto(options);
    r.mutable_anytime()->set_part(k);
    r.mutable_anytime()->set_parts(n);
    return r;
  };
  const auto refused = [&](const v1::SolveSliceRequest& r, const std::string& words) {
    const grpc::Status s = SolveOnce(*stub, r);
    EXPECT_EQ(s.error_code(), grpc::StatusCode::INVALID_ARGUMENT) << s.error_message();
    EXPECT_NE(s.error_message().find(words), std::string::npos) << s.error_message();
  };
  refused(part(0, 0, CostModelKind::kCluster), "anytime.parts: must lie in 1..4096, got 0");
  refused(part(2, 2, CostModelKind::kCluster), "anytime.part: must be less than parts (2), got 2");
  refused(part(0, 1, CostModelKind::kCout), "anytime: the anytime search is the cluster model's");
  v1::SolveSliceRequest one = part(0, 1, CostModelKind::kCluster);
  one.mutable_query()->mutable_relations()->DeleteSubrange(1, 11);
  one.mutable_query()->clear_predicates();
  refused(one, "anytime: the query needs at least 2 relations");

  {  // no deadline: it would hold its slot for the server's maximum
    grpc::ClientContext context;
    v1::SolveSliceResponse out;
    const grpc::Status s = stub->SolveSlice(&context, part(0, 1, CostModelKind::kCluster), &out);
    EXPECT_EQ(s.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
    EXPECT_NE(s.error_message().find("the call has none"), std::string::npos) << s.error_message();
  }
  grpc::ClientContext context;
  context.set_deadline(std::chrono::system_clock::now() + 1500ms);
  v1::SolveSliceResponse out;
  const auto start = Clock::now();
  const grpc::Status s = stub->SolveSlice(&context, part(1, 2, CostModelKind::kCluster), &out);
  ASSERT_TRUE(s.ok()) << s.error_message();
  EXPECT_LT(Clock::now() - start, 1500ms);  // its reserve: the answer came before the deadline
  EXPECT_GT(out.trees(), 1u);
  ASSERT_GT(out.frontier_size(), 0);
  auto answer = AnytimeAnswerFromProto(out, WideQuery::FromExact(q));
  ASSERT_TRUE(answer.ok()) << answer.status();
  SearchOptions cluster;
  cluster.cost = CostModelKind::kCluster;
  EXPECT_TRUE(CheckAnytimeAnswer(WideQuery::FromExact(q), cluster, *answer).ok());
}

TEST(HostileClientTest, BadValuesGetMessagesThatSayWhatIsWrong) {
  Cluster c = StartCluster(1);
  ASSERT_TRUE(c.coordinator);
  const v1::Query base = QueryToProto(testing::MakeQuery(GraphShape::kChain, 4, 1));
  const auto expect = [&](const v1::OptimizeRequest& r, grpc::StatusCode code,
                          const std::string& text) {
    const grpc::Status s = Optimize(c, r);
    EXPECT_EQ(s.error_code(), code) << s.error_message();
    EXPECT_NE(s.error_message().find(text), std::string::npos) << s.error_message();
    EXPECT_LT(s.error_message().size(), 400u);
  };
  v1::OptimizeRequest r;
  *r.mutable_query() = base;
  r.mutable_query()->mutable_relations(0)->set_name(std::string(100000, 'x'));
  expect(r, grpc::StatusCode::INVALID_ARGUMENT,
         "relations[0].name: 100000 bytes; a name has at most 256");
  r.mutable_query()->mutable_relations(0)->set_name(std::string(100000, '-'));
  expect(r, grpc::StatusCode::INVALID_ARGUMENT, "relations[0].name: 100000 bytes");

  *r.mutable_query() = base;
  r.mutable_query()->mutable_relations(0)->set_name("\xff\xfe");
  // Sent as raw bytes: the client library does not check UTF-8.
  expect(r, grpc::StatusCode::INVALID_ARGUMENT, "invalid UTF-8");

  *r.mutable_query() = base;
  r.mutable_options()->set_cost(v1::COST_MODEL_CLUSTER);
  r.mutable_options()->mutable_cluster()->add_node_counts(4294967295u);
  expect(r, grpc::StatusCode::INVALID_ARGUMENT, "got 4294967295");

  r = v1::OptimizeRequest();
  *r.mutable_query() = base;
  r.mutable_query()->mutable_relations(1)->set_name(base.relations(0).name());
  expect(r, grpc::StatusCode::INVALID_ARGUMENT, "relations[1].name: duplicate relation name");

  r = v1::OptimizeRequest();
  *r.mutable_query() = base;
  r.mutable_options()->set_alpha(0.5);
  expect(r, grpc::StatusCode::INVALID_ARGUMENT, "options.alpha: only the cluster model");

  r = v1::OptimizeRequest();
  *r.mutable_query() = base;
  r.mutable_options()->set_cost(v1::COST_MODEL_CLUSTER);
  r.mutable_options()->add_objectives(v1::METRIC_LATENCY_S);
  r.mutable_options()->add_objectives(v1::METRIC_LATENCY_S);
  expect(r, grpc::StatusCode::INVALID_ARGUMENT, "options.objectives[1]: latency_s is listed twice");

  r = v1::OptimizeRequest();
  *r.mutable_query() = base;
  r.mutable_options()->set_cost(v1::COST_MODEL_CLUSTER);
  r.mutable_options()->mutable_preference()->mutable_weights()->set_node_seconds(-1);
  expect(r, grpc::StatusCode::INVALID_ARGUMENT, "options.preference.weights: each must be");
}

TEST(HostileClientTest, OversizedQueriesAreRefusedBeforeTheyGrow) {
  Cluster c = StartCluster(1);
  ASSERT_TRUE(c.coordinator);
  v1::OptimizeRequest r = Request(testing::MakeQuery(GraphShape::kChain, 12, 1));
  const v1::Predicate p = r.query().predicates(0);
  for (int i = 0; i < 100001; ++i) *r.mutable_query()->add_predicates() = p;
  grpc::Status s = Optimize(c, r);
  EXPECT_EQ(s.error_code(), grpc::StatusCode::RESOURCE_EXHAUSTED) << s.error_message();
  EXPECT_NE(s.error_message().find("predicates given; the limit is 100000"), std::string::npos)
      << s.error_message();
  // Past the request byte limit gRPC refuses it before it is parsed.
  for (int i = 0; i < 600000; ++i) *r.mutable_query()->add_predicates() = p;
  s = Optimize(c, r);
  EXPECT_EQ(s.error_code(), grpc::StatusCode::RESOURCE_EXHAUSTED) << s.error_message();
}

TEST(HostileClientTest, RefusedRequestsAreNotCountedAgainstWorkers) {
  Cluster c = StartCluster(1, {"--memo_limit_gib=0.001"});
  ASSERT_TRUE(c.coordinator);
  const grpc::Status s = Optimize(c, Request(testing::MakeQuery(GraphShape::kChain, 20, 1), 1));
  EXPECT_EQ(s.error_code(), grpc::StatusCode::RESOURCE_EXHAUSTED) << s.error_message();
  grpc::ClientContext context;
  v1::ListWorkersResponse pool;
  ASSERT_TRUE(c.stub->ListWorkers(&context, v1::ListWorkersRequest(), &pool).ok());
  ASSERT_EQ(pool.workers_size(), 1);
  EXPECT_EQ(pool.workers(0).failures(), 0u);
  EXPECT_EQ(pool.workers(0).last_error(), "");
  EXPECT_TRUE(pool.workers(0).healthy());
}

}  // namespace
}  // namespace sliceplan
