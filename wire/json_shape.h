// A structural check of query JSON before protobuf's JSON parser reads it.
//
// That parser (protobuf 3.21) silently drops what it cannot map: an array
// or a null inside a repeated field ("predicates": [[]], "relations":
// [null, ...]) vanishes, and a key given twice keeps its last value. A
// query that loses a relation or a predicate without a word is worse than
// a refusal, so these shapes are refused here, with the path of the
// offending value. Nesting is limited too (kMaxJsonDepth), so the parser
// never recurses deeply. Syntax errors are left to the parser, which
// reports them. Pure function; thread-safe.
#ifndef SLICEPLAN_WIRE_JSON_SHAPE_H_
#define SLICEPLAN_WIRE_JSON_SHAPE_H_

#include <string_view>

#include "absl/status/status.h"

namespace sliceplan {

inline constexpr int kMaxJsonDepth = 16;

// INVALID_ARGUMENT naming the path (e.g. "predicates[1]: an array inside
// an array"): an array or null directly inside an array, a key repeated in
// one object, nesting past kMaxJsonDepth.
absl::Status CheckJsonShape(std::string_view json);

}  // namespace sliceplan

#endif  // SLICEPLAN_WIRE_JSON_SHAPE_H_
