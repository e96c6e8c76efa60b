// The search tiers a request may ask for (docs/tiers.md). `auto` picks
// one per request; the others force it. Plain values.
#ifndef SLICEPLAN_CORE_MODEL_SEARCH_TIER_H_
#define SLICEPLAN_CORE_MODEL_SEARCH_TIER_H_

#include <optional>
#include <string>
#include <string_view>

namespace sliceplan {

// kAnytime: the cluster model's anytime frontier search (docs/tiers.md).
enum class SearchTier { kAuto, kExact, kIdp, kLinear, kGreedy, kAnytime };

// "auto", "exact", "idp", "linear", "greedy", "anytime".
std::string TierName(SearchTier tier);
// The inverse of TierName; none for anything else.
std::optional<SearchTier> ParseTier(std::string_view name);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MODEL_SEARCH_TIER_H_
