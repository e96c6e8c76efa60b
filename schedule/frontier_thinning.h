// Thinning an anytime Pareto set to a number of plans, for an answer that
// must fit a size limit (the coordinator's --max_response_bytes): the set
// found is an approximation of the frontier anyway, so sending part of it
// beats refusing it after the whole deadline was spent. The plans kept
// are spread evenly along the set's latency order, the chosen plan always
// among them; the set stays non-dominated. An exact frontier is never
// thinned (it would lose what it proves): its answer is refused instead.
#ifndef SLICEPLAN_SCHEDULE_FRONTIER_THINNING_H_
#define SLICEPLAN_SCHEDULE_FRONTIER_THINNING_H_

#include <cstddef>
#include <vector>

#include "schedule/tiered_search.h"

namespace sliceplan {

// The indices of `keep` of `size` plans, ascending: evenly spread from the
// first to the last, `chosen` (if any, < size) among them. All of them
// when keep >= size. REQUIRES: keep >= 1.
std::vector<size_t> SpreadIndices(size_t size, size_t keep, std::optional<size_t> chosen);

// Keeps those plans of outcome.frontier (outcome.chosen renumbered) and
// says so in outcome.reason, naming `why`. REQUIRES: outcome.tier is
// anytime; keep >= 1.
void ThinFrontier(TieredOutcome& outcome, size_t keep, const std::string& why);

}  // namespace sliceplan

#endif  // SLICEPLAN_SCHEDULE_FRONTIER_THINNING_H_
