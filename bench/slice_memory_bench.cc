// Memory of one slice against the unsliced search, as a worker would see
// it: each search runs in a child process, and its resident-set peak above
// the child's own base (VmHWM after the search less VmRSS before it) is
// compared with the formula's share of the memo, (7/8)^k bushy or (3/4)^k
// left-deep (docs/slicing.md). Also prints the search's own memo bytes.
// Not a test: run by hand.
//
//   build/bench/slice_memory_bench [--shape=bushy|left-deep]
//       [--cross-products=true|false] [N P ...]
//   (default: bushy, cross products, 20 8 and 20 64)
#include <sys/wait.h>
#include <unistd.h>

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>
#include <vector>

#include "absl/strings/numbers.h"
#include "core/slice_solver.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

// A field of /proc/self/status in bytes (its value is in kB).
uint64_t StatusBytes(const char* field) {
  FILE* f = std::fopen("/proc/self/status", "r");
  if (f == nullptr) return 0;
  char line[256];
  uint64_t kb = 0;
  const size_t len = std::strlen(field);
  while (std::fgets(line, sizeof line, f) != nullptr) {
    if (std::strncmp(line, field, len) == 0) kb = std::strtoull(line + len + 1, nullptr, 10);
  }
  std::fclose(f);
  return kb * 1024;
}

struct Measure {
  uint64_t rss_bytes = 0;   // peak above the base
  uint64_t memo_bytes = 0;  // as the search reports it
};

// Runs slice 0 of P in a child; the child writes its figures to a pipe.
Measure InChild(const Query& q, const SearchOptions& options, uint32_t p) {
  int fds[2];
  if (pipe(fds) != 0) std::exit(1);
  const pid_t pid = fork();
  if (pid == 0) {
    close(fds[0]);
    const uint64_t base = StatusBytes("VmRSS:");
    SearchControl control;
    auto r = SolveSlice(q, options, {0, p}, control);
    if (!r.ok()) {
      std::fprintf(stderr, "%s\n", std::string(r.status().message()).c_str());
      _exit(1);
    }
    const Measure m{StatusBytes("VmHWM:") - base, r->stats.memo_bytes};
    if (write(fds[1], &m, sizeof m) != sizeof m) _exit(1);
    _exit(0);
  }
  close(fds[1]);
  Measure m;
  if (read(fds[0], &m, sizeof m) != sizeof m) std::exit(1);
  close(fds[0]);
  int status = 0;
  waitpid(pid, &status, 0);
  return m;
}

void Row(int n, uint32_t p, const SearchOptions& options) {
  const Query q = testing::MakeQuery(testing::GraphShape::kRandom, n, 1);
  const Measure whole = InChild(q, options, 1);
  const Measure slice = InChild(q, options, p);
  const int k = std::countr_zero(p);
  const double share = options.shape == PlanShape::kBushy ? 7.0 / 8 : 3.0 / 4;
  const double formula = std::pow(share, k);
  const auto d = [](uint64_t bytes) { return static_cast<double>(bytes); };
  const double rss = d(slice.rss_bytes) / d(whole.rss_bytes);
  const double memo = d(slice.memo_bytes) / d(whole.memo_bytes);
  std::printf("%4d %6u %12.1f %12.1f %8.3f %8.3f %8.3f %8.2f\n", n, p, d(whole.rss_bytes) / 1048576,
              d(slice.rss_bytes) / 1048576, rss, memo, formula, rss / formula);
}

}  // namespace
}  // namespace sliceplan

int main(int argc, char** argv) {
  using namespace sliceplan;
  SearchOptions options{PlanShape::kBushy, true, CostModelKind::kCout};
  std::vector<std::pair<int, uint32_t>> runs;
  std::vector<std::string> rest;
  for (int i = 1; i < argc; ++i) {
    const std::string a = argv[i];
    if (a == "--shape=left-deep") {
      options.shape = PlanShape::kLeftDeep;
    } else if (a == "--cross-products=false") {
      options.cross_products = false;
    } else if (a != "--shape=bushy" && a != "--cross-products=true") {
      rest.push_back(a);
    }
  }
  for (size_t i = 0; i + 1 < rest.size(); i += 2) {
    int n = 0;
    uint32_t p = 0;
    if (!absl::SimpleAtoi(rest[i], &n) || !absl::SimpleAtoi(rest[i + 1], &p) || n < 2 || n > 30 ||
        p == 0 || (p & (p - 1)) != 0) {
      std::fprintf(stderr, "usage: slice_memory_bench [flags] [N P ...]: bad \"%s %s\"\n",
                   rest[i].c_str(), rest[i + 1].c_str());
      return 2;
    }
    runs.emplace_back(n, p);
  }
  if (rest.size() % 2 != 0) {
    std::fprintf(stderr, "usage: slice_memory_bench [flags] [N P ...]: N without P\n");
    return 2;
  }
  if (runs.empty()) runs = {{20, 8}, {20, 64}};
  std::printf("%4s %6s %12s %12s %8s %8s %8s %8s\n", "n", "P", "whole MiB", "slice MiB", "rss",
              "memo", "formula", "rss/form");
  for (const auto& [n, p] : runs) Row(n, p, options);
  return 0;
}
