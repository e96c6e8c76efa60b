// libFuzzer target: the wire conversion of every request and reply
// message (a worker's reply read as a slice's and as an anytime part's,
// the part's then checked as the coordinator checks it). The input's first byte picks the message;
// the rest is parsed as its binary form and converted; any input gives a value or a status.
#include <cstddef>
#include <cstdint>
#include <string>

#include "google/protobuf/stubs/logging.h"
#include "sliceplan.pb.h"
#include "wire/capacity_proto.h"
#include "wire/query_proto.h"
#include "wire/service_proto.h"
#include "wire/tier_proto.h"

namespace {

const sliceplan::Query& FixedQuery() {
  static const sliceplan::Query* q = [] {
    auto parsed = sliceplan::ParseQueryJson(
        R"({"relations": [{"name": "berths", "rows": 120}, {"name": "cranes", "rows": 40},
                          {"name": "moves", "rows": 9000}],
            "predicates": [{"relations": ["berths", "cranes"], "selectivity": 0.05},
                           {"relations": ["cranes", "moves"], "selectivity": 0.001}]})");
    return new sliceplan::Query(*parsed);
  }();
  return *q;
}

const sliceplan::WideQuery& FixedWideQuery() {
  static const sliceplan::WideQuery* q =
      new sliceplan::WideQuery(sliceplan::WideQuery::FromExact(FixedQuery()));
  return *q;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const google::protobuf::LogSilencer quiet;  // invalid UTF-8 is expected here
  if (size == 0) return 0;
  const std::string bytes(reinterpret_cast<const char*>(data) + 1, size - 1);
  using namespace sliceplan;
  switch (data[0] % 6) {
    case 0: {
      v1::OptimizeRequest m;
      if (!m.ParseFromString(bytes)) return 0;
      (void)QueryFromProto(m.query());
      (void)SearchOptionsFromProto(m.options());
      break;
    }
    case 1: {
      v1::SolveSliceResponse m;
      if (!m.ParseFromString(bytes)) return 0;
      for (CostModelKind model : {CostModelKind::kCout, CostModelKind::kCluster}) {
        (void)SliceResultFromProto(m, FixedQuery(), model, {0, 1});
      }
      // As an anytime part's answer: read, then checked as the coordinator does.
      auto answer = AnytimeAnswerFromProto(m, FixedWideQuery());
      if (answer.ok()) {
        SearchOptions options;
        options.cost = CostModelKind::kCluster;
        (void)CheckAnytimeAnswer(FixedWideQuery(), options, *answer);
      }
      break;
    }
    case 2: {
      v1::OptimizeResponse m;
      if (!m.ParseFromString(bytes)) return 0;
      for (CostModelKind model : {CostModelKind::kCout, CostModelKind::kCluster}) {
        (void)OutcomeFromProto(m, FixedQuery(), model);
        (void)TieredFromProto(m, FixedWideQuery(), model);
      }
      break;
    }
    case 3: {
      v1::SearchOptions m;
      if (!m.ParseFromString(bytes)) return 0;
      auto options = SearchOptionsFromProto(m);
      if (options.ok()) (void)SearchOptionsFromProto(SearchOptionsToProto(*options));
      break;
    }
    case 4: {
      v1::CapacityResponse m;
      if (!m.ParseFromString(bytes)) return 0;
      auto table = CapacityFromProto(m);
      if (table.ok()) (void)CapacityFromProto(CapacityToProto(*table));
      break;
    }
    default: {
      v1::Query m;
      if (!m.ParseFromString(bytes)) return 0;
      (void)QueryFromProto(m);
      break;
    }
  }
  return 0;
}
