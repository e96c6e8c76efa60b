#include "core/model/search_tier.h"

namespace sliceplan {

std::string TierName(SearchTier tier) {
  switch (tier) {
    case SearchTier::kAuto:
      return "auto";
    case SearchTier::kExact:
      return "exact";
    case SearchTier::kIdp:
      return "idp";
    case SearchTier::kLinear:
      return "linear";
    case SearchTier::kGreedy:
      return "greedy";
    case SearchTier::kAnytime:
      return "anytime";
  }
  return "auto";
}

std::optional<SearchTier> ParseTier(std::string_view name) {
  for (const SearchTier t : {SearchTier::kAuto, SearchTier::kExact, SearchTier::kIdp,
                             SearchTier::kLinear, SearchTier::kGreedy, SearchTier::kAnytime}) {
    if (TierName(t) == name) return t;
  }
  return std::nullopt;
}

}  // namespace sliceplan
