// Renders an optimize result as text (plan tree and slice summary), as the
// JSON result of docs/interfaces.md, or as a Graphviz DOT graph of the plan.
#ifndef SLICEPLAN_CLI_RENDER_H_
#define SLICEPLAN_CLI_RENDER_H_

#include <string>

#include "cli/cli_config.h"
#include "core/merge.h"
#include "core/model/json_text.h"
#include "core/model/query.h"
#include "core/model/wide_query.h"
#include "schedule/slice_scheduler.h"
#include "schedule/tiered_search.h"

namespace sliceplan::cli {

// What the run was, for the headers of the outputs.
struct RunInfo {
  const WideQuery* query = nullptr;
  // The same query for the exact engine (n <= 64), else null: the listed
  // estimates' counts need it.
  const Query* exact = nullptr;
  SearchOptions search;
  int workers = 1;
  bool slices_chosen = false;  // by the planner, not by --slices
};

// A plan's `nodes` (docs/interfaces.md): children before parents, the
// root last; a leaf {"relation": NAME, "cardinality": C}, a join {"type":
// "inner", "left": I, "right": J, "cardinality": C}.
std::string PlanNodesJson(const WidePlan& plan, const WideQuery& query);

std::string RenderText(const TieredOutcome& outcome, const RunInfo& info);
std::string RenderJson(const TieredOutcome& outcome, const RunInfo& info);
std::string RenderDot(const TieredOutcome& outcome, const RunInfo& info);

// A cluster plan on one line with what tells frontier neighbours apart:
// each sampled leaf as name@rate, each join as [strategy nodes], e.g.
// "((berths@0.1 [shuffle 4] cranes) [bcast-r 16] moves)".
std::string PhysicalTreeString(const WidePlan& plan, const WideQuery& query);

// Summary figures of the slices: the slowest slice and max/mean splits.
struct SliceBalance {
  uint32_t slowest = 0;
  double slowest_seconds = 0;
  double max_over_mean_splits = 1;
};
SliceBalance Balance(const OptimizeResult& result);

}  // namespace sliceplan::cli

#endif  // SLICEPLAN_CLI_RENDER_H_
