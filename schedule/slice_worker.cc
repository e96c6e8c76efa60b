#include "schedule/slice_worker.h"

#include <algorithm>

#include "absl/strings/str_cat.h"

namespace sliceplan {
namespace {

// A call that was answered before it was returned: nothing to cancel.
class AnsweredCall : public SliceCall {
 public:
  void Cancel() override {}
};

}  // namespace

std::chrono::steady_clock::duration AnytimeReserve(double seconds_given, int relations) {
  const double left = std::max(0.0, seconds_given);
  const double reserve = std::min(0.5 * left, std::max(0.1 * left, 0.05) + 1e-5 * relations);
  return std::chrono::duration_cast<std::chrono::steady_clock::duration>(
      std::chrono::duration<double>(reserve));
}

std::unique_ptr<SliceCall> SliceWorker::StartAnytime(const AnytimeTask&, AnytimeDone done) {
  done(absl::UnimplementedError(
      absl::StrCat("worker ", Name(), " does not run parts of the anytime search")));
  return std::make_unique<AnsweredCall>();
}

}  // namespace sliceplan
