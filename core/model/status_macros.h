// Early-return helpers for absl::Status and absl::StatusOr.
//
// The Abseil release on Debian 12 predates its own status macros, so the
// project defines this pair once. Both evaluate their argument exactly once.
#ifndef SLICEPLAN_CORE_MODEL_STATUS_MACROS_H_
#define SLICEPLAN_CORE_MODEL_STATUS_MACROS_H_

#include "absl/status/status.h"
#include "absl/status/statusor.h"

#define SLICEPLAN_CONCAT_INNER_(a, b) a##b
#define SLICEPLAN_CONCAT_(a, b) SLICEPLAN_CONCAT_INNER_(a, b)

// RETURN_IF_ERROR(expr): returns the status of `expr` when it is not OK.
#define RETURN_IF_ERROR(expr)              \
  do {                                     \
    const ::absl::Status status_ = (expr); \
    if (!status_.ok()) return status_;     \
  } while (false)

// ASSIGN_OR_RETURN(lhs, expr): `expr` yields absl::StatusOr<T>; on error its
// status is returned, otherwise its value is moved into `lhs`.
#define ASSIGN_OR_RETURN(lhs, expr) \
  ASSIGN_OR_RETURN_IMPL_(SLICEPLAN_CONCAT_(statusor_, __LINE__), lhs, expr)
#define ASSIGN_OR_RETURN_IMPL_(tmp, lhs, expr) \
  auto tmp = (expr);                           \
  if (!tmp.ok()) return tmp.status();          \
  lhs = std::move(tmp).value()

#endif  // SLICEPLAN_CORE_MODEL_STATUS_MACROS_H_
