// Prepared queries in the service (coordinator/template_desk.h,
// templates/plan_store.h): real worker and coordinator processes on
// loopback. The grid optimized on the pool keeps its guarantee against the
// independent subset DP; ChooseTemplatePlan answers what the plan set file
// answers locally; bad requests are refused by field; the plan store keeps
// every finished template through a kill -9 in the middle of another
// prepare, and a damaged store stops the coordinator at start.
#include <signal.h>
#include <unistd.h>

#include <atomic>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <random>
#include <sstream>
#include <thread>

#include "cli/rpc_client.h"
#include "core/plan_cover.h"
#include "gtest/gtest.h"
#include "templates/plan_set.h"
#include "templates/plan_store.h"
#include "tests/support/process.h"
#include "tests/support/reference_dp.h"
#include "tests/support/servers.h"
#include "tests/support/temp_path.h"

namespace sliceplan {
namespace {

using namespace std::chrono_literals;
using testing::StartCoordinator;
using testing::StartWorker;

std::string ReadText(const std::string& path) {
  std::ifstream in(path);
  std::stringstream text;
  text << in.rdbuf();
  return text.str();
}

// The port-calls template of examples/: 8 relations, 2 parameters.
std::string PortCallsTemplate() {
  return ReadText(std::string(SLICEPLAN_SOURCE_DIR) + "/examples/port_calls_template.json");
}

v1::PrepareTemplateRequest Request(const std::string& json, uint32_t grid, double max_ratio = 1.2) {
  v1::PrepareTemplateRequest r;
  r.set_template_json(json);
  r.set_grid(grid);
  r.set_max_ratio(max_ratio);
  return r;
}

v1::ChooseTemplatePlanRequest Choice(const std::string& id, double since, double fact_rows) {
  v1::ChooseTemplatePlanRequest r;
  r.set_template_id(id);
  auto* a = r.add_values();
  a->set_name("since");
  a->set_value(since);
  auto* b = r.add_values();
  b->set_name("fact_rows");
  b->set_value(fact_rows);
  return r;
}

TEST(TemplateServiceTest, TheGridOnThePoolKeepsItsGuaranteeAndChooseMatchesTheFile) {
  std::vector<std::unique_ptr<testing::ServerProcess>> workers;
  workers.push_back(StartWorker());
  workers.push_back(StartWorker());
  auto coordinator = StartCoordinator(workers);
  ASSERT_NE(coordinator, nullptr);
  const cli::RemoteCoordinator to{coordinator->address(), {}, ""};
  size_t events = 0, last_done = 0;
  auto result =
      cli::PrepareRemote(to, Request(PortCallsTemplate(), 6), [&](size_t done, size_t total) {
        ++events;
        EXPECT_EQ(total, 36u);
        EXPECT_GE(done, last_done);
        last_done = done;
      });
  ASSERT_TRUE(result.ok()) << result.status();
  // Progress is coalesced, and an event not yet sent when the answer is
  // ready gives way to it (rpc/coalescing_writer.h): a prepare of a few
  // milliseconds may send none, so only their order and total are owed.
  EXPECT_LE(last_done, 36u);
  EXPECT_LE(events, 36u);
  EXPECT_EQ(result->report().grid_points(), 36u);
  EXPECT_EQ(result->template_id().size(), 32u);
  auto set = ParsePlanSet(result->plan_set_json());
  ASSERT_TRUE(set.ok()) << set.status();
  EXPECT_EQ(set->prepared.plans.size(), result->report().stored_plans());
  // The guarantee at every grid point, against the subset DP's optimum.
  const auto& params = set->query_template.parameters();
  const std::vector<double> since = GridValues(params[0], 6), rows = GridValues(params[1], 6);
  for (double s : since) {
    for (double r : rows) {
      auto q = set->query_template.At(std::vector<double>{s, r});
      ASSERT_TRUE(q.ok());
      double best = 1e300;
      for (Plan plan : set->prepared.plans) best = std::min(best, CostPlanOn(plan, *q));
      EXPECT_LE(best,
                testing::DpBestBushy(*q, true) * result->report().max_ratio_on_grid() * (1 + 1e-9));
      EXPECT_LE(result->report().max_ratio_on_grid(), 1.2);
    }
  }
  // The service's choice is the file's choice at random values.
  std::mt19937_64 rng(5);
  std::uniform_real_distribution<double> u(0, 1);
  for (int i = 0; i < 20; ++i) {
    const double s = 1e-4 * std::pow(1e4, u(rng)), r = 1e4 * std::pow(1e4, u(rng));
    for (bool robust : {false, true}) {
      v1::ChooseTemplatePlanRequest request = Choice(result->template_id(), s, r);
      request.set_robust(robust);
      auto remote = cli::ChooseRemote(to, request);
      ASSERT_TRUE(remote.ok()) << remote.status();
      auto local =
          ChooseStoredPlan(set->query_template, set->prepared, std::vector<double>{s, r}, robust);
      ASSERT_TRUE(local.ok());
      EXPECT_EQ(remote->plan_index(), local->index);
      EXPECT_EQ(remote->stored_plans(), set->prepared.plans.size());
      ASSERT_GT(remote->plan().nodes_size(), 0);
      const auto& root = remote->plan().nodes(remote->plan().nodes_size() - 1);
      EXPECT_DOUBLE_EQ(root.costs().at("cout"), local->plan.root().cost);
    }
  }
}

TEST(TemplateServiceTest, BadRequestsAreRefusedByField) {
  std::vector<std::unique_ptr<testing::ServerProcess>> workers;
  workers.push_back(StartWorker());
  auto coordinator = StartCoordinator(workers, {"--max_grid_points=100"});
  ASSERT_NE(coordinator, nullptr);
  const cli::RemoteCoordinator to{coordinator->address(), {}, ""};
  const auto refused = [&](v1::PrepareTemplateRequest request, absl::StatusCode code,
                           const std::string& words) {
    auto r = cli::PrepareRemote(to, request, {});
    ASSERT_FALSE(r.ok()) << words;
    EXPECT_EQ(r.status().code(), code) << r.status();
    EXPECT_NE(r.status().message().find(words), std::string::npos) << r.status();
  };
  const std::string json = PortCallsTemplate();
  refused(Request("{\"relations\": 3}", 4), absl::StatusCode::kInvalidArgument, "template_json:");
  refused(Request(json, 100), absl::StatusCode::kInvalidArgument, "grid: 100 is outside 2..64");
  refused(Request(json, 11), absl::StatusCode::kResourceExhausted, "--max_grid_points");
  refused(Request(json, 4, 0.5), absl::StatusCode::kInvalidArgument, "max_ratio:");
  v1::PrepareTemplateRequest cluster = Request(json, 4);
  cluster.mutable_options()->set_cost(v1::COST_MODEL_CLUSTER);
  refused(cluster, absl::StatusCode::kInvalidArgument, "options.cost:");

  auto unknown = cli::ChooseRemote(to, Choice("0123", 0.1, 1e5));
  EXPECT_EQ(unknown.status().code(), absl::StatusCode::kNotFound) << unknown.status();
  // A megabyte of id is not sent back whole.
  auto hostile = cli::ChooseRemote(to, Choice(std::string(1 << 20, 'x'), 0.1, 1e5));
  EXPECT_EQ(hostile.status().code(), absl::StatusCode::kNotFound);
  EXPECT_LT(hostile.status().message().size(), 300u);
  auto prepared = cli::PrepareRemote(to, Request(json, 3), {});
  ASSERT_TRUE(prepared.ok()) << prepared.status();
  v1::ChooseTemplatePlanRequest missing = Choice(prepared->template_id(), 0.1, 1e5);
  missing.mutable_values()->RemoveLast();
  auto r1 = cli::ChooseRemote(to, missing);
  EXPECT_EQ(r1.status().code(), absl::StatusCode::kInvalidArgument);
  EXPECT_NE(r1.status().message().find("values: no value for parameter \"fact_rows\""),
            std::string::npos)
      << r1.status();
  for (double bad : {5.0, std::nan(""), -1.0}) {
    auto r2 = cli::ChooseRemote(to, Choice(prepared->template_id(), bad, 1e5));
    EXPECT_EQ(r2.status().code(), absl::StatusCode::kInvalidArgument) << bad;
    EXPECT_NE(r2.status().message().find("since"), std::string::npos) << r2.status();
  }
}

TEST(TemplateServiceTest, TheStoreKeepsFinishedTemplatesThroughAKillMidPrepare) {
  testing::TempPath store("plans.db");
  std::vector<std::unique_ptr<testing::ServerProcess>> workers;
  workers.push_back(StartWorker());
  const std::vector<std::string> flags{"--plan_store=" + store.str()};
  auto coordinator = StartCoordinator(workers, flags);
  ASSERT_NE(coordinator, nullptr);
  cli::RemoteCoordinator to{coordinator->address(), {}, ""};
  auto first = cli::PrepareRemote(to, Request(PortCallsTemplate(), 4), {});
  ASSERT_TRUE(first.ok()) << first.status();
  auto before = cli::ChooseRemote(to, Choice(first->template_id(), 0.01, 1e6));
  ASSERT_TRUE(before.ok()) << before.status();

  // A long prepare (4,096 points, one at a time), killed once under way.
  std::atomic<bool> started{false};
  absl::Status second_status;
  std::thread second([&] {
    second_status = cli::PrepareRemote(to, Request(PortCallsTemplate(), 64), [&](size_t, size_t) {
                      started = true;
                    }).status();
  });
  const auto give_up = std::chrono::steady_clock::now() + 30s;
  while (!started && std::chrono::steady_clock::now() < give_up) std::this_thread::sleep_for(5ms);
  ASSERT_TRUE(started.load());
  coordinator->Signal(SIGKILL);
  second.join();
  EXPECT_FALSE(second_status.ok());
  {
    auto opened = PlanStore::Open(store.str());
    ASSERT_TRUE(opened.ok()) << opened.status();
    auto stored = (*opened)->LoadAll();
    ASSERT_TRUE(stored.ok());
    ASSERT_EQ(stored->size(), 1u);  // the finished one; the interrupted one absent
    EXPECT_EQ((*stored)[0].id, first->template_id());
    EXPECT_EQ((*stored)[0].plan_set_json, first->plan_set_json());
  }
  // Restarted on the same store: the same answer for the same values.
  coordinator = StartCoordinator(workers, {"--plan_store=" + store.str(), "--max_templates=1"});
  ASSERT_NE(coordinator, nullptr);
  to.address = coordinator->address();
  auto after = cli::ChooseRemote(to, Choice(first->template_id(), 0.01, 1e6));
  ASSERT_TRUE(after.ok()) << after.status();
  EXPECT_EQ(after->plan_index(), before->plan_index());
  EXPECT_EQ(after->plan().SerializeAsString(), before->plan().SerializeAsString());
  // Full at one template: refused before any work.
  auto full = cli::PrepareRemote(to, Request(PortCallsTemplate(), 4), {});
  EXPECT_EQ(full.status().code(), absl::StatusCode::kResourceExhausted) << full.status();
  EXPECT_NE(full.status().message().find("--max_templates"), std::string::npos) << full.status();
}

TEST(TemplateServiceTest, ADamagedStoreStopsTheCoordinatorAtStartByName) {
  testing::TempPath store("damaged.db");
  std::ofstream(store.str()) << "{\"sliceplan_plan_set\": 1}\n";
  const testing::CommandResult run = testing::RunCommand(
      std::string(SLICEPLAN_COORDINATOR_BIN) +
      " --listen=127.0.0.1:0 --workers=127.0.0.1:1 --plan_store=" + store.str() + " 2>&1");
  EXPECT_EQ(run.exit_status, 2) << run.output;
  EXPECT_NE(run.output.find("--plan_store=" + store.str() + ": not a plan store"),
            std::string::npos)
      << run.output;
  // Nothing was written over it.
  EXPECT_EQ(ReadText(store.str()), "{\"sliceplan_plan_set\": 1}\n");
}

TEST(TemplateServiceTest, CliPrepareOnACoordinatorWritesThePlanSetAndPrintsTheId) {
  std::vector<std::unique_ptr<testing::ServerProcess>> workers;
  workers.push_back(StartWorker());
  auto coordinator = StartCoordinator(workers);
  ASSERT_NE(coordinator, nullptr);
  testing::TempPath out("cli_plans.json");
  const std::string source = std::string(SLICEPLAN_SOURCE_DIR);
  const testing::CommandResult run = testing::RunCommand(
      std::string(SLICEPLAN_CLI_BIN) + " prepare " + source +
      "/examples/port_calls_template.json --grid=4 --format=json --coordinator=" +
      coordinator->address() + " --out=" + out.str() + " 2>&1");
  ASSERT_EQ(run.exit_status, 0) << run.output;
  EXPECT_NE(run.output.find("\"grid_points\": 16"), std::string::npos) << run.output;
  EXPECT_NE(run.output.find("\"template_id\": \""), std::string::npos) << run.output;
  auto set = ParsePlanSet(ReadText(out.str()));
  ASSERT_TRUE(set.ok()) << set.status();
  // The file answers choose like one prepared locally.
  const testing::CommandResult chose =
      testing::RunCommand(std::string(SLICEPLAN_CLI_BIN) + " choose " + out.str() +
                          " --set=since=0.01,fact_rows=1e6 2>&1");
  EXPECT_EQ(chose.exit_status, 0) << chose.output;
  const testing::CommandResult both = testing::RunCommand(
      std::string(SLICEPLAN_CLI_BIN) + " prepare " + source +
      "/examples/port_calls_template.json --workers=2 --coordinator=" + coordinator->address() +
      " --out=" + out.str() + " 2>&1");
  EXPECT_EQ(both.exit_status, 2) << both.output;
  EXPECT_NE(both.output.find("--workers and --coordinator"), std::string::npos) << both.output;
}

}  // namespace
}  // namespace sliceplan
