#include "core/model/input_limits.h"

#include <algorithm>
#include <cmath>

#include "absl/strings/str_cat.h"

namespace sliceplan {

absl::StatusOr<double> AllowedSeconds(double requested, double max_seconds, const char* field) {
  if (std::isnan(requested) || requested < 0) {
    return absl::InvalidArgumentError(
        absl::StrCat(field, ": must be a number >= 0 (0: the server's maximum of ", max_seconds,
                     " s), got ", requested));
  }
  if (requested == 0) return max_seconds;
  return std::min(requested, max_seconds);
}

std::chrono::steady_clock::time_point SteadyAfter(double seconds) {
  using Clock = std::chrono::steady_clock;
  // A century is past any deadline a server allows and far inside the
  // clock's 292-year range of nanoseconds.
  constexpr double kCentury = 100.0 * 365 * 24 * 3600;
  const double s = std::min(seconds, kCentury);
  return Clock::now() +
         std::chrono::duration_cast<Clock::duration>(std::chrono::duration<double>(s));
}

}  // namespace sliceplan
