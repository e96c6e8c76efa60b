#include "rpc/serve.h"

#include <signal.h>

#include <chrono>
#include <iostream>
#include <thread>

#include "absl/strings/ascii.h"
#include "absl/strings/str_cat.h"
#include "core/model/user_text.h"
#include "grpcpp/ext/proto_server_reflection_plugin.h"
#include "grpcpp/health_check_service_interface.h"
#include "grpcpp/support/server_interceptor.h"
#include "prometheus/exposer.h"
#include "spdlog/spdlog.h"

namespace sliceplan {

void BlockStopSignals() {
  sigset_t set;
  sigemptyset(&set);
  sigaddset(&set, SIGINT);
  sigaddset(&set, SIGTERM);
  sigaddset(&set, SIGHUP);
  pthread_sigmask(SIG_BLOCK, &set, nullptr);
}

absl::Status ValidateListenAddress(const std::string& address, const char* flag) {
  const size_t colon = address.rfind(':');
  const auto bad = [&](const char* why) {
    return absl::InvalidArgumentError(absl::StrCat(flag, ": \"", ShortName(address), "\" ", why));
  };
  if (colon == std::string::npos || colon == 0) return bad("is not HOST:PORT");
  const std::string port = address.substr(colon + 1);
  if (port.empty() || port.size() > 5) return bad("has no port in 0..65535");
  for (char c : port) {
    if (!absl::ascii_isdigit(static_cast<unsigned char>(c))) return bad("has no port in 0..65535");
  }
  if (std::stoi(port) > 65535) return bad("has a port past 65535");
  return absl::OkStatus();
}

bool IsLoopbackAddress(const std::string& address) {
  std::string host = address.substr(0, address.rfind(':'));
  if (host.size() > 2 && host.front() == '[' && host.back() == ']') {
    host = host.substr(1, host.size() - 2);
  }
  return host == "localhost" || host == "::1" || host.rfind("127.", 0) == 0;
}

absl::Status CheckPlaintextAllowed(const std::string& listen, bool allow_off_host) {
  if (IsLoopbackAddress(listen) || allow_off_host) return absl::OkStatus();
  return absl::FailedPreconditionError(absl::StrCat(
      "--listen: ", ShortName(listen),
      " is reachable from other hosts: serve TLS (--tls-cert, --tls-key), listen on loopback, "
      "or pass --insecure to serve plaintext off-host"));
}

namespace {

// gRPC answers a request it cannot parse (a string field holding invalid
// UTF-8, bytes that are not the message) with INTERNAL and an empty
// message before any handler runs, which blames the server for the
// client's input. Our handlers never send INTERNAL without a message, so
// that exact status is rewritten into what it means.
class UnparsedRequestInterceptor : public grpc::experimental::Interceptor {
 public:
  void Intercept(grpc::experimental::InterceptorBatchMethods* methods) override {
    if (methods->QueryInterceptionHookPoint(
            grpc::experimental::InterceptionHookPoints::PRE_SEND_STATUS)) {
      const grpc::Status s = methods->GetSendStatus();
      if (s.error_code() == grpc::StatusCode::INTERNAL && s.error_message().empty()) {
        methods->ModifySendStatus(grpc::Status(
            grpc::StatusCode::INVALID_ARGUMENT,
            "the request could not be parsed: a string field holds invalid UTF-8, or the "
            "bytes are not the method's message"));
      }
    }
    methods->Proceed();
  }
};

class UnparsedRequestInterceptorFactory
    : public grpc::experimental::ServerInterceptorFactoryInterface {
 public:
  grpc::experimental::Interceptor* CreateServerInterceptor(
      grpc::experimental::ServerRpcInfo*) override {
    return new UnparsedRequestInterceptor;
  }
};

// The health-only plaintext server on `listen` (its port in `port`), or
// null when it cannot be bound.
std::unique_ptr<grpc::Server> StartHealthServer(const std::string& listen, int& port) {
  grpc::ServerBuilder builder;
  builder.AddListeningPort(listen, grpc::InsecureServerCredentials(), &port);
  builder.AddChannelArgument(GRPC_ARG_ALLOW_REUSEPORT, 0);
  builder.SetMaxReceiveMessageSize(4096);  // a health request is a service name
  std::unique_ptr<grpc::Server> server = builder.BuildAndStart();
  return port == 0 ? nullptr : std::move(server);
}

// The metrics endpoint on `listen` (its port in `port`), or null when it
// cannot be bound (civetweb throws then).
std::unique_ptr<prometheus::Exposer> StartMetricsEndpoint(
    const std::string& listen, const std::vector<std::weak_ptr<prometheus::Collectable>>& metrics,
    int& port) {
  std::unique_ptr<prometheus::Exposer> exposer;
  try {
    exposer = std::make_unique<prometheus::Exposer>(listen, 2);
  } catch (const std::exception& e) {
    spdlog::error("metrics: cannot listen on {}: {}", listen, e.what());
    return nullptr;
  }
  const std::vector<int> ports = exposer->GetListeningPorts();
  if (ports.empty() || ports.front() == 0) return nullptr;
  port = ports.front();
  for (const auto& m : metrics) exposer->RegisterCollectable(m);
  return exposer;
}

std::string HostOf(const std::string& address) { return address.substr(0, address.rfind(':')); }

// Checks Serve's addresses before anything starts: INVALID_ARGUMENT for a
// malformed listen, health or metrics address (in that order),
// FAILED_PRECONDITION for plaintext off-host without the options' consent.
absl::Status CheckServeAddresses(const std::string& listen, const ServeOptions& options) {
  if (auto s = ValidateListenAddress(listen); !s.ok()) return s;
  if (!options.health_listen.empty()) {
    if (auto s = ValidateListenAddress(options.health_listen, "--health-listen"); !s.ok()) {
      return s;
    }
  }
  if (!options.metrics_listen.empty()) {
    if (auto s = ValidateListenAddress(options.metrics_listen, "--metrics-listen"); !s.ok()) {
      return s;
    }
  }
  const bool tls = options.credentials != nullptr;
  return CheckPlaintextAllowed(listen, tls || options.allow_plaintext_off_host);
}

// The gRPC server of `services` on `listen` (TLS when the options carry
// credentials), with health checking, reflection, one socket, the request
// size limit and the unparsed-request interceptor. Its bound port is in
// `port` after the call, 0 (or a null server) when it could not be bound.
std::unique_ptr<grpc::Server> StartServiceServer(const std::string& listen,
                                                 const std::vector<grpc::Service*>& services,
                                                 const ServeOptions& options, int& port) {
  const bool tls = options.credentials != nullptr;
  grpc::EnableDefaultHealthCheckService(true);
  grpc::reflection::InitProtoReflectionServerBuilderPlugin();
  grpc::ServerBuilder builder;
  builder.AddListeningPort(listen, tls ? options.credentials : grpc::InsecureServerCredentials(),
                           &port);
  // Without this, gRPC opens one socket per poller with SO_REUSEPORT: with
  // port 0 each gets a different free port, and only the first is
  // announced; with a fixed port another process could share it.
  builder.AddChannelArgument(GRPC_ARG_ALLOW_REUSEPORT, 0);
  const int max_bytes = static_cast<int>(std::min<int64_t>(options.max_request_bytes, INT32_MAX));
  builder.SetMaxReceiveMessageSize(max_bytes);
  builder.SetMaxSendMessageSize(64 << 20);
  if (options.max_threads > 0) {
    grpc::ResourceQuota quota("sliceplan-calls");
    quota.SetMaxThreads(options.max_threads);
    if (options.max_buffer_bytes > 0) quota.Resize(static_cast<size_t>(options.max_buffer_bytes));
    builder.SetResourceQuota(quota);
  }
  for (grpc::Service* s : services) builder.RegisterService(s);
  std::vector<std::unique_ptr<grpc::experimental::ServerInterceptorFactoryInterface>> interceptors;
  interceptors.push_back(std::make_unique<UnparsedRequestInterceptorFactory>());
  builder.experimental().SetInterceptorCreators(std::move(interceptors));
  return builder.BuildAndStart();
}

// The optional health and metrics listeners beside the service server.
// Serve declares it after the server and the members are in this order, so
// they are destroyed metrics first, then health, then the server.
struct SideListeners {
  std::unique_ptr<grpc::Server> health;
  int health_port = 0;
  std::unique_ptr<prometheus::Exposer> metrics;
  int metrics_port = 0;
};

// Starts the health server and the metrics endpoint the options ask for,
// in that order, into `side`. UNAVAILABLE naming the address that cannot
// be bound; a health server already started is shut down then.
absl::Status StartSideListeners(const ServeOptions& options, SideListeners& side) {
  if (!options.health_listen.empty()) {
    side.health = StartHealthServer(options.health_listen, side.health_port);
    if (!side.health) {
      return absl::UnavailableError(absl::StrCat("cannot listen on ", options.health_listen));
    }
  }
  if (!options.metrics_listen.empty()) {
    side.metrics = StartMetricsEndpoint(options.metrics_listen, options.metrics, side.metrics_port);
    if (!side.metrics) {
      if (side.health) side.health->Shutdown();
      return absl::UnavailableError(absl::StrCat("cannot listen on ", options.metrics_listen));
    }
  }
  return absl::OkStatus();
}

// Prints the bound addresses on stdout: "listening on HOST:PORT", then
// "health on ..." and "metrics on ..." for the side listeners that run.
void AnnounceListeners(const std::string& listen, int port, const ServeOptions& options,
                       const SideListeners& side) {
  std::cout << "listening on " << HostOf(listen) << ":" << port << std::endl;
  if (side.health) {
    std::cout << "health on " << HostOf(options.health_listen) << ":" << side.health_port
              << std::endl;
  }
  if (side.metrics) {
    std::cout << "metrics on " << HostOf(options.metrics_listen) << ":" << side.metrics_port
              << std::endl;
  }
}

// Waits for SIGINT or SIGTERM (running on_reload on each SIGHUP meanwhile),
// then runs on_stop and shuts the servers down: `health` (may be null) at
// once, `server` after the grace period.
void ShutDownOnStopSignal(const ServeOptions& options, grpc::Server& server, grpc::Server* health) {
  sigset_t set;
  sigemptyset(&set);
  sigaddset(&set, SIGINT);
  sigaddset(&set, SIGTERM);
  sigaddset(&set, SIGHUP);
  int sig = 0;
  for (sigwait(&set, &sig); sig == SIGHUP; sigwait(&set, &sig)) {
    if (options.on_reload) options.on_reload();
  }
  if (options.on_stop) options.on_stop();
  // Refuses new calls at once; running ones finish (and answer) until
  // the grace period ends, when gRPC cancels them and every search sees
  // the cancel within its polling interval.
  if (health) health->Shutdown(std::chrono::system_clock::now());  // probes fail from now on
  server.Shutdown(std::chrono::system_clock::now() + options.shutdown_grace);
}

}  // namespace

absl::Status Serve(const std::string& listen, const std::vector<grpc::Service*>& services,
                   const ServeOptions& options) {
  if (auto s = CheckServeAddresses(listen, options); !s.ok()) return s;
  int port = 0;
  std::unique_ptr<grpc::Server> server = StartServiceServer(listen, services, options, port);
  if (!server || port == 0) {
    return absl::UnavailableError(absl::StrCat("cannot listen on ", listen));
  }
  SideListeners side;
  if (auto s = StartSideListeners(options, side); !s.ok()) {
    server->Shutdown();
    return s;
  }
  AnnounceListeners(listen, port, options, side);
  std::thread stopper([&] { ShutDownOnStopSignal(options, *server, side.health.get()); });
  server->Wait();
  stopper.join();
  return absl::OkStatus();
}

}  // namespace sliceplan
