// Coordinator overhead over RPC on loopback: for n = 16..20 and P = 4..32,
// the wall time of a sliced run minus the busiest worker's summed solve
// time (what scheduling, RPC and merging add), beside the slowest slice
// (the wall time W dedicated machines with one slice each would see).
// Starts its own workers and coordinator. Not a test; docs/benchmarks.md.
//
//   build/bench/coordinator_overhead_bench WORKER_BIN COORDINATOR_BIN [W]
#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <map>
#include <string>

#include "cli/rpc_client.h"
#include "tests/support/process.h"
#include "tests/support/test_queries.h"

int main(int argc, char** argv) {
  using namespace sliceplan;
  if (argc < 3) {
    std::fprintf(stderr, "usage: %s WORKER_BIN COORDINATOR_BIN [W]\n", argv[0]);
    return 2;
  }
  const int w = argc > 3 ? std::atoi(argv[3]) : 2;
  std::vector<std::unique_ptr<testing::ServerProcess>> workers;
  std::string list;
  for (int i = 0; i < w; ++i) {
    auto p = testing::ServerProcess::Start({argv[1], "--listen=127.0.0.1:0", "--threads=1"});
    if (!p.ok()) return 1;
    list += (list.empty() ? "" : ",") + (*p)->address();
    workers.push_back(*std::move(p));
  }
  auto coordinator = testing::ServerProcess::Start(
      {argv[2], "--listen=127.0.0.1:0", "--workers=" + list, "--hedge_after_seconds=0"});
  if (!coordinator.ok()) return 1;
  std::printf("%2s %3s %9s %12s %12s %11s %9s %14s\n", "n", "P", "wall_s", "busiest_s", "slowest_s",
              "overhead_s", "overhead", "W-machine_s");
  for (int n : {16, 18, 20}) {
    const Query q = testing::MakeQuery(testing::GraphShape::kRandom, n, 1);
    for (uint32_t p : {4u, 8u, 16u, 32u}) {
      cli::RemoteRequest r{(*coordinator)->address(), {}, p, 0, false};
      auto out = cli::OptimizeRemote(r, q, {});
      if (!out.ok()) {
        std::fprintf(stderr, "%s\n", std::string(out.status().message()).c_str());
        return 1;
      }
      std::map<std::string, double> busy;
      double slowest = 0;
      for (size_t i = 0; i < out->result.slices.size(); ++i) {
        const double s = out->result.slices[i].stats.seconds;
        busy[out->slice_workers[i]] += s;
        slowest = std::max(slowest, s);
      }
      double busiest = 0;
      for (const auto& [name, s] : busy) busiest = std::max(busiest, s);
      const double overhead = out->result.wall_seconds - busiest;
      std::printf("%2d %3u %9.3f %12.3f %12.3f %11.4f %8.2f%% %14.3f\n", n, p,
                  out->result.wall_seconds, busiest, slowest, overhead, 100 * overhead / slowest,
                  slowest);
    }
  }
  return 0;
}
