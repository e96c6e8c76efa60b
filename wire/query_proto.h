// Conversion between the query message of proto/query.proto, its JSON form
// (the query file), the WideQuery every request enters as, and the exact
// engine's Query (the Wide form narrowed by ToExactQuery).
//
// The JSON goes through protobuf's own JSON mapping, so a query file and an
// RPC request are one format by construction. Unknown fields are rejected.
// All functions are thread-safe.
#ifndef SLICEPLAN_WIRE_QUERY_PROTO_H_
#define SLICEPLAN_WIRE_QUERY_PROTO_H_

#include <string>
#include <string_view>

#include "absl/status/statusor.h"
#include "core/model/input_limits.h"
#include "core/model/query.h"
#include "core/model/wide_query.h"
#include "query.pb.h"

namespace sliceplan {

// Validates a query message and resolves predicate names to ids. Sizes are
// checked first, before anything is built: more relations or predicates
// than `limits` allow is RESOURCE_EXHAUSTED with the numbers. Other errors
// (INVALID_ARGUMENT) name the field and its position: a bad or duplicate
// name (reported before any predicate is read), a missing rows or
// selectivity, a predicate naming an unknown or a repeated relation, and
// everything Query::Create checks. Names quoted in messages are cut short.
absl::StatusOr<WideQuery> WideQueryFromProto(const v1::Query& message,
                                             const InputLimits& limits = {});
// The same, then ToExactQuery: more than 64 relations is INVALID_ARGUMENT.
absl::StatusOr<Query> QueryFromProto(const v1::Query& message, const InputLimits& limits = {});

v1::Query QueryToProto(const Query& query);
v1::Query WideQueryToProto(const WideQuery& query);

// Parses the JSON form of v1::Query. A syntax error, an unknown field or a
// value of the wrong type is INVALID_ARGUMENT with protobuf's description of
// where it is.
// Text past limits.max_query_bytes is RESOURCE_EXHAUSTED; text that is not
// UTF-8 is INVALID_ARGUMENT.
absl::StatusOr<WideQuery> ParseWideQueryJson(std::string_view json, const InputLimits& limits = {});
absl::StatusOr<Query> ParseQueryJson(std::string_view json, const InputLimits& limits = {});

// Reads (ReadBoundedFile: regular files only, at most
// limits.max_query_bytes read) and parses a query file. A file that cannot
// be read is NOT_FOUND (or PERMISSION_DENIED), a directory or device
// INVALID_ARGUMENT, a file past the limit RESOURCE_EXHAUSTED, each with the
// path in the message.
absl::StatusOr<WideQuery> ReadWideQueryFile(const std::string& path,
                                            const InputLimits& limits = {});
absl::StatusOr<Query> ReadQueryFile(const std::string& path, const InputLimits& limits = {});

}  // namespace sliceplan

#endif  // SLICEPLAN_WIRE_QUERY_PROTO_H_
