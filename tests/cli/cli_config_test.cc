// Parsing `sliceplan optimize` flags into the config the library takes:
// each flag lands in its field, each bad value is refused naming the flag.
#include "cli/cli_config.h"

#include "gtest/gtest.h"

namespace sliceplan::cli {
namespace {

absl::StatusOr<OptimizeConfig> Parse(std::vector<std::string> args) {
  return ParseOptimizeArgs(args, 3);
}

TEST(CliConfigTest, DefaultsAndTheQueryPath) {
  auto c = Parse({"q.json"});
  ASSERT_TRUE(c.ok()) << c.status();
  EXPECT_EQ(c->query_path, "q.json");
  EXPECT_EQ(c->workers, 3);
  EXPECT_FALSE(c->slices.has_value());
  EXPECT_EQ(c->search.shape, PlanShape::kBushy);
  EXPECT_TRUE(c->search.cross_products);
  EXPECT_EQ(c->search.cost, CostModelKind::kCout);
  EXPECT_EQ(c->format, OutputFormat::kText);
}

TEST(CliConfigTest, ThreadsPerWorkerDefaultToTheCoresOverTheWorkers) {
  auto c = Parse({"q.json"});  // 3 cores, 3 workers
  ASSERT_TRUE(c.ok());
  EXPECT_EQ(c->search.threads, 1);
  c = Parse({"q.json", "--workers=1"});
  ASSERT_TRUE(c.ok());
  EXPECT_EQ(c->search.threads, 3);
  c = Parse({"q.json", "--workers=8"});
  ASSERT_TRUE(c.ok());
  EXPECT_EQ(c->search.threads, 1);
  c = Parse({"q.json", "--workers=1", "--threads-per-worker=2"});
  ASSERT_TRUE(c.ok());
  EXPECT_EQ(c->search.threads, 2);
  for (const char* bad : {"--threads-per-worker=0", "--threads-per-worker=257"}) {
    c = Parse({"q.json", bad});
    ASSERT_FALSE(c.ok()) << bad;
    EXPECT_NE(c.status().message().find("--threads-per-worker"), std::string::npos);
  }
  c = Parse({"q.json", "--coordinator=127.0.0.1:1", "--threads-per-worker=2"});
  ASSERT_FALSE(c.ok());
  EXPECT_NE(c.status().message().find("in-process workers only"), std::string::npos) << c.status();
}

TEST(CliConfigTest, EveryFlagLandsInItsField) {
  auto c = Parse({"--shape=left-deep",
                  "--cross-products=false",
                  "--cost=cluster",
                  "q.json",
                  "--slices=8",
                  "--workers=5",
                  "--format=json",
                  "--deadline-seconds=2.5",
                  "--partial-on-deadline=true",
                  "--memo-limit=512MiB",
                  "--alpha=1.05",
                  "--node-counts=4,16",
                  "--sample-rates=1,0.1",
                  "--quiet",
                  "--coordinator=10.0.0.7:7000",
                  "--net-bytes-per-s=2e9",
                  "--cpu-rows-per-s=1e8",
                  "--scan-bytes-per-s=7e8",
                  "--stage-startup-s=0.25",
                  "--objectives=latency_s,completeness",
                  "--bound=completeness>=0.9",
                  "--prefer=node_seconds",
                  "--plot=f.svg"});
  ASSERT_TRUE(c.ok()) << c.status();
  EXPECT_EQ(c->search.shape, PlanShape::kLeftDeep);
  EXPECT_FALSE(c->search.cross_products);
  EXPECT_EQ(c->search.cost, CostModelKind::kCluster);
  EXPECT_EQ(c->slices, 8u);
  EXPECT_EQ(c->workers, 5);
  EXPECT_EQ(c->format, OutputFormat::kJson);
  EXPECT_EQ(c->deadline_seconds, 2.5);
  EXPECT_TRUE(c->partial_on_deadline);
  EXPECT_EQ(c->search.memo_limit_bytes, uint64_t{512} << 20);
  EXPECT_EQ(c->search.cluster.alpha, 1.05);
  EXPECT_EQ(c->search.cluster.params.node_counts, (std::vector<int>{4, 16}));
  EXPECT_EQ(c->search.cluster.params.sample_rates, (std::vector<double>{1, 0.1}));
  EXPECT_TRUE(c->quiet);
  EXPECT_EQ(c->coordinator, "10.0.0.7:7000");
  const ClusterParams& p = c->search.cluster.params;
  EXPECT_EQ(p.net_bytes_per_s, 2e9);
  EXPECT_EQ(p.cpu_rows_per_s, 1e8);
  EXPECT_EQ(p.scan_bytes_per_s, 7e8);
  EXPECT_EQ(p.stage_startup_s, 0.25);
  EXPECT_EQ(c->search.cluster.objectives.mask, Objectives::kLatency | Objectives::kCompleteness);
  ASSERT_EQ(c->search.cluster.choice.bounds.size(), 1u);
  EXPECT_EQ(c->search.cluster.choice.bounds[0].value, 0.9);
  EXPECT_EQ(c->search.cluster.choice.prefer.node_seconds, 1);
  EXPECT_EQ(c->plot_path, "f.svg");
}

TEST(CliConfigTest, BadValuesNameTheFlag) {
  const std::pair<std::vector<std::string>, std::string> cases[] = {
      {{"q.json", "--shape=round"}, "--shape=round: expected bushy or left-deep"},
      {{"q.json", "--slices=-2"}, "--slices=-2: expected a whole number"},
      {{"q.json", "--workers=0"}, "--workers=0: expected a number in 1..1024"},
      {{"q.json", "--deadline-seconds=nan"}, "--deadline-seconds=nan: expected"},
      {{"q.json", "--deadline-seconds=-1"}, "--deadline-seconds=-1: expected"},
      {{"q.json", "--memo-limit=lots"}, "--memo-limit=lots: expected bytes"},
      {{"q.json", "--speed=3"}, "--speed: unknown flag (see --help)"},
      {{"q.json", "--shap=bushy"}, "--shap: unknown flag; did you mean --shape?"},
      {{"q.json", "--shape"}, "--shape: flags take a value"},
      {{"q.json", "r.json"}, "a second query file \"r.json\""},
      {{}, "QUERY.json: no query file given"},
  };
  for (const auto& [args, part] : cases) {
    auto c = Parse(args);
    ASSERT_FALSE(c.ok()) << part;
    EXPECT_EQ(c.status().code(), absl::StatusCode::kInvalidArgument);
    EXPECT_NE(c.status().message().find(part), std::string::npos) << c.status();
  }
}

TEST(CliConfigTest, ByteCounts) {
  EXPECT_EQ(*ParseBytes("8GiB"), uint64_t{8} << 30);
  EXPECT_EQ(*ParseBytes("3KiB"), uint64_t{3} << 10);
  EXPECT_EQ(*ParseBytes("1000"), 1000u);
  EXPECT_FALSE(ParseBytes("0").ok());
  EXPECT_FALSE(ParseBytes("99999999999999GiB").ok());  // past 2^64
}

}  // namespace
}  // namespace sliceplan::cli
