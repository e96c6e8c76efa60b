// Renders an optimize result as text (plan tree and slice summary), as the
// JSON result of docs/interfaces.md, or as a Graphviz DOT graph of the plan.
#ifndef SLICEPLAN_CLI_RENDER_H_
#define SLICEPLAN_CLI_RENDER_H_

#include <string>

#include "cli/cli_config.h"
#include "core/merge.h"
#include "core/query.h"
#include "schedule/slice_scheduler.h"

namespace sliceplan::cli {

// What the run was, for the headers of the outputs.
struct RunInfo {
  const Query* query = nullptr;
  SearchOptions search;
  int workers = 1;
  bool slices_chosen = false;  // by the planner, not by --slices
};

std::string RenderText(const ScheduleOutcome& outcome, const RunInfo& info);
std::string RenderJson(const ScheduleOutcome& outcome, const RunInfo& info);
std::string RenderDot(const ScheduleOutcome& outcome, const RunInfo& info);

// Summary figures of the slices: the slowest slice and max/mean splits.
struct SliceBalance {
  uint32_t slowest = 0;
  double slowest_seconds = 0;
  double max_over_mean_splits = 1;
};
SliceBalance Balance(const OptimizeResult& result);

// A JSON string literal with the escapes of RFC 8259.
std::string JsonString(const std::string& s);

}  // namespace sliceplan::cli

#endif  // SLICEPLAN_CLI_RENDER_H_
