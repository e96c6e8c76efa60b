// libFuzzer target: a worker's handling of a fuzzed SolveSlice request, as
// worker/worker_service.cc does it (the query, the options and their
// limits, the slice, then the search; or an anytime part's fields, then a
// few moves of the part), with a tiny time budget so that a
// valid but large request ends quickly. Any input: an answer or a status.
#include <chrono>
#include <cstddef>
#include <cstdint>
#include <string>

#include "core/slice_solver.h"
#include "google/protobuf/stubs/logging.h"
#include "sliceplan.pb.h"
#include "tiers/join_forest.h"
#include "wire/query_proto.h"
#include "wire/service_proto.h"
#include "wire/tier_proto.h"

namespace {

// An anytime part's request, checked as the worker checks it
// (WorkerService::ParseAnytime), then a few moves of the part.
int AnytimePart(const sliceplan::v1::SolveSliceRequest& request) {
  using namespace sliceplan;
  auto query = WideQueryFromProto(request.query());
  if (!query.ok() || query->size() < 2 || !query->joins().empty()) return 0;
  auto options = SearchOptionsFromProto(request.options());
  if (!options.ok() || !CheckOptionLimits(*options, InputLimits{}).ok()) return 0;
  if (options->cost != CostModelKind::kCluster || !AnytimePartFromProto(request).ok()) return 0;
  if (!options->cross_products && !IsConnected(*query)) return 0;
  SearchControl control(nullptr, std::chrono::steady_clock::now() + std::chrono::milliseconds(20));
  const AnytimeAnswer answer =
      RunAnytimePart(*query, *options, *AnytimePartFromProto(request), control, {}, 5);
  (void)AnytimeAnswerToProto(answer);
  return 0;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const google::protobuf::LogSilencer quiet;  // invalid UTF-8 is expected here
  using namespace sliceplan;
  v1::SolveSliceRequest request;
  if (!request.ParseFromArray(data, static_cast<int>(size))) return 0;
  if (request.has_anytime()) return AnytimePart(request);
  auto query = QueryFromProto(request.query());
  if (!query.ok()) return 0;
  auto options = SearchOptionsFromProto(request.options());
  if (!options.ok() || !CheckOptionLimits(*options, InputLimits{}).ok()) return 0;
  options->memo_limit_bytes = std::min<uint64_t>(options->memo_limit_bytes, 64 << 20);
  const SliceSpec slice{request.slice_index(), request.slice_count()};
  if (!ValidateSlice(slice, query->size(), options->shape, kRpcSliceFields).ok()) return 0;
  SearchControl control(nullptr, std::chrono::steady_clock::now() + std::chrono::milliseconds(20));
  auto result = SolveSlice(*query, *options, slice, control);
  if (result.ok()) (void)SliceResultToProto(*result, options->cost);
  return 0;
}
