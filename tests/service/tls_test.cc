// Transport security end to end: certificates from deploy/make-certs (a
// throwaway CA), a worker requiring client certificates, a coordinator
// serving TLS with bearer tokens and presenting its own certificate to the
// worker, and clients with and without each credential.
#include <signal.h>
#include <sys/wait.h>

#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <string>
#include <thread>

#include "cli/rpc_client.h"
#include "grpc/health/v1/health.grpc.pb.h"
#include "grpcpp/grpcpp.h"
#include "gtest/gtest.h"
#include "sliceplan.grpc.pb.h"
#include "tests/support/process.h"
#include "tests/support/servers.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::ServerProcess;

class TlsTest : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    dir_ = new std::string(::testing::TempDir() + "sliceplan-certs");
    const std::string cmd =
        std::string(SLICEPLAN_SOURCE_DIR) + "/deploy/make-certs " + *dir_ + " > /dev/null";
    ASSERT_EQ(std::system(cmd.c_str()), 0) << "deploy/make-certs failed (is openssl installed?)";
  }
  static void TearDownTestSuite() { delete dir_; }

  static std::string File(const char* name) { return *dir_ + "/" + name; }
  static std::vector<std::string> ServerTls() {
    return {"--tls-cert=" + File("server.pem"), "--tls-key=" + File("server.key"),
            "--tls-ca=" + File("ca.pem")};
  }
  static TlsFiles ClientTls() { return {File("client.pem"), File("client.key"), File("ca.pem")}; }

  // A worker requiring client certificates and a coordinator with tokens.
  void StartSecureCluster() {
    workers_.push_back(testing::StartWorker(ServerTls()));
    ASSERT_TRUE(workers_.back());
    std::vector<std::string> flags = ServerTls();
    flags.push_back("--token-file=" + File("tokens"));
    coordinator_ = testing::StartCoordinator(workers_, flags);
    ASSERT_TRUE(coordinator_);
  }

  absl::StatusOr<ScheduleOutcome> Optimize(const TlsFiles& tls, const std::string& token_file) {
    const Query q = testing::MakeQuery(testing::GraphShape::kChain, 8, 1);
    cli::RemoteRequest r{coordinator_->address(), {}, 2, 20, false, tls, token_file};
    return cli::OptimizeRemote(r, q, {});
  }

  static std::string* dir_;
  std::vector<std::unique_ptr<ServerProcess>> workers_;
  std::unique_ptr<ServerProcess> coordinator_;
};

std::string* TlsTest::dir_ = nullptr;

TEST_F(TlsTest, CertificatesAndATokenGetAPlan) {
  StartSecureCluster();
  auto r = Optimize(ClientTls(), File("tokens"));
  ASSERT_TRUE(r.ok()) << r.status();
  EXPECT_TRUE(r->proven_optimal);
  auto pool = cli::ListWorkersRemote(coordinator_->address(), ClientTls(), File("tokens"));
  ASSERT_TRUE(pool.ok()) << pool.status();
  EXPECT_TRUE(pool->workers(0).healthy());  // the coordinator reached the mTLS worker
}

TEST_F(TlsTest, MissingOrWrongTokenIsUnauthenticated) {
  StartSecureCluster();
  EXPECT_EQ(Optimize(ClientTls(), "").status().code(), absl::StatusCode::kUnauthenticated);
  const std::string wrong = File("wrong-tokens");
  std::ofstream(wrong) << "not-the-token\n";
  EXPECT_EQ(Optimize(ClientTls(), wrong).status().code(), absl::StatusCode::kUnauthenticated);
  EXPECT_EQ(cli::ListWorkersRemote(coordinator_->address(), ClientTls(), wrong).status().code(),
            absl::StatusCode::kUnauthenticated);
}

// SIGHUP re-reads the token file: the old token stops working, the new
// one works, and serving never stops.
TEST_F(TlsTest, SighupReReadsTheTokenFile) {
  const std::string tokens = File("rotating-tokens");
  std::ofstream(tokens) << "first-token\n";
  workers_.push_back(testing::StartWorker(ServerTls()));
  ASSERT_TRUE(workers_.back());
  std::vector<std::string> flags = ServerTls();
  flags.push_back("--token-file=" + tokens);
  coordinator_ = testing::StartCoordinator(workers_, flags);
  ASSERT_TRUE(coordinator_);
  ASSERT_TRUE(Optimize(ClientTls(), tokens).ok());
  const std::string old_copy = File("first-token-copy");
  std::ofstream(old_copy) << "first-token\n";
  std::ofstream(tokens, std::ios::trunc) << "# rotated\nsecond-token\n";
  coordinator_->Signal(SIGHUP);
  absl::Status old_status;
  for (int i = 0; i < 50; ++i) {  // the reload is asynchronous: poll for it
    old_status = Optimize(ClientTls(), old_copy).status();
    if (old_status.code() == absl::StatusCode::kUnauthenticated) break;
    std::this_thread::sleep_for(std::chrono::milliseconds(20));
  }
  EXPECT_EQ(old_status.code(), absl::StatusCode::kUnauthenticated);
  EXPECT_TRUE(Optimize(ClientTls(), tokens).ok());
}

// Certificates rotated on disk (a new CA, new server and client
// certificates, swapped in by rename as a secret store does) are picked up
// by the file watcher with no restart: clients of the new CA get a plan
// through both servers, clients of the old one are turned away.
TEST_F(TlsTest, RotatedCertificatesAreUsedWithoutARestart) {
  const std::string root = *dir_ + "/rotation";
  const std::string make = std::string(SLICEPLAN_SOURCE_DIR) + "/deploy/make-certs ";
  ASSERT_EQ(std::system(
                (make + root + "/old > /dev/null && " + make + root + "/new > /dev/null").c_str()),
            0);
  const std::string live = root + "/live/";
  auto install = [&](const std::string& from) {  // copy aside, then rename into place
    const std::string cmd = "mkdir -p " + live + " && for f in server.pem server.key ca.pem; do " +
                            "cp " + root + "/" + from + "/$f " + live + "$f.next && mv " + live +
                            "$f.next " + live + "$f; done";
    ASSERT_EQ(std::system(cmd.c_str()), 0);
  };
  install("old");
  const std::vector<std::string> tls = {"--tls-cert=" + live + "server.pem",
                                        "--tls-key=" + live + "server.key",
                                        "--tls-ca=" + live + "ca.pem", "--tls-reload-seconds=1"};
  workers_.push_back(testing::StartWorker(tls));
  ASSERT_TRUE(workers_.back());
  std::vector<std::string> flags = tls;
  flags.push_back("--token-file=" + File("tokens"));
  coordinator_ = testing::StartCoordinator(workers_, flags);
  ASSERT_TRUE(coordinator_);
  auto client = [&](const char* set) {
    const std::string d = root + "/" + set + "/";
    return TlsFiles{d + "client.pem", d + "client.key", d + "ca.pem"};
  };
  ASSERT_TRUE(Optimize(client("old"), File("tokens")).ok());
  EXPECT_FALSE(Optimize(client("new"), File("tokens")).ok());
  install("new");
  absl::Status fresh;
  for (int i = 0; i < 100; ++i) {  // the watcher looks once a second: poll
    fresh = Optimize(client("new"), File("tokens")).status();
    if (fresh.ok()) break;
    std::this_thread::sleep_for(std::chrono::milliseconds(100));
  }
  EXPECT_TRUE(fresh.ok()) << fresh;
  EXPECT_EQ(Optimize(client("old"), File("tokens")).status().code(),
            absl::StatusCode::kUnavailable);
}

// A probe without TLS (Kubernetes' gRPC probe) reads the health of a TLS
// server on its plaintext health port, which serves nothing else; the
// health port goes with the server.
TEST_F(TlsTest, HealthPortAnswersProbesInPlaintextAndNothingElse) {
  std::vector<std::string> flags = ServerTls();
  flags.push_back("--health-listen=127.0.0.1:0");
  auto worker = testing::StartWorker(flags);
  ASSERT_TRUE(worker);
  auto health_address = worker->WaitForLine("health on ", std::chrono::seconds(5));
  ASSERT_TRUE(health_address.ok()) << health_address.status();
  auto channel = grpc::CreateChannel(*health_address, grpc::InsecureChannelCredentials());
  auto probe = [&] {
    grpc::health::v1::HealthCheckRequest request;
    grpc::health::v1::HealthCheckResponse response;
    grpc::ClientContext context;
    context.set_deadline(std::chrono::system_clock::now() + std::chrono::seconds(2));
    const grpc::Status s =
        grpc::health::v1::Health::NewStub(channel)->Check(&context, request, &response);
    return s.ok() ? response.status() : grpc::health::v1::HealthCheckResponse::UNKNOWN;
  };
  EXPECT_EQ(probe(), grpc::health::v1::HealthCheckResponse::SERVING);
  // The worker's own service is not there.
  v1::DescribeWorkerRequest describe;
  v1::DescribeWorkerResponse described;
  grpc::ClientContext context;
  EXPECT_EQ(v1::SliceWorker::NewStub(channel)
                ->DescribeWorker(&context, describe, &described)
                .error_code(),
            grpc::StatusCode::UNIMPLEMENTED);
  worker->Signal(SIGTERM);
  ASSERT_TRUE(worker->WaitExit(std::chrono::seconds(10)).ok());
  EXPECT_NE(probe(), grpc::health::v1::HealthCheckResponse::SERVING);
}

// A worker found through a name (a headless service's DNS name, here
// localhost) is dialled by IP but checked against the name: certificates
// naming only DNS:localhost work through "localhost:PORT", and the same
// worker given by IP is refused (its certificate has no IP name).
TEST_F(TlsTest, WorkersFoundByNameAreCheckedAgainstTheName) {
  const std::string dir = *dir_ + "/by-name";
  const std::string cmd = "SLICEPLAN_CERT_NAMES=DNS:localhost " +
                          std::string(SLICEPLAN_SOURCE_DIR) + "/deploy/make-certs " + dir +
                          " > /dev/null";
  ASSERT_EQ(std::system(cmd.c_str()), 0);
  const std::vector<std::string> tls = {"--tls-cert=" + dir + "/server.pem",
                                        "--tls-key=" + dir + "/server.key",
                                        "--tls-ca=" + dir + "/ca.pem"};
  workers_.push_back(testing::StartWorker(tls));
  ASSERT_TRUE(workers_.back());
  const std::string port = workers_[0]->address().substr(workers_[0]->address().rfind(':'));
  const TlsFiles client{dir + "/client.pem", dir + "/client.key", dir + "/ca.pem"};
  auto optimize_through = [&](const std::string& worker_entry) {
    auto coordinator = testing::StartCoordinator({}, tls, worker_entry);
    EXPECT_TRUE(coordinator);
    if (!coordinator) return absl::InternalError("no coordinator");
    const std::string name =
        "localhost" + coordinator->address().substr(coordinator->address().rfind(':'));
    cli::RemoteRequest r{name, {}, 2, 20, false, client, ""};
    return cli::OptimizeRemote(r, testing::MakeQuery(testing::GraphShape::kChain, 8, 1), {})
        .status();
  };
  EXPECT_TRUE(optimize_through("localhost" + port).ok());
  EXPECT_EQ(optimize_through("127.0.0.1" + port).code(), absl::StatusCode::kUnavailable);
}

TEST_F(TlsTest, PlaintextClientCannotTalkToATlsServer) {
  StartSecureCluster();
  const auto r = Optimize({}, File("tokens"));
  EXPECT_EQ(r.status().code(), absl::StatusCode::kUnavailable);
  // Said as what most likely happened, not only the library's words.
  EXPECT_NE(r.status().message().find("TLS expected"), std::string::npos) << r.status();
}

TEST_F(TlsTest, WorkerRefusesACoordinatorWithoutACertificate) {
  workers_.push_back(testing::StartWorker(ServerTls()));
  ASSERT_TRUE(workers_.back());
  coordinator_ = testing::StartCoordinator(workers_);  // plaintext toward the worker
  ASSERT_TRUE(coordinator_);
  auto r = Optimize({}, "");
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().code(), absl::StatusCode::kUnavailable) << r.status();
}

TEST_F(TlsTest, TlsListenerMayBeOffHostAndBadFilesAreRefused) {
  std::vector<std::string> flags = ServerTls();
  flags.push_back("--listen=0.0.0.0:0");
  auto w = testing::StartWorker(flags);
  ASSERT_TRUE(w);
  const std::string bin = SLICEPLAN_WORKER_BIN;
  for (const auto& [args, part] : std::vector<std::pair<std::string, std::string>>{
           {" --tls-cert=" + File("server.pem"), "give both"},
           {" --tls-cert=/nonexistent.pem --tls-key=" + File("server.key"),
            "--tls-cert: /nonexistent.pem: No such file or directory"},
           {" --tls-cert=/dev/zero --tls-key=" + File("server.key"),
            "--tls-cert: /dev/zero is not a regular file"},
           {" --tls-cert=" + File("server.pem") + " --tls-key=" + File("client.key"),
            "--tls-cert and --tls-key: the key is not the certificate's private key"},
           {" --tls-cert=" + File("tokens") + " --tls-key=" + File("server.key"), "no PEM block"},
           {" --tls-cert=" + File("server.pem") + " --tls-key=" + File("server.key") +
                " --tls-reload-seconds=-1",
            "--tls-reload-seconds: -1 is outside"},
           {" --health-listen=nowhere", "--health-listen: \"nowhere\" is not HOST:PORT"}}) {
    const testing::CommandResult r = testing::RunCommand(bin + args + " 2>&1");
    EXPECT_EQ(r.exit_status, 2) << args;
    EXPECT_NE(r.output.find(part), std::string::npos) << r.output;
  }
}

}  // namespace
}  // namespace sliceplan
