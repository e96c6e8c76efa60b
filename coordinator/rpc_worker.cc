#include "coordinator/rpc_worker.h"

#include "absl/strings/str_cat.h"
#include "rpc/request_id.h"
#include "rpc/rpc_status.h"
#include "schedule/slice_scheduler.h"
#include "spdlog/spdlog.h"
#include "wire/query_proto.h"
#include "wire/service_proto.h"
#include "wire/tier_proto.h"

namespace sliceplan {
namespace {

std::chrono::system_clock::time_point ToSystem(std::chrono::steady_clock::time_point t) {
  return std::chrono::system_clock::now() +
         std::chrono::duration_cast<std::chrono::system_clock::duration>(
             t - std::chrono::steady_clock::now());
}

// What gRPC says when a server's resource quota has no thread for a call.
constexpr char kThreadsExhausted[] = "Server Threadpool Exhausted";

// A failed call's status: busy when the worker refused it for lack of
// room (its own refusal, marked, or its server out of the threads its
// queue allows: gRPC's own words, rpc/serve.h), else as it came.
absl::Status CallStatus(const grpc::Status& s, const grpc::ClientContext& context) {
  if (s.error_code() == grpc::StatusCode::RESOURCE_EXHAUSTED &&
      (context.GetServerTrailingMetadata().count(kBusyKey) != 0 ||
       s.error_message() == kThreadsExhausted)) {
    return BusyError(s.error_message());
  }
  return FromGrpc(s);
}

// A reply that does not read is the worker's fault, not the request's.
absl::Status BadAnswer(const absl::Status& read) {
  return absl::InternalError(absl::StrCat("worker sent a bad answer: ", read.message()));
}

// One asynchronous SolveSlice call (a slice or an anytime part):
// `finish` reads the reply (or the failure) and answers the caller; it
// runs once, on a gRPC thread.
class RpcCall : public SliceCall {
 public:
  using Finish = std::function<void(const grpc::Status&, const v1::SolveSliceResponse&,
                                    const grpc::ClientContext&)>;

  RpcCall(v1::SliceWorker::Stub* stub, v1::SolveSliceRequest request,
          std::optional<std::chrono::steady_clock::time_point> deadline,
          const std::string& request_id, Finish finish)
      : request_(std::move(request)), finish_(std::move(finish)) {
    if (deadline) context_.set_deadline(ToSystem(*deadline));
    if (!request_id.empty()) context_.AddMetadata(kRequestIdKey, request_id);
    stub->async()->SolveSlice(&context_, &request_, &response_,
                              [this](grpc::Status s) { OnDone(s); });
  }

  ~RpcCall() override {
    absl::MutexLock lock(&mu_);
    mu_.Await(absl::Condition(&finished_));
  }

  void Cancel() override { context_.TryCancel(); }

 private:
  void OnDone(const grpc::Status& s) {
    finish_(s, response_, context_);
    absl::MutexLock lock(&mu_);
    finished_ = true;
  }

  grpc::ClientContext context_;
  v1::SolveSliceRequest request_;
  v1::SolveSliceResponse response_;
  Finish finish_;
  absl::Mutex mu_;
  bool finished_ ABSL_GUARDED_BY(mu_) = false;
};

v1::SolveSliceRequest SliceRequest(const SliceTask& task) {
  v1::SolveSliceRequest m;
  m.mutable_query()->CopyFrom(QueryToProto(*task.query));
  *m.mutable_options() = SearchOptionsToProto(task.options);
  m.set_slice_index(task.slice.index);
  m.set_slice_count(task.slice.count);
  return m;
}

}  // namespace

RpcWorker::RpcWorker(std::string address, std::shared_ptr<grpc::ChannelCredentials> credentials,
                     const std::string& tls_name)
    : address_(std::move(address)) {
  grpc::ChannelArguments args;
  args.SetMaxReceiveMessageSize(64 << 20);
  args.SetMaxSendMessageSize(64 << 20);
  // Reconnect quickly after a worker restarts.
  args.SetInt(GRPC_ARG_INITIAL_RECONNECT_BACKOFF_MS, 100);
  args.SetInt(GRPC_ARG_MAX_RECONNECT_BACKOFF_MS, 1000);
  // Workers are dialled by IP: TLS verifies the certificate's IP names,
  // or the DNS name they were found through.
  if (credentials && !tls_name.empty()) args.SetSslTargetNameOverride(tls_name);
  channel_ = grpc::CreateCustomChannel(
      address_, credentials ? credentials : grpc::InsecureChannelCredentials(), args);
  stub_ = v1::SliceWorker::NewStub(channel_);
  health_ = grpc::health::v1::Health::NewStub(channel_);
}

std::unique_ptr<SliceCall> RpcWorker::Start(const SliceTask& task, SliceDone done) {
  return std::make_unique<RpcCall>(
      stub_.get(), SliceRequest(task), task.deadline, task.request_id,
      [this, task, done = std::move(done)](const grpc::Status& s,
                                           const v1::SolveSliceResponse& response,
                                           const grpc::ClientContext& context) {
        absl::StatusOr<SliceResult> result =
            s.ok() ? SliceResultFromProto(response, *task.query, task.options.cost, task.slice)
                   : absl::StatusOr<SliceResult>(CallStatus(s, context));
        if (s.ok() && !result.ok()) result = BadAnswer(result.status());
        Count(result.status());
        done(std::move(result));
      });
}

std::unique_ptr<SliceCall> RpcWorker::StartAnytime(const AnytimeTask& task, AnytimeDone done) {
  return std::make_unique<RpcCall>(
      stub_.get(), AnytimeTaskToProto(task), task.deadline, task.request_id,
      [this, query = task.query, options = task.options, done = std::move(done)](
          const grpc::Status& s, const v1::SolveSliceResponse& response,
          const grpc::ClientContext& context) {
        absl::StatusOr<AnytimeAnswer> answer =
            s.ok() ? AnytimeAnswerFromProto(response, *query)
                   : absl::StatusOr<AnytimeAnswer>(CallStatus(s, context));
        if (s.ok() && !answer.ok()) answer = BadAnswer(answer.status());
        // Checked here, so a made-up figure counts against this worker.
        if (answer.ok()) {
          if (auto bad = CheckAnytimeAnswer(*query, options, *answer); !bad.ok()) {
            answer = absl::DataLossError(absl::StrCat("bad answer: ", bad.message()));
          } else {
            answer->checked = true;
          }
        }
        Count(answer.status());
        done(std::move(answer));
      });
}

void RpcWorker::NoteLostToHedge() {
  absl::MutexLock lock(&mu_);
  if (++hedge_losses_ < kDemoteAfterHedgeLosses || demoted_.load()) return;
  demoted_ = true;
  healthy_ = false;
  counters_.last_error = absl::StrCat("demoted: ", hedge_losses_,
                                      " slices in a row answered by a hedge elsewhere while "
                                      "its calls did not answer");
  spdlog::warn("coordinator: worker {} {}", address_, counters_.last_error);
}

bool RpcWorker::ProbeAnswers(std::chrono::milliseconds timeout) {
  v1::SolveSliceRequest probe;
  for (const char* name : {"probe_a", "probe_b"}) {
    v1::Relation* r = probe.mutable_query()->add_relations();
    r->set_name(name);
    r->set_rows(10);
  }
  probe.set_slice_count(1);
  grpc::ClientContext context;
  context.set_deadline(std::chrono::system_clock::now() + timeout);
  v1::SolveSliceResponse response;
  return stub_->SolveSlice(&context, probe, &response).ok();
}

void RpcWorker::Count(const absl::Status& status) {
  absl::MutexLock lock(&mu_);
  if (status.ok()) {
    hedge_losses_ = 0;
    ++counters_.solved;
  } else if (IsWorkerFault(status)) {  // not the request's own errors
    ++counters_.failures;
    counters_.last_error = std::string(status.message());
    // A lost worker is out of the pool until a health check finds it back.
    if (status.code() == absl::StatusCode::kUnavailable) healthy_ = false;
  }
}

void RpcWorker::CheckHealth(std::chrono::milliseconds timeout) {
  grpc::ClientContext context;
  context.set_deadline(std::chrono::system_clock::now() + timeout);
  grpc::health::v1::HealthCheckRequest request;
  grpc::health::v1::HealthCheckResponse response;
  const grpc::Status s = health_->Check(&context, request, &response);
  const bool serving =
      s.ok() && response.status() == grpc::health::v1::HealthCheckResponse::SERVING;
  const bool probed = serving && demoted_.load() && ProbeAnswers(timeout);
  {
    // Under the lock NoteLostToHedge takes: a demotion between the probe
    // and here is not overwritten.
    absl::MutexLock lock(&mu_);
    if (probed && demoted_.load()) {
      demoted_ = false;
      hedge_losses_ = 0;
      spdlog::info("coordinator: worker {} re-admitted: it answered a probe slice", address_);
    }
    healthy_ = serving && !demoted_.load();
  }
  if (!serving) {
    absl::MutexLock lock(&mu_);
    counters_.last_error = s.ok() ? "not serving" : s.error_message();
    return;
  }
  grpc::ClientContext describe_context;
  describe_context.set_deadline(std::chrono::system_clock::now() + timeout);
  v1::DescribeWorkerResponse info;
  if (stub_->DescribeWorker(&describe_context, v1::DescribeWorkerRequest(), &info).ok()) {
    concurrent_slices_ = std::max(1, static_cast<int>(info.concurrent_slices()));
    threads_per_slice_ = std::max(1, static_cast<int>(info.threads_per_slice()));
  }
}

WorkerCounters RpcWorker::counters() const {
  absl::MutexLock lock(&mu_);
  return counters_;
}

}  // namespace sliceplan
