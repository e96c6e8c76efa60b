#include "schedule/frontier_thinning.h"

#include <algorithm>

#include "absl/strings/str_format.h"

namespace sliceplan {

std::vector<size_t> SpreadIndices(size_t size, size_t keep, std::optional<size_t> chosen) {
  std::vector<size_t> out;
  if (keep >= size) {
    for (size_t i = 0; i < size; ++i) out.push_back(i);
    return out;
  }
  // keep - 1 evenly spaced (the chosen plan takes the last place), or
  // keep of them when nothing is chosen.
  const bool reserve = chosen.has_value() && *chosen < size;
  const size_t spread = reserve ? keep - 1 : keep;
  for (size_t k = 0; k < spread; ++k) {
    out.push_back(spread == 1 ? 0 : k * (size - 1) / (spread - 1));
  }
  if (reserve) out.push_back(*chosen);
  std::sort(out.begin(), out.end());
  out.erase(std::unique(out.begin(), out.end()), out.end());
  return out;
}

void ThinFrontier(TieredOutcome& outcome, size_t keep, const std::string& why) {
  const size_t before = outcome.frontier.size();
  const std::vector<size_t> kept = SpreadIndices(before, keep, outcome.chosen);
  if (kept.size() == before) return;
  std::vector<WidePlan> plans;
  std::optional<size_t> chosen;
  for (size_t i : kept) {
    if (outcome.chosen == i) chosen = plans.size();
    plans.push_back(std::move(outcome.frontier[i]));
  }
  outcome.frontier = std::move(plans);
  outcome.chosen = chosen;
  absl::StrAppendFormat(&outcome.reason,
                        "; %d of the %d plans are returned (%s), spread evenly along latency, the "
                        "chosen plan among them",
                        outcome.frontier.size(), before, why);
}

}  // namespace sliceplan
