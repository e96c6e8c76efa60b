// A plan node's join type on the wire (v1::JoinKind) and back.
#ifndef SLICEPLAN_WIRE_JOIN_KIND_H_
#define SLICEPLAN_WIRE_JOIN_KIND_H_

#include <string>

#include "absl/status/statusor.h"
#include "absl/strings/str_cat.h"
#include "core/model/join_ops.h"
#include "sliceplan.pb.h"

namespace sliceplan {

static_assert(static_cast<int>(JoinType::kInner) == v1::JOIN_KIND_INNER &&
              static_cast<int>(JoinType::kLeft) == v1::JOIN_KIND_LEFT &&
              static_cast<int>(JoinType::kFull) == v1::JOIN_KIND_FULL &&
              static_cast<int>(JoinType::kSemi) == v1::JOIN_KIND_SEMI &&
              static_cast<int>(JoinType::kAnti) == v1::JOIN_KIND_ANTI);

// The type of a join node; INVALID_ARGUMENT at `at` for a kind this build
// does not know.
inline absl::StatusOr<JoinType> JoinTypeFromProto(const v1::Join& join, const std::string& at) {
  const int kind = static_cast<int>(join.kind());
  if (kind < 0 || kind > static_cast<int>(JoinType::kAnti)) {
    return absl::InvalidArgumentError(absl::StrCat(at, ".join.kind: unknown join kind ", kind));
  }
  return static_cast<JoinType>(kind);
}

}  // namespace sliceplan

#endif  // SLICEPLAN_WIRE_JOIN_KIND_H_
