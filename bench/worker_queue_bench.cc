// A worker's memory under a flood of calls: one worker with one slice at a
// time and its default queue (--max_queued_slices=16), each call held 3 s
// by the test-only hang; 200 concurrent SolveSlice calls of about 2 MB each
// (a 10-relation chain with its predicates repeated to 100,000, within the
// default input limits). Samples the worker's RSS and threads every 50 ms
// and prints: calls accepted and refused (busy), the peak RSS and threads,
// and the RSS once the calls ended and a second later. Not a test; run by
// hand:
//
//   build/bench/worker_queue_bench [WORKER_BIN]
#include <atomic>
#include <chrono>
#include <cstdio>
#include <fstream>
#include <mutex>
#include <string>
#include <thread>
#include <vector>

#include "grpcpp/grpcpp.h"
#include "sliceplan.grpc.pb.h"
#include "tests/support/process.h"
#include "tests/support/test_queries.h"
#include "wire/query_proto.h"

namespace sliceplan {
namespace {

int kCalls = 200;
constexpr int kPredicates = 100000;

int Threads(pid_t pid) {
  std::ifstream in("/proc/" + std::to_string(pid) + "/status");
  std::string line;
  while (std::getline(in, line)) {
    if (line.rfind("Threads:", 0) == 0) return std::stoi(line.substr(8));
  }
  return 0;
}

double MiB(int64_t bytes) { return static_cast<double>(bytes) / (1 << 20); }

}  // namespace
}  // namespace sliceplan

int main(int argc, char** argv) {
  using namespace sliceplan;
  const std::string worker_bin = argc > 1 ? argv[1] : "build/worker/sliceplan-worker";
  if (argc > 2) kCalls = std::atoi(argv[2]);
  auto worker = testing::ServerProcess::Start(
      {worker_bin, "--listen=127.0.0.1:0", "--concurrent-slices=1", "--test_only_hang_seconds=3"});
  if (!worker.ok()) {
    std::fprintf(stderr, "worker: %s\n", std::string(worker.status().message()).c_str());
    return 1;
  }
  v1::SolveSliceRequest r;
  *r.mutable_query() = QueryToProto(testing::MakeQuery(testing::GraphShape::kChain, 10, 1));
  const v1::Query base = r.query();
  while (r.query().predicates_size() < kPredicates) {
    *r.mutable_query()->add_predicates() =
        base.predicates(r.query().predicates_size() % base.predicates_size());
  }
  r.set_slice_count(1);
  const double request_mib = static_cast<double>(r.ByteSizeLong()) / (1 << 20);

  auto channel = grpc::CreateChannel((*worker)->address(), grpc::InsecureChannelCredentials());
  auto stub = v1::SliceWorker::NewStub(channel);
  const int64_t idle_rss = (*worker)->RssBytes();
  std::atomic<int> ok{0}, busy{0}, other{0}, done{0};
  std::mutex first_mu;
  std::string first_refusal;
  std::vector<std::thread> calls;
  for (int i = 0; i < kCalls; ++i) {
    calls.emplace_back([&] {
      grpc::ClientContext context;
      context.set_deadline(std::chrono::system_clock::now() + std::chrono::seconds(60));
      v1::SolveSliceResponse out;
      const grpc::Status s = stub->SolveSlice(&context, r, &out);
      if (s.ok()) {
        ++ok;
      } else if (s.error_code() == grpc::StatusCode::RESOURCE_EXHAUSTED) {
        ++busy;
      } else {
        ++other;
      }
      if (!s.ok()) {
        std::lock_guard<std::mutex> lock(first_mu);
        if (first_refusal.empty()) {
          first_refusal = std::to_string(s.error_code()) + " " + s.error_message();
        }
      }
      ++done;
    });
  }
  int64_t peak_rss = 0;
  int peak_threads = 0;
  while (done < kCalls) {
    peak_rss = std::max(peak_rss, (*worker)->RssBytes());
    peak_threads = std::max(peak_threads, Threads((*worker)->pid()));
    std::this_thread::sleep_for(std::chrono::milliseconds(50));
  }
  for (std::thread& t : calls) t.join();
  const int64_t end_rss = (*worker)->RssBytes();
  std::this_thread::sleep_for(std::chrono::seconds(1));
  const int64_t later_rss = (*worker)->RssBytes();
  std::printf("%d calls of %.2f MiB: %d solved, %d refused busy, %d other\n", kCalls, request_mib,
              ok.load(), busy.load(), other.load());
  if (!first_refusal.empty()) std::printf("first refusal: %s\n", first_refusal.c_str());
  std::printf(
      "worker RSS: idle %.1f MiB, peak %.1f MiB, after the calls %.1f MiB, 1 s later "
      "%.1f MiB; peak threads %d\n",
      MiB(idle_rss), MiB(peak_rss), MiB(end_rss), MiB(later_rss), peak_threads);
}
