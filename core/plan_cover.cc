#include "core/plan_cover.h"

#include <algorithm>

#include "core/cost/cout_model.h"
#include "core/model/cardinality.h"

namespace sliceplan {

double CostPlanOn(Plan& plan, const Query& query) {
  const Cardinality card(query);
  for (PlanNode& node : plan.nodes) node.cardinality = card.Of(node.relations);
  return CostWithCout(plan);
}

GridCover CoverGrid(const std::vector<std::vector<double>>& costs,
                    const std::vector<double>& optimum, double max_ratio) {
  const size_t points = optimum.size();
  std::vector<bool> covered(points, false);
  size_t left = points;
  GridCover out;
  while (left > 0) {
    size_t best = 0, best_gain = 0;
    for (size_t p = 0; p < costs.size(); ++p) {
      size_t gain = 0;
      for (size_t x = 0; x < points; ++x) {
        gain += !covered[x] && costs[p][x] <= max_ratio * optimum[x];
      }
      if (gain > best_gain) best = p, best_gain = gain;
    }
    if (best_gain == 0) break;  // cannot happen when every point has its optimum
    out.kept.push_back(best);
    for (size_t x = 0; x < points; ++x) {
      if (!covered[x] && costs[best][x] <= max_ratio * optimum[x]) covered[x] = true, --left;
    }
  }
  out.worst_ratio = 1;
  for (size_t x = 0; x < points; ++x) {
    double least = costs[out.kept[0]][x] / optimum[x];
    for (size_t p : out.kept) least = std::min(least, costs[p][x] / optimum[x]);
    out.worst_ratio = std::max(out.worst_ratio, least);
  }
  for (size_t p : out.kept) {
    double worst = 1;
    for (size_t x = 0; x < points; ++x) worst = std::max(worst, costs[p][x] / optimum[x]);
    out.kept_worst.push_back(worst);
  }
  return out;
}

}  // namespace sliceplan
