#include "coordinator/serve.h"

#include <signal.h>

#include <chrono>
#include <iostream>
#include <thread>

#include "absl/strings/str_cat.h"
#include "grpcpp/ext/proto_server_reflection_plugin.h"
#include "grpcpp/health_check_service_interface.h"

namespace sliceplan {

void BlockStopSignals() {
  sigset_t set;
  sigemptyset(&set);
  sigaddset(&set, SIGINT);
  sigaddset(&set, SIGTERM);
  pthread_sigmask(SIG_BLOCK, &set, nullptr);
}

absl::Status Serve(const std::string& listen, const std::vector<grpc::Service*>& services,
                   const std::function<void()>& on_stop) {
  grpc::EnableDefaultHealthCheckService(true);
  grpc::reflection::InitProtoReflectionServerBuilderPlugin();
  grpc::ServerBuilder builder;
  int port = 0;
  builder.AddListeningPort(listen, grpc::InsecureServerCredentials(), &port);
  builder.SetMaxReceiveMessageSize(64 << 20);
  builder.SetMaxSendMessageSize(64 << 20);
  for (grpc::Service* s : services) builder.RegisterService(s);
  std::unique_ptr<grpc::Server> server = builder.BuildAndStart();
  if (!server || port == 0) {
    return absl::UnavailableError(absl::StrCat("cannot listen on ", listen));
  }
  const std::string host = listen.substr(0, listen.rfind(':'));
  std::cout << "listening on " << host << ":" << port << std::endl;

  std::thread stopper([&] {
    sigset_t set;
    sigemptyset(&set);
    sigaddset(&set, SIGINT);
    sigaddset(&set, SIGTERM);
    int sig = 0;
    sigwait(&set, &sig);
    if (on_stop) on_stop();
    server->Shutdown(std::chrono::system_clock::now() + std::chrono::seconds(2));
  });
  server->Wait();
  stopper.join();
  return absl::OkStatus();
}

}  // namespace sliceplan
