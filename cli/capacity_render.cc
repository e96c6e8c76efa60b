#include "cli/capacity_render.h"

#include <algorithm>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "cli/render.h"
#include "cli/svg_chart.h"

namespace sliceplan::cli {
namespace {

std::string Bytes(double b) {
  if (b >= 1024.0 * 1024 * 1024) return absl::StrFormat("%.1f GiB", b / (1024.0 * 1024 * 1024));
  if (b >= 1024.0 * 1024) return absl::StrFormat("%.1f MiB", b / (1024.0 * 1024));
  if (b >= 1024.0) return absl::StrFormat("%.1f KiB", b / 1024.0);
  return absl::StrFormat("%.0f B", b);
}

bool Cluster(const CapacityInfo& info) { return info.search.cost == CostModelKind::kCluster; }

std::string Header(const CapacityTable& t, const CapacityInfo& info) {
  return absl::StrFormat(
      "%s of %d relations, %s plans, cross products %s; deadline %.3g s; %d "
      "thread%s per worker\n",
      Cluster(info) ? "the cluster model's exact Pareto search" : "exact search", info.relations,
      info.search.shape == PlanShape::kBushy ? "bushy" : "left-deep",
      info.search.cross_products ? "allowed" : "not allowed", t.deadline_seconds,
      t.threads_per_worker, t.threads_per_worker == 1 ? "" : "s");
}

std::string Rates(const CapacityTable& t, const CapacityInfo& info) {
  // The cluster model's rows come from its forecast, which the summary
  // states.
  if (Cluster(info)) return "";
  std::string s = absl::StrFormat("rates (%s): %.3g ns per split",
                                  info.calibrated ? "measured on this machine" : "given",
                                  t.rates.dense_split_seconds * 1e9);
  if (!info.search.cross_products) {
    absl::StrAppendFormat(&s, ", %.3g us per connected set%s", t.rates.connected_set_seconds * 1e6,
                          t.estimated ? " (connected sets estimated by sampling)" : "");
  }
  return s + "\n";
}

}  // namespace

std::string RenderCapacityText(const CapacityTable& t, const CapacityInfo& info) {
  std::string out = Header(t, info);
  if (t.rows.empty()) return out + t.summary + "\n";
  out += Rates(t, info);
  absl::StrAppendFormat(&out, "\n  %7s %7s %14s %16s\n", "workers", "slices", "seconds",
                        "memo per worker");
  for (const CapacityRow& r : t.rows) {
    const char* mark = t.enough_workers == r.workers ? "  <- enough" : "";
    absl::StrAppendFormat(&out, "  %7d %7u %14.4g %16s%s%s\n", r.workers, r.slices, r.seconds,
                          Cluster(info) ? "not forecast" : Bytes(r.memo_bytes),
                          r.fits_memo ? "" : "  (past the memo limit)", mark);
  }
  return out + "\n" + t.summary + "\n";
}

std::string RenderCapacityJson(const CapacityTable& t, const CapacityInfo& info) {
  std::string out = "{\n  \"rows\": [";
  for (size_t i = 0; i < t.rows.size(); ++i) {
    const CapacityRow& r = t.rows[i];
    absl::StrAppend(&out, i == 0 ? "\n" : ",\n", "    {\"workers\": ", r.workers,
                    ", \"slices\": ", r.slices, ", \"seconds\": ", JsonNumber(r.seconds),
                    ", \"memo_bytes\": ", Cluster(info) ? "null" : JsonNumber(r.memo_bytes),
                    ", \"fits_memo\": ", r.fits_memo ? "true" : "false", "}");
  }
  const auto optional = [](const std::optional<int>& w) {
    return w ? absl::StrCat(*w) : std::string("null");
  };
  absl::StrAppend(&out, t.rows.empty() ? "],\n" : "\n  ],\n",
                  "  \"enough_workers\": ", optional(t.enough_workers), ",\n",
                  "  \"auto_exact_workers\": ", optional(t.auto_exact_workers), ",\n",
                  "  \"relations\": ", info.relations, ",\n",
                  "  \"cost\": ", Cluster(info) ? "\"cluster\"" : "\"cout\"", ",\n",
                  "  \"deadline_seconds\": ", JsonNumber(t.deadline_seconds), ",\n",
                  "  \"threads_per_worker\": ", t.threads_per_worker, ",\n",
                  "  \"connected_sets_estimated\": ", t.estimated ? "true" : "false", ",\n",
                  "  \"rates\": {\"split_seconds\": ", JsonNumber(t.rates.dense_split_seconds),
                  ", \"connected_set_seconds\": ", JsonNumber(t.rates.connected_set_seconds),
                  ", \"calibrated\": ", info.calibrated ? "true" : "false", "},\n",
                  "  \"summary\": ", JsonString(t.summary), "\n}\n");
  return out;
}

namespace {

constexpr const char* kMeets = "#2ca02c";
constexpr const char* kMisses = "#d62728";

std::string Dot(const char* fill) {
  return absl::StrFormat("<circle r=\"5\" fill=\"%s\" stroke=\"#222\"/>", fill);
}

std::string Plural(int n, const char* one) {
  return absl::StrFormat("%d %s%s", n, one, n == 1 ? "" : "s");
}

// The row from which more workers no longer help: each has a slice
// already, and the time stays flat to the last row; none when the time
// still falls at the last row.
const CapacityRow* FlatFrom(const CapacityTable& t) {
  if (t.rows.size() < 2) return nullptr;
  size_t i = t.rows.size() - 1;
  while (i > 0 && t.rows[i - 1].seconds <= t.rows[i].seconds &&
         t.rows[i - 1].workers >= static_cast<int>(t.rows[i - 1].slices)) {
    --i;
  }
  return i + 1 < t.rows.size() ? &t.rows[i] : nullptr;
}

}  // namespace

std::string CapacitySvg(const CapacityTable& t, const CapacityInfo& info) {
  double lo = t.deadline_seconds, hi = t.deadline_seconds;
  for (const CapacityRow& r : t.rows) lo = std::min(lo, r.seconds), hi = std::max(hi, r.seconds);
  ChartAxis x = MakeChartAxis(1, kCapacityMaxWorkers, true);
  for (const CapacityRow& r : t.rows) x.fixed_ticks.push_back(r.workers);
  ChartAxis y = MakeChartAxis(lo, hi, true);
  y.seconds = true;
  SvgChart chart(absl::StrFormat("Predicted %s time, %d relations, deadline %s",
                                 Cluster(info) ? "cluster Pareto search" : "exact search",
                                 info.relations, HumanSeconds(t.deadline_seconds)),
                 x, "workers (one slice at a time each)", y,
                 Cluster(info) ? "forecast time (work split evenly over the slices)"
                               : "predicted time (slowest slice x rounds)");
  std::string s;
  std::string points;
  for (const CapacityRow& r : t.rows) {
    absl::StrAppendFormat(&points, "%.1f,%.1f ", chart.X(r.workers), chart.Y(r.seconds));
  }
  absl::StrAppendFormat(&s,
                        "<polyline points=\"%s\" fill=\"none\" stroke=\"#1f77b4\" "
                        "stroke-width=\"2\"/>\n",
                        points);
  const double left = SvgChart::kLeft, right = SvgChart::kLeft + chart.PlotWidth();
  const double dy = chart.Y(t.deadline_seconds);
  absl::StrAppendFormat(&s,
                        "<line x1=\"%.0f\" y1=\"%.1f\" x2=\"%.0f\" y2=\"%.1f\" stroke=\"%s\" "
                        "stroke-dasharray=\"6 4\" stroke-width=\"1.5\"/>\n",
                        left, dy, right, dy, kMisses);
  for (const CapacityRow& r : t.rows) {
    const bool meets = r.fits_memo && r.seconds <= t.deadline_seconds;
    absl::StrAppendFormat(&s,
                          "<circle cx=\"%.1f\" cy=\"%.1f\" r=\"5\" fill=\"%s\" stroke=\"#222\">"
                          "<title>%s: %s, %s, %s per worker</title></circle>\n",
                          chart.X(r.workers), chart.Y(r.seconds), meets ? kMeets : kMisses,
                          Plural(r.workers, "worker"), Plural(static_cast<int>(r.slices), "slice"),
                          HumanSeconds(r.seconds),
                          Cluster(info) ? "memo not forecast" : Bytes(r.memo_bytes));
  }
  if (const CapacityRow* flat = FlatFrom(t)) {
    // A dotted line where the slices stop growing, explained above the
    // flat tail right of the line, or (the line near the right edge) below
    // the curve left of it.
    const double fx = chart.X(flat->workers), fy = chart.Y(flat->seconds);
    const bool left_of = fx > left + 0.6 * chart.PlotWidth();
    const double ty = left_of ? std::min(SvgChart::kTop + chart.PlotHeight() - 44, fy + 24)
                              : std::max(SvgChart::kTop + 14, fy - 44);
    const double tx = left_of ? fx - 8 : fx + 8;
    absl::StrAppendFormat(
        &s,
        "<line x1=\"%.1f\" y1=\"%.0f\" x2=\"%.1f\" y2=\"%.0f\" stroke=\"#888\" "
        "stroke-dasharray=\"2 3\"/><text y=\"%.1f\" fill=\"#555\" text-anchor=\"%s\">"
        "<tspan x=\"%.1f\">past %s: no more</tspan><tspan x=\"%.1f\" dy=\"15\">slices (%u at "
        "most), the rest</tspan><tspan x=\"%.1f\" dy=\"15\">idle</tspan></text>\n",
        fx, SvgChart::kTop, fx, SvgChart::kTop + chart.PlotHeight(), ty, left_of ? "end" : "start",
        tx, Plural(flat->workers, "worker"), tx, flat->slices, tx);
  }
  for (const CapacityRow& r : t.rows) {
    if (t.enough_workers != r.workers) continue;
    const double cx = chart.X(r.workers), cy = chart.Y(r.seconds);
    absl::StrAppendFormat(&s,
                          "<circle cx=\"%.1f\" cy=\"%.1f\" r=\"10\" fill=\"none\" stroke=\"%s\" "
                          "stroke-width=\"2.5\"/><text x=\"%.1f\" y=\"%.1f\" fill=\"%s\" "
                          "stroke=\"white\" stroke-width=\"3\" paint-order=\"stroke\" "
                          "font-weight=\"bold\">enough: %s</text>\n",
                          cx, cy, kMeets, cx + 14, cy + 22, kMeets, Plural(r.workers, "worker"));
  }
  if (!t.enough_workers && !t.rows.empty()) {
    absl::StrAppendFormat(&s,
                          "<text x=\"%.0f\" y=\"%.0f\" fill=\"%s\" font-weight=\"bold\" "
                          "text-anchor=\"middle\">no pool of up to %s meets the deadline</text>\n",
                          left + chart.PlotWidth() / 2, SvgChart::kTop + chart.PlotHeight() - 14,
                          kMisses, Plural(t.rows.back().workers, "worker"));
  }
  chart.Append(s);
  chart.Legend(0, Dot(kMeets), "meets the deadline");
  chart.Legend(1, Dot(kMisses), Cluster(info) ? "misses it" : "misses it (time or memo)");
  chart.Legend(2,
               absl::StrFormat("<line x1=\"-9\" x2=\"9\" stroke=\"%s\" stroke-dasharray=\"6 4\" "
                               "stroke-width=\"1.5\"/>",
                               kMisses),
               "deadline " + HumanSeconds(t.deadline_seconds));
  if (t.enough_workers) {
    chart.Legend(3,
                 absl::StrFormat(
                     "<circle r=\"9\" fill=\"none\" stroke=\"%s\" stroke-width=\"2.5\"/>", kMeets),
                 "fewest workers enough");
  }
  return chart.Finish();
}

}  // namespace sliceplan::cli
