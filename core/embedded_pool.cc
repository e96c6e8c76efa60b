#include "core/embedded_pool.h"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <optional>
#include <thread>
#include <vector>

#include "core/status_macros.h"

namespace sliceplan {

absl::StatusOr<OptimizeResult> OptimizeEmbedded(const Query& query,
                                                const SearchOptions& options,
                                                uint32_t slice_count,
                                                int workers) {
  RETURN_IF_ERROR(ValidateSlice({0, slice_count}, query.size(), options.shape));
  const auto start = std::chrono::steady_clock::now();
  std::vector<std::optional<absl::StatusOr<SliceResult>>> answers(slice_count);
  std::atomic<uint32_t> next{0};
  std::atomic<bool> cancel{false};
  const auto work = [&] {
    SearchControl control(&cancel, std::nullopt);
    for (uint32_t i = next++; i < slice_count; i = next++) {
      answers[i] = SolveSlice(query, options, {i, slice_count}, control);
      if (!answers[i]->ok()) cancel = true;
    }
  };
  const int threads = std::max(1, std::min<int>(workers, static_cast<int>(slice_count)));
  std::vector<std::thread> pool;
  for (int t = 1; t < threads; ++t) pool.emplace_back(work);
  work();
  for (std::thread& t : pool) t.join();

  std::vector<SliceResult> results;
  absl::Status first_error;
  for (auto& answer : answers) {
    if (!answer) continue;  // skipped after a cancellation
    if (!answer->ok()) {
      // A slice cancelled because another failed is not the cause.
      if (first_error.ok() || absl::IsCancelled(first_error)) {
        first_error = answer->status();
      }
      continue;
    }
    results.push_back(*std::move(*answer));
  }
  RETURN_IF_ERROR(first_error);
  ASSIGN_OR_RETURN(OptimizeResult merged,
                   MergeSlices(std::move(results), slice_count));
  merged.wall_seconds = std::chrono::duration<double>(
                            std::chrono::steady_clock::now() - start).count();
  return merged;
}

}  // namespace sliceplan
