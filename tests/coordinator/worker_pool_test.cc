// The pool follows its names: workers appear and leave as the resolver's
// answer changes, a worker that stays is the same object (its counters
// kept), a failed lookup keeps the last answer, and a worker found through
// a name is checked against that name under TLS. The resolver is the
// test's own.
#include "coordinator/worker_pool.h"

#include <algorithm>
#include <map>
#include <mutex>
#include <thread>

#include "gtest/gtest.h"

namespace sliceplan {
namespace {

using namespace std::chrono_literals;

class FakeDns {
 public:
  void Set(const std::string& entry, std::optional<std::vector<std::string>> addresses) {
    std::lock_guard<std::mutex> lock(mu_);
    answers_[entry] = std::move(addresses);
  }
  Resolver resolver() {
    return [this](const std::string& entry) -> std::optional<std::vector<std::string>> {
      std::lock_guard<std::mutex> lock(mu_);
      auto it = answers_.find(entry);
      return it == answers_.end() ? std::nullopt : it->second;
    };
  }

 private:
  std::mutex mu_;
  std::map<std::string, std::optional<std::vector<std::string>>> answers_;
};

std::vector<std::string> Names(const WorkerPool& pool) {
  std::vector<std::string> out;
  for (const auto& w : pool.Workers()) out.push_back(w->Name());
  std::sort(out.begin(), out.end());
  return out;
}

// Polls until the pool lists `want` (the refresh runs every 20 ms).
bool Becomes(const WorkerPool& pool, const std::vector<std::string>& want) {
  for (int i = 0; i < 200; ++i) {
    if (Names(pool) == want) return true;
    std::this_thread::sleep_for(10ms);
  }
  return false;
}

TEST(WorkerPoolTest, WorkersJoinAndLeaveAsTheNameChanges) {
  FakeDns dns;
  dns.Set("workers.port.test:7000", std::vector<std::string>{"127.0.0.2:7000", "127.0.0.3:7000"});
  WorkerPool pool({"workers.port.test:7000", "127.0.0.9:7000"}, 20ms, nullptr, dns.resolver());
  // An IP entry the resolver does not know stays as written.
  EXPECT_EQ(Names(pool),
            (std::vector<std::string>{"127.0.0.2:7000", "127.0.0.3:7000", "127.0.0.9:7000"}));
  std::shared_ptr<RpcWorker> stays;
  for (const auto& w : pool.Workers()) {
    if (w->Name() == "127.0.0.3:7000") stays = w;
  }
  ASSERT_TRUE(stays);

  dns.Set("workers.port.test:7000", std::vector<std::string>{"127.0.0.3:7000", "127.0.0.4:7000"});
  EXPECT_TRUE(Becomes(pool, {"127.0.0.3:7000", "127.0.0.4:7000", "127.0.0.9:7000"}))
      << Names(pool).size();
  for (const auto& w : pool.Workers()) {
    if (w->Name() == "127.0.0.3:7000") {
      EXPECT_EQ(w, stays);  // the same worker, not a new one
    }
  }

  // A failed lookup (a DNS outage) keeps the last answer.
  dns.Set("workers.port.test:7000", std::nullopt);
  std::this_thread::sleep_for(100ms);
  EXPECT_EQ(Names(pool),
            (std::vector<std::string>{"127.0.0.3:7000", "127.0.0.4:7000", "127.0.0.9:7000"}));

  // Scaled to zero: only the fixed entry is left.
  dns.Set("workers.port.test:7000", std::vector<std::string>{});
  EXPECT_TRUE(Becomes(pool, {"127.0.0.9:7000"}));
}

TEST(WorkerPoolTest, ANameNeverResolvedIsTriedAsWritten) {
  FakeDns dns;
  WorkerPool pool({"not-yet.port.test:7000"}, 20ms, nullptr, dns.resolver());
  EXPECT_EQ(Names(pool), std::vector<std::string>{"not-yet.port.test:7000"});
  dns.Set("not-yet.port.test:7000", std::vector<std::string>{"127.0.0.5:7000"});
  EXPECT_TRUE(Becomes(pool, {"127.0.0.5:7000"}));
}

TEST(WorkerPoolTest, HostNamesAreWhatCertificatesAreCheckedAgainst) {
  EXPECT_EQ(EntryHostName("workers.sliceplan.svc:7000"), "workers.sliceplan.svc");
  EXPECT_EQ(EntryHostName("localhost:7000"), "localhost");
  EXPECT_EQ(EntryHostName("10.1.2.3:7000"), "");
  EXPECT_EQ(EntryHostName("[::1]:7000"), "");
  EXPECT_EQ(EntryHostName("[fe80::1]:7000"), "");
}

TEST(WorkerPoolTest, TheSystemResolverAnswersLoopbackAndRefusesNonsense) {
  auto local = ResolveEntry("127.0.0.1:7000");
  ASSERT_TRUE(local.has_value());
  EXPECT_EQ(*local, std::vector<std::string>{"127.0.0.1:7000"});
  EXPECT_FALSE(ResolveEntry("no-such-host.invalid:7000").has_value());  // RFC 6761: never resolves
}

}  // namespace
}  // namespace sliceplan
