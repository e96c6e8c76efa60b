// Renders the capacity planner's table (core/capacity/capacity_table.h) as text,
// as the JSON of docs/interfaces.md, and as an SVG plot: predicted seconds
// against workers, log-log, the deadline drawn as a line.
#ifndef SLICEPLAN_CLI_CAPACITY_RENDER_H_
#define SLICEPLAN_CLI_CAPACITY_RENDER_H_

#include <string>

#include "core/capacity/capacity_table.h"
#include "core/search_options.h"

namespace sliceplan::cli {

// What was planned, for the headers.
struct CapacityInfo {
  int relations = 0;
  SearchOptions search;
  bool calibrated = false;  // rates measured on this machine, not given
};

std::string RenderCapacityText(const CapacityTable& table, const CapacityInfo& info);
std::string RenderCapacityJson(const CapacityTable& table, const CapacityInfo& info);
std::string CapacitySvg(const CapacityTable& table, const CapacityInfo& info);

}  // namespace sliceplan::cli

#endif  // SLICEPLAN_CLI_CAPACITY_RENDER_H_
