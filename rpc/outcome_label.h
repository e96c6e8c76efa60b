// The outcome label of a request or slice in the metrics and log lines:
// a few stable words an alert can match, not the status code's name.
#ifndef SLICEPLAN_RPC_OUTCOME_LABEL_H_
#define SLICEPLAN_RPC_OUTCOME_LABEL_H_

#include <string_view>

#include "absl/status/status.h"

namespace sliceplan {

// ok; invalid (the request's own fault: INVALID_ARGUMENT, OUT_OF_RANGE,
// NOT_FOUND, FAILED_PRECONDITION); refused (a limit: RESOURCE_EXHAUSTED);
// deadline; cancelled; unauthenticated; error (anything else: a fault of
// ours or of the pool).
inline std::string_view OutcomeLabel(const absl::Status& status) {
  switch (status.code()) {
    case absl::StatusCode::kOk:
      return "ok";
    case absl::StatusCode::kInvalidArgument:
    case absl::StatusCode::kOutOfRange:
    case absl::StatusCode::kNotFound:
    case absl::StatusCode::kFailedPrecondition:
      return "invalid";
    case absl::StatusCode::kResourceExhausted:
      return "refused";
    case absl::StatusCode::kDeadlineExceeded:
      return "deadline";
    case absl::StatusCode::kCancelled:
      return "cancelled";
    case absl::StatusCode::kUnauthenticated:
    case absl::StatusCode::kPermissionDenied:
      return "unauthenticated";
    default:
      return "error";
  }
}

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_OUTCOME_LABEL_H_
