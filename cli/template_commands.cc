#include "cli/template_commands.h"

#include <unistd.h>

#include <algorithm>
#include <iostream>
#include <optional>

#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "absl/strings/str_split.h"
#include "cli/cli_config.h"
#include "cli/command_table.h"
#include "cli/output_file.h"
#include "cli/render.h"
#include "cli/rpc_client.h"
#include "core/model/json_text.h"
#include "core/model/status_macros.h"
#include "templates/plan_set.h"
#include "templates/template_prepare.h"
#include "tiers/wide_plan.h"
#include "wire/bounded_file.h"
#include "wire/service_proto.h"

namespace sliceplan::cli {
namespace {

struct PrepareConfig {
  std::string template_path;
  std::string out;
  PrepareOptions options;
  bool workers_given = false;
  RemoteCoordinator coordinator;  // --coordinator: its pool optimizes the grid
  bool json = false;
  bool quiet = false;
};

struct ChooseConfig {
  std::string plans_path;
  std::vector<std::pair<std::string, double>> values;
  bool robust = false;
  bool json = false;
};

absl::Status BadFlag(const std::string& flag, const std::string& value, const std::string& want) {
  return absl::InvalidArgumentError(absl::StrCat("--", flag, "=", value, ": expected ", want));
}

// A whole number in [lo, hi], into `out`.
std::function<absl::Status(const std::string&)> IntIn(const std::string& flag, int lo, int hi,
                                                      int& out) {
  return [flag, lo, hi, &out](const std::string& v) {
    int n = 0;
    if (!absl::SimpleAtoi(v, &n) || n < lo || n > hi) {
      return BadFlag(flag, v, absl::StrCat("a number in ", lo, "..", hi));
    }
    out = n;
    return absl::OkStatus();
  };
}

std::function<absl::Status(const std::string&)> Format(bool& json) {
  return [&json](const std::string& v) {
    if (v != "text" && v != "json") return BadFlag("format", v, "text or json");
    json = v == "json";
    return absl::OkStatus();
  };
}

CommandTable PrepareTable(PrepareConfig& c, int cores) {
  c.options.workers = cores;
  return {"prepare",
          "Optimizes a query template exactly at every point of a log-spaced grid over its "
          "parameters and keeps the fewest plans such that at every point one costs at most "
          "--max-ratio times the optimum.",
          "TEMPLATE.json",
          "template file",
          [&c](const std::string& path) { c.template_path = path; },
          {{"out", "PLANS", "", "the plan set file to write (required)",
            [&c](const std::string& v) {
              if (v.empty()) return BadFlag("out", v, "a file name");
              c.out = v;
              return absl::OkStatus();
            }},
           {"max-ratio", "R", "1.2", "the guarantee: at every grid point a kept plan within R",
            [&c](const std::string& v) {
              double r = 0;
              if (!absl::SimpleAtod(v, &r) || !(r >= 1) || r > 1e6) {
                return BadFlag("max-ratio", v, "a number in [1, 1e6]");
              }
              c.options.max_ratio = r;
              return absl::OkStatus();
            }},
           {"grid", "G", "8", "values per parameter, log-spaced from min to max",
            IntIn("grid", kMinGrid, kMaxGrid, c.options.grid)},
           {"workers", "N", "the cores", "grid points optimized at once (in-process workers)",
            [&c, set = IntIn("workers", 1, 1024, c.options.workers)](const std::string& v) {
              c.workers_given = true;
              return set(v);
            }},
           {"coordinator", "HOST:PORT", "",
            "optimize the grid on this coordinator's pool and store the plans there too "
            "(it prints the template id for ChooseTemplatePlan)",
            [&c](const std::string& v) {
              if (v.empty()) return BadFlag("coordinator", v, "HOST:PORT");
              c.coordinator.address = v;
              return absl::OkStatus();
            }},
           {"format", "text|json", "text", "output", Format(c.json)},
           {"quiet", "", "", "no progress bar on stderr", [&c](const std::string& v) {
              c.quiet = v == "true";
              return absl::OkStatus();
            }}}};
}

CommandTable PrepareCommand(PrepareConfig& c, int cores) {
  CommandTable table = PrepareTable(c, cores);
  for (FlagRow& row : ConnectionRows(c.coordinator.tls, c.coordinator.token_file)) {
    table.flags.push_back(std::move(row));
  }
  return table;
}

CommandTable ChooseTable(ChooseConfig& c) {
  return {"choose",
          "Costs every plan of a plan set at the given parameter values and prints the "
          "cheapest (or, with --robust, the one whose largest ratio on the grid is least).",
          "PLANS",
          "plan set file",
          [&c](const std::string& path) { c.plans_path = path; },
          {{"set", "NAME=VALUE,...", "", "the parameters' values (every parameter, once)",
            [&c](const std::string& v) {
              for (const absl::string_view part : absl::StrSplit(v, ',')) {
                const std::pair<std::string, std::string> kv = absl::StrSplit(part, '=');
                double value = 0;
                if (kv.first.empty() || !absl::SimpleAtod(kv.second, &value)) {
                  return BadFlag("set", v, "NAME=VALUE pairs, comma-separated");
                }
                c.values.emplace_back(kv.first, value);
              }
              return absl::OkStatus();
            }},
           {"robust", "", "", "the plan whose worst ratio on the grid is least",
            [&c](const std::string& v) {
              c.robust = v == "true";
              return absl::OkStatus();
            }},
           {"format", "text|json", "text", "output", Format(c.json)}}};
}

// A one-line progress report on a terminal's stderr, rewritten in place
// at most every 1% of the points (never into a file or a pipe).
void DrawProgress(size_t done, size_t total) {
  static const bool terminal = isatty(STDERR_FILENO) != 0;
  if (!terminal || (done != total && done % std::max<size_t>(1, total / 100) != 0)) return;
  std::cerr << absl::StrFormat("\rprepare: %u of %u grid points optimized", done, total)
            << (done == total ? "\r\033[K" : "") << std::flush;
}

v1::PrepareTemplateRequest PrepareRequestOf(const std::string& template_json,
                                            const PrepareOptions& options) {
  v1::PrepareTemplateRequest request;
  request.set_template_json(template_json);
  request.set_grid(static_cast<uint32_t>(options.grid));
  request.set_max_ratio(options.max_ratio);
  *request.mutable_options() = SearchOptionsToProto(options.search);
  return request;
}

PrepareFigures FiguresOf(const v1::PrepareReport& r) {
  PrepareFigures f;
  f.stored_plans = r.stored_plans();
  f.grid_points = r.grid_points();
  f.grid = static_cast<int>(r.grid());
  f.distinct_optima = r.distinct_optima();
  f.max_ratio = r.max_ratio();
  f.worst_ratio = r.max_ratio_on_grid();
  if (r.has_box_ratio_bound()) f.box_ratio_bound = r.box_ratio_bound();
  f.seconds = r.seconds();
  return f;
}

// docs/interfaces.md's shape, with the bound for the whole box (null for
// none) and, from a coordinator, the template id.
std::string PrepareJson(const PrepareFigures& f, const std::string& template_id) {
  return absl::StrCat(
      "{\"stored_plans\": ", f.stored_plans, ", \"grid_points\": ", f.grid_points,
      ", \"max_ratio_on_grid\": ", JsonNumber(f.worst_ratio),
      ", \"box_ratio_bound\": ", f.box_ratio_bound ? JsonNumber(*f.box_ratio_bound) : "null",
      ", \"seconds\": ", JsonNumber(f.seconds),
      template_id.empty() ? "" : absl::StrCat(", \"template_id\": ", JsonString(template_id)),
      "}\n");
}

std::string PrepareText(const std::string& template_path, const std::string& out,
                        const PrepareFigures& f, const std::string& template_id) {
  std::string text = absl::StrFormat(
      "prepared %s: %u grid points (%d per parameter), %u distinct optim%s, %u plan%s kept\n"
      "  at every grid point a kept plan costs at most %.4g times the optimum (asked: %.4g)\n",
      template_path, f.grid_points, f.grid, f.distinct_optima, f.distinct_optima == 1 ? "um" : "a",
      f.stored_plans, f.stored_plans == 1 ? "" : "s", f.worst_ratio, f.max_ratio);
  if (f.box_ratio_bound) {
    absl::StrAppendFormat(&text,
                          "  anywhere in the parameter box: at most %.4g times the optimum "
                          "(bounded from each grid cell's corners; docs/templates.md)\n",
                          *f.box_ratio_bound);
  } else {
    text += "  no bound for the whole box: an anti join's estimate falls as its input grows\n";
  }
  absl::StrAppendFormat(&text, "  %.2f s\nwrote %s\n", f.seconds, out);
  if (!template_id.empty()) {
    absl::StrAppendFormat(&text, "template id on the coordinator: %s\n", template_id);
  }
  return text;
}

}  // namespace

absl::StatusOr<std::string> RunPrepare(const std::vector<std::string>& args, int cores) {
  PrepareConfig c;
  RETURN_IF_ERROR(ParseCommand(PrepareCommand(c, cores), args));
  if (c.out.empty()) return absl::InvalidArgumentError("--out=PLANS: missing (the file to write)");
  const bool remote = !c.coordinator.address.empty();
  if (remote && c.workers_given) {
    return absl::InvalidArgumentError(
        "--workers and --coordinator: give one (the coordinator's pool sets the workers)");
  }
  if (!remote && (!c.coordinator.tls.ca.empty() || !c.coordinator.tls.cert.empty() ||
                  !c.coordinator.tls.key.empty() || !c.coordinator.token_file.empty())) {
    return absl::InvalidArgumentError(
        "--tls-ca, --tls-cert, --tls-key and --token-file: need --coordinator");
  }
  ASSIGN_OR_RETURN(const std::string text,
                   ReadBoundedFile(c.template_path, InputLimits{}.max_query_bytes, "the template"));
  ASSIGN_OR_RETURN(const QueryTemplate t, QueryTemplate::Parse(text));
  ASSIGN_OR_RETURN(OutputFile out, OutputFile::Prepare(c.out, "--out", {c.template_path}));
  if (!c.quiet) c.options.on_progress = DrawProgress;
  PrepareFigures figures;
  std::string template_id;
  if (remote) {
    ASSIGN_OR_RETURN(
        const v1::PrepareTemplateResult result,
        PrepareRemote(c.coordinator, PrepareRequestOf(text, c.options), c.options.on_progress));
    // Written only once it reads back as a plan set of this template.
    ASSIGN_OR_RETURN(const PlanSet set, ParsePlanSet(result.plan_set_json()));
    if (set.query_template.text() != t.text()) {
      return absl::DataLossError(absl::StrCat("coordinator ", c.coordinator.address,
                                              ": the plan set is for another template"));
    }
    RETURN_IF_ERROR(out.Commit(result.plan_set_json()));
    figures = FiguresOf(result.report());
    template_id = result.template_id();
  } else {
    ASSIGN_OR_RETURN(const PreparedPlans prepared, PrepareTemplate(t, c.options));
    RETURN_IF_ERROR(out.Commit(PlanSetJson(t, prepared)));
    figures = FiguresOf(prepared);
  }
  return c.json ? PrepareJson(figures, template_id)
                : PrepareText(c.template_path, c.out, figures, template_id);
}

absl::StatusOr<std::string> RunChoose(const std::vector<std::string>& args) {
  ChooseConfig c;
  RETURN_IF_ERROR(ParseCommand(ChooseTable(c), args));
  ASSIGN_OR_RETURN(const std::string text,
                   ReadBoundedFile(c.plans_path, InputLimits{}.max_query_bytes, "the plan set"));
  ASSIGN_OR_RETURN(const PlanSet set, ParsePlanSet(text));
  ASSIGN_OR_RETURN(const std::vector<double> values, set.query_template.Values(c.values));
  ASSIGN_OR_RETURN(const Query q, set.query_template.At(values));
  const StoredChoice choice = ChooseStoredPlan(set.prepared, q, c.robust);
  const WideQuery wide = WideQuery::FromExact(q);
  const WidePlan plan = FromExactPlan(choice.plan);
  const std::string tree = WideTreeString(plan, wide);
  if (c.json) {
    return absl::StrCat("{\n  \"plans\": [\n    {\"tree\": ", JsonString(tree),
                        ", \"nodes\": ", PlanNodesJson(plan, wide),
                        ", \"costs\": {\"cout\": ", JsonNumber(plan.cost()),
                        "}, \"cardinality\": ", JsonNumber(plan.root().cardinality),
                        "}\n  ],\n  \"shape\": \"bushy\",\n  \"tier\": \"prepared\",\n"
                        "  \"proven_optimal\": false,\n  \"stored_plans\": ",
                        set.prepared.plans.size(), ",\n  \"chosen_plan\": ", choice.index,
                        ",\n  \"worst_ratio_on_grid\": ",
                        JsonNumber(set.prepared.plan_worst[choice.index]), "\n}\n");
  }
  return absl::StrFormat(
      "stored plan %u of %u%s: cout %.6g at these values\n%s\n\n%s\n", choice.index,
      set.prepared.plans.size(), c.robust ? " (robust)" : " (the cheapest here)", plan.cost(),
      c.robust ? absl::StrFormat("this plan costs at most %.4g times the optimum at every "
                                 "grid point",
                                 set.prepared.plan_worst[choice.index])
               : absl::StrFormat("at every grid point the cheapest stored plan costs at most "
                                 "%.4g times the optimum",
                                 set.prepared.worst_ratio),
      tree);
}

std::string TemplateCommandUsage(const std::string& command) {
  PrepareConfig p;
  ChooseConfig c;
  if (command == "prepare") return CommandHelp(PrepareCommand(p, 1));
  if (command == "choose") return CommandHelp(ChooseTable(c));
  return "";
}

}  // namespace sliceplan::cli
