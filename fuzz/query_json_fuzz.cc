// libFuzzer target: the query JSON reader and validator. Any input must
// give a Query or a status, never a crash, a hang or a leak.
#include <cstddef>
#include <cstdint>
#include <string_view>

#include "wire/query_proto.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  auto query = sliceplan::ParseQueryJson(text);
  if (query.ok()) {
    // A query that parsed converts back and parses again to the same size.
    auto again = sliceplan::QueryFromProto(sliceplan::QueryToProto(*query));
    if (!again.ok() || again->size() != query->size()) __builtin_trap();
  }
  return 0;
}
