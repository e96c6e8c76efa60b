// libFuzzer target: a worker's handling of a fuzzed SolveSlice request, as
// worker/worker_service.cc does it (the query, the options and their
// limits, the slice, then the search), with a tiny time budget so that a
// valid but large request ends quickly. Any input: an answer or a status.
#include <chrono>
#include <cstddef>
#include <cstdint>
#include <string>

#include "core/slice_solver.h"
#include "google/protobuf/stubs/logging.h"
#include "sliceplan.pb.h"
#include "wire/query_proto.h"
#include "wire/service_proto.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const google::protobuf::LogSilencer quiet;  // invalid UTF-8 is expected here
  using namespace sliceplan;
  v1::SolveSliceRequest request;
  if (!request.ParseFromArray(data, static_cast<int>(size))) return 0;
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
