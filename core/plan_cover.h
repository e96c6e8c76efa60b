// The plans a prepared query keeps (docs/templates.md): given each
// candidate plan's cost at every grid point and each point's optimum, the
// fewest plans (greedy set cover of the plan diagram, the idea of reduced
// plan diagrams, Harish, Darera and Haritsa, VLDB 2007) such that at every
// point some kept plan costs at most max_ratio times the optimum.
// Pure functions; thread-safe.
#ifndef SLICEPLAN_CORE_PLAN_COVER_H_
#define SLICEPLAN_CORE_PLAN_COVER_H_

#include <cstddef>
#include <vector>

#include "core/model/plan.h"
#include "core/model/query.h"

namespace sliceplan {

// Fills every node's cardinality from `query` and its C_out; returns the
// root's cost. REQUIRES: the plan's relations are the query's.
double CostPlanOn(Plan& plan, const Query& query);

struct GridCover {
  std::vector<size_t> kept;  // candidate indices, in the order picked
  // For each kept plan, its largest cost over the optimum on the grid.
  std::vector<double> kept_worst;
  // The guarantee: over the points, the least ratio of a kept plan.
  double worst_ratio = 1;
};

// costs[p][x]: candidate p at point x; optimum[x] > 0. Each pick takes the
// candidate that brings the most uncovered points within max_ratio (ties:
// the lower index); a point's own optimum covers it, so it ends.
// REQUIRES: max_ratio >= 1, every point optimal for some candidate.
GridCover CoverGrid(const std::vector<std::vector<double>>& costs,
                    const std::vector<double>& optimum, double max_ratio);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_PLAN_COVER_H_
