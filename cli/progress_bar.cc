#include "cli/progress_bar.h"

#include <unistd.h>

#include <cstdio>
#include <string>

namespace sliceplan::cli {

ProgressBar::ProgressBar(bool enabled) : enabled_(enabled && isatty(STDERR_FILENO) == 1) {}

ProgressBar::~ProgressBar() {
  absl::MutexLock lock(&mu_);
  if (drawn_) std::fprintf(stderr, "\r\033[K");
}

void ProgressBar::Update(const ScheduleProgress& p) {
  if (!enabled_ || p.elapsed_seconds < 1.0) return;
  absl::MutexLock lock(&mu_);
  if (p.frontier_plans) {  // the anytime search: no slices, a growing set
    std::fprintf(stderr, "\r\033[Kanytime search: %llu plans in the set, %llu trees, %.0f s",
                 static_cast<unsigned long long>(*p.frontier_plans),
                 static_cast<unsigned long long>(p.trees), p.elapsed_seconds);
    std::fflush(stderr);
    drawn_ = true;
    return;
  }
  if (p.slice_count == 0) return;
  constexpr int kWidth = 30;
  const double done = static_cast<double>(p.slices_done) / p.slice_count;
  const int filled = static_cast<int>(done * kWidth);
  const std::string bar = std::string(filled, '#') + std::string(kWidth - filled, '.');
  const double eta = p.slices_done > 0 ? p.elapsed_seconds * (1 - done) / done : 0;
  std::fprintf(stderr, "\r\033[K[%s] %u/%u slices, best %.4g, ETA %.0f s", bar.c_str(),
               p.slices_done, p.slice_count, p.best_cost.value_or(0.0), eta);
  std::fflush(stderr);
  drawn_ = true;
}

}  // namespace sliceplan::cli
