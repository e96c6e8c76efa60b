// The frontier as an SVG scatter plot, with no external plotting program:
// latency_s against node_seconds, one point per plan, coloured by
// completeness (the third objective, its scale labelled in the legend),
// log axes when a range spans more than a factor of 20 (common practice),
// the chosen plan ringed and named in the legend with its figures, the
// choice rule's bounds on latency and node-seconds drawn as lines and the
// rule written out, and every point's tooltip (<title>) giving its plan
// tree with its physical choices (cut past 600 characters) and three
// figures. Past 400 plans the
// drawing is thinned, never the data: one smaller point per 4 x 4 pixels
// (the most complete plan there), the title saying so; the chosen plan
// is ringed whether drawn or not.
#ifndef SLICEPLAN_CLI_FRONTIER_PLOT_H_
#define SLICEPLAN_CLI_FRONTIER_PLOT_H_

#include <optional>
#include <string>
#include <vector>

#include "core/cost/plan_choice.h"
#include "core/model/wide_query.h"
#include "tiers/wide_plan.h"

namespace sliceplan::cli {

std::string FrontierSvg(const std::vector<WidePlan>& frontier, const WideQuery& query,
                        std::optional<size_t> chosen, const ChoiceRule& rule = {});

}  // namespace sliceplan::cli

#endif  // SLICEPLAN_CLI_FRONTIER_PLOT_H_
