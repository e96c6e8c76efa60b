// Load: a bounded client (a fixed number of threads, a fixed run time, then
// it stops) sends concurrent mixed requests to a coordinator over two
// workers: small and medium queries whose optimum the subset DP knows,
// invalid requests, exact searches with short deadlines, searches the
// client cancels, and past-the-exact-reach queries under a deadline. Every
// valid request must come back with the optimum (or, for the deadline
// cases, the status the interface promises), every invalid one refused as
// INVALID_ARGUMENT, no server may die, the pool must be idle and healthy
// at the end, and the servers' resident memory must stay flat after the
// warm-up. Latency percentiles and memory figures are printed.
//
// SLICEPLAN_LOAD_SECONDS sets the run time (default 8 in the test suite;
// bench/load-run runs a minute and keeps the figures).
#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <map>
#include <mutex>
#include <thread>
#include <vector>

#include "cli/rpc_client.h"
#include "core/cost/cout_model.h"
#include "core/model/plan.h"
#include "grpcpp/grpcpp.h"
#include "gtest/gtest.h"
#include "sliceplan.grpc.pb.h"
#include "tests/support/process.h"
#include "tests/support/reference_dp.h"
#include "tests/support/servers.h"
#include "tests/support/test_queries.h"
#include "wire/query_proto.h"
#include "wire/service_proto.h"

namespace sliceplan {
namespace {

using namespace std::chrono_literals;
using testing::GraphShape;
using Clock = std::chrono::steady_clock;

// The request mix, by request number modulo 20.
enum class Kind { kSmall, kMedium, kInvalid, kShortDeadline, kCancel, kPastReach };
constexpr Kind kMix[20] = {Kind::kSmall,         Kind::kSmall,         Kind::kSmall,
                           Kind::kSmall,         Kind::kSmall,         Kind::kSmall,
                           Kind::kSmall,         Kind::kSmall,                          // 40%
                           Kind::kMedium,        Kind::kMedium,        Kind::kMedium,   // 15%
                           Kind::kInvalid,       Kind::kInvalid,       Kind::kInvalid,  // 15%
                           Kind::kShortDeadline, Kind::kShortDeadline,                  // 10%
                           Kind::kCancel,        Kind::kCancel,                         // 10%
                           Kind::kPastReach,     Kind::kPastReach};                     // 10%

constexpr int kClients = 6;  // below the coordinator's 16 requests at once
constexpr int kMaxRequests = 100000;

// A valid query and its optimum by the subset DP (tests/support).
struct Known {
  Query query;
  bool cross_products;
  double optimum;
};

std::vector<Known> KnownQueries(int lo, int hi) {
  std::vector<Known> out;
  const GraphShape shapes[] = {GraphShape::kChain,  GraphShape::kCycle,  GraphShape::kStar,
                               GraphShape::kClique, GraphShape::kRandom, GraphShape::kHyper};
  uint64_t seed = 1;
  for (int n = lo; n <= hi; ++n) {
    for (GraphShape shape : shapes) {
      const bool cross = (seed % 2) == 0;
      Query q = testing::MakeQuery(shape, n, seed++);
      const double best = testing::DpBestBushy(q, cross);
      out.push_back({std::move(q), cross, best});
    }
  }
  return out;
}

// Invalid requests, each refused with INVALID_ARGUMENT by the interface.
std::vector<v1::OptimizeRequest> InvalidRequests() {
  const v1::Query base = QueryToProto(testing::MakeQuery(GraphShape::kChain, 5, 1));
  std::vector<v1::OptimizeRequest> out(5);
  for (auto& r : out) *r.mutable_query() = base;
  out[0].mutable_query()->mutable_relations(1)->set_name(base.relations(0).name());
  out[1].mutable_query()->mutable_predicates(0)->add_relations("no_such_relation");
  out[2].mutable_query()->mutable_relations(2)->set_rows(std::nan(""));
  out[3].set_slice_count(3);
  out[4].set_deadline_seconds(-1);
  return out;
}

struct Tally {
  std::mutex mu;
  std::map<std::string, int> counts;  // kind/outcome -> requests
  std::vector<double> valid_seconds;  // latency of small and medium requests
  double worst_deadline_overrun = 0;  // seconds past the requested deadline
  std::vector<std::string> failures;  // what went wrong, for the report

  void Add(const std::string& key) {
    std::lock_guard<std::mutex> lock(mu);
    ++counts[key];
  }
  void Fail(const std::string& what) {
    std::lock_guard<std::mutex> lock(mu);
    if (failures.size() < 20) failures.push_back(what);
  }
};

class LoadClient {
 public:
  LoadClient(const std::string& address, Tally& tally)
      : stub_(v1::Coordinator::NewStub(
            grpc::CreateChannel(address, grpc::InsecureChannelCredentials()))),
        tally_(tally),
        small_(KnownQueries(6, 9)),
        medium_(KnownQueries(12, 13)),
        invalid_(InvalidRequests()) {}

  void Send(int i) {
    switch (kMix[i % 20]) {
      case Kind::kSmall:
        return Exact(small_[static_cast<size_t>(i) % small_.size()], "small");
      case Kind::kMedium:
        return Exact(medium_[static_cast<size_t>(i) % medium_.size()], "medium");
      case Kind::kInvalid:
        return Invalid(invalid_[static_cast<size_t>(i) % invalid_.size()]);
      case Kind::kShortDeadline:
        return ShortDeadline(i);
      case Kind::kCancel:
        return Cancel(i);
      case Kind::kPastReach:
        return PastReach(i);
    }
  }

 private:
  grpc::Status Call(const v1::OptimizeRequest& r, v1::OptimizeResponse& out,
                    grpc::ClientContext& context) {
    context.set_deadline(std::chrono::system_clock::now() + 60s);
    return stub_->Optimize(&context, r, &out);
  }

  // The plan must be a valid tree over the query whose C_out, recomputed
  // here, is the subset DP's optimum.
  void Exact(const Known& k, const char* kind) {
    v1::OptimizeRequest r;
    *r.mutable_query() = QueryToProto(k.query);
    r.mutable_options()->set_cross_products(k.cross_products);
    r.set_tier(v1::TIER_EXACT);
    v1::OptimizeResponse out;
    grpc::ClientContext context;
    const auto start = Clock::now();
    const grpc::Status s = Call(r, out, context);
    const double seconds = std::chrono::duration<double>(Clock::now() - start).count();
    if (!s.ok()) return Fail(kind, s);
    auto plan = PlanFromProto(out.plan(), k.query, CostModelKind::kCout);
    if (!plan.ok()) return Fail(kind, plan.status().ToString());
    const double cost = CostWithCout(*plan);
    if (std::abs(cost - k.optimum) > 1e-9 * k.optimum || !out.proven_optimal()) {
      return Fail(kind, "cost " + std::to_string(cost) + ", optimum " + std::to_string(k.optimum));
    }
    tally_.Add(std::string(kind) + " optimal");
    std::lock_guard<std::mutex> lock(tally_.mu);
    tally_.valid_seconds.push_back(seconds);
  }

  void Invalid(const v1::OptimizeRequest& r) {
    v1::OptimizeResponse out;
    grpc::ClientContext context;
    const grpc::Status s = Call(r, out, context);
    if (s.error_code() != grpc::StatusCode::INVALID_ARGUMENT) return Fail("invalid", s);
    tally_.Add("invalid refused");
  }

  // Minutes of exact work under a 0.3 s deadline: DEADLINE_EXCEEDED, on
  // time.
  void ShortDeadline(int i) {
    v1::OptimizeRequest r;
    *r.mutable_query() = QueryToProto(testing::MakeQuery(GraphShape::kRandom, 22, 1 + i % 5));
    r.set_tier(v1::TIER_EXACT);
    r.set_deadline_seconds(0.3);
    Timed(r, 0.3, grpc::StatusCode::DEADLINE_EXCEEDED, "short deadline");
  }

  // 40 relations without cross products under a 0.5 s deadline: auto
  // answers with a valid plan over every relation, on time.
  void PastReach(int i) {
    const Query q = testing::MakeQuery(GraphShape::kRandom, 40, 1 + i % 7);
    v1::OptimizeRequest r;
    *r.mutable_query() = QueryToProto(q);
    r.mutable_options()->set_cross_products(false);
    r.set_deadline_seconds(0.5);
    const v1::OptimizeResponse out = Timed(r, 0.5, grpc::StatusCode::OK, "past reach");
    if (out.plan().nodes_size() > 0 && !PlanFromProto(out.plan(), q, CostModelKind::kCout).ok()) {
      Fail("past reach", "invalid plan");
    }
  }

  v1::OptimizeResponse Timed(const v1::OptimizeRequest& r, double deadline, grpc::StatusCode want,
                             const char* kind) {
    v1::OptimizeResponse out;
    grpc::ClientContext context;
    const auto start = Clock::now();
    const grpc::Status s = Call(r, out, context);
    const double overrun = std::chrono::duration<double>(Clock::now() - start).count() - deadline;
    {
      std::lock_guard<std::mutex> lock(tally_.mu);
      tally_.worst_deadline_overrun = std::max(tally_.worst_deadline_overrun, overrun);
    }
    if (s.error_code() != want) {
      Fail(kind, s);
    } else {
      tally_.Add(std::string(kind) + " as promised");
    }
    return out;
  }

  // Minutes of exact work, cancelled by the client after 50 to 250 ms.
  void Cancel(int i) {
    v1::OptimizeRequest r;
    *r.mutable_query() = QueryToProto(testing::MakeQuery(GraphShape::kRandom, 22, 1 + i % 5));
    r.set_tier(v1::TIER_EXACT);
    grpc::ClientContext context;
    std::thread cancel([&context, i] {
      std::this_thread::sleep_for(std::chrono::milliseconds(50 + 50 * (i % 5)));
      context.TryCancel();
    });
    v1::OptimizeResponse out;
    const grpc::Status s = Call(r, out, context);
    cancel.join();
    if (s.error_code() != grpc::StatusCode::CANCELLED) return Fail("cancel", s);
    tally_.Add("cancel cancelled");
  }

  void Fail(const char* kind, const grpc::Status& s) {
    Fail(kind, "status " + std::to_string(s.error_code()) + ": " + s.error_message());
  }
  void Fail(const char* kind, const std::string& what) {
    tally_.Add(std::string(kind) + " FAILED");
    tally_.Fail(std::string(kind) + ": " + what);
  }

  std::unique_ptr<v1::Coordinator::Stub> stub_;
  Tally& tally_;
  std::vector<Known> small_, medium_;
  std::vector<v1::OptimizeRequest> invalid_;
};

double Percentile(std::vector<double> v, double p) {
  if (v.empty()) return 0;
  std::sort(v.begin(), v.end());
  return v[static_cast<size_t>(p * static_cast<double>(v.size() - 1))];
}

int64_t PoolRss(const std::vector<testing::ServerProcess*>& servers) {
  int64_t total = 0;
  for (const auto* s : servers) total += s->RssBytes();
  return total;
}

double LoadSeconds() {
  const char* env = std::getenv("SLICEPLAN_LOAD_SECONDS");
  const double s = env ? std::atof(env) : 8;
  return s > 0 && s <= 3600 ? s : 8;
}

TEST(LoadTest, MixedConcurrentRequestsAreAllAnsweredAsPromised) {
  std::vector<std::unique_ptr<testing::ServerProcess>> workers;
  for (int i = 0; i < 2; ++i) {
    workers.push_back(testing::StartWorker());
    ASSERT_TRUE(workers.back());
  }
  auto coordinator = testing::StartCoordinator(workers);
  ASSERT_TRUE(coordinator);
  const std::vector<testing::ServerProcess*> servers = {workers[0].get(), workers[1].get(),
                                                        coordinator.get()};
  Tally tally;
  std::vector<std::unique_ptr<LoadClient>> clients;
  for (int c = 0; c < kClients; ++c) {
    clients.push_back(std::make_unique<LoadClient>(coordinator->address(), tally));
  }

  const double seconds = LoadSeconds();
  const auto start = Clock::now();
  const auto end = start + std::chrono::duration<double>(seconds);
  std::atomic<int> next{0};
  std::vector<std::thread> threads;
  for (int c = 0; c < kClients; ++c) {
    threads.emplace_back([&, c] {
      for (int i = next++; i < kMaxRequests && Clock::now() < end; i = next++) {
        clients[static_cast<size_t>(c)]->Send(i);
      }
    });
  }
  // Memory after a quarter of the run (the warm-up: memos, channels and
  // thread stacks allocated once), then at the end.
  std::this_thread::sleep_until(start + std::chrono::duration<double>(seconds / 4));
  const int64_t warm_rss = PoolRss(servers);
  for (auto& t : threads) t.join();
  const double wall = std::chrono::duration<double>(Clock::now() - start).count();
  const int64_t end_rss = PoolRss(servers);

  int total = 0;
  for (const auto& [key, n] : tally.counts) {
    std::printf("  %-28s %6d\n", key.c_str(), n);
    total += n;
  }
  std::printf("requests %d in %.1f s (%.1f per second), %d clients\n", total, wall,
              static_cast<double>(total) / wall, kClients);
  std::printf("exact small+medium latency: p50 %.4f s, p99 %.4f s (%zu requests)\n",
              Percentile(tally.valid_seconds, 0.5), Percentile(tally.valid_seconds, 0.99),
              tally.valid_seconds.size());
  std::printf("worst deadline overrun %.3f s\n", tally.worst_deadline_overrun);
  std::printf("servers' RSS after warm-up %.1f MiB, at the end %.1f MiB\n",
              static_cast<double>(warm_rss) / (1 << 20), static_cast<double>(end_rss) / (1 << 20));
  for (const auto& f : tally.failures) std::printf("FAILED %s\n", f.c_str());

  EXPECT_TRUE(tally.failures.empty());
  EXPECT_GT(total, 20);
  for (const char* kind : {"small optimal", "invalid refused", "cancel cancelled"}) {
    EXPECT_GT(tally.counts[kind], 0) << kind;
  }
  // Deadlines are kept to within a second even with the machine saturated
  // (six clients on two cores).
  EXPECT_LT(tally.worst_deadline_overrun, 1.0);
  // Flat: at most a quarter more than after the warm-up, plus 64 MiB for
  // allocator slack.
  EXPECT_LT(end_rss, warm_rss + warm_rss / 4 + (int64_t{64} << 20));
  // Nobody died, and the pool is idle and healthy again.
  for (auto* s : servers) {
    EXPECT_FALSE(s->WaitExit(0ms).ok()) << s->address();
  }
  const double cpu_before = workers[0]->CpuSeconds() + workers[1]->CpuSeconds();
  std::this_thread::sleep_for(1500ms);
  EXPECT_LT(workers[0]->CpuSeconds() + workers[1]->CpuSeconds() - cpu_before, 0.2);
  auto pool = cli::ListWorkersRemote(coordinator->address());
  ASSERT_TRUE(pool.ok()) << pool.status();
  for (const auto& w : pool->workers()) EXPECT_TRUE(w.healthy()) << w.address();
}

}  // namespace
}  // namespace sliceplan
