#include "cli/frontier_plot.h"

#include <algorithm>
#include <cmath>
#include <map>
#include <utility>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "cli/svg_chart.h"

namespace sliceplan::cli {
namespace {

// Completeness 0..1 on a dark-blue to yellow ramp (on a log scale when
// sampling spans decades).
std::string Colour(double t) {
  t = std::clamp(t, 0.0, 1.0);
  const double stops[4][3] = {{68, 1, 84}, {59, 82, 139}, {33, 145, 140}, {253, 231, 37}};
  const double x = t * 3;
  const int i = std::min(2, static_cast<int>(x));
  const double f = x - i;
  const auto mix = [&](int c) {
    return static_cast<int>(stops[i][c] + f * (stops[i + 1][c] - stops[i][c]));
  };
  return absl::StrFormat("#%02x%02x%02x", mix(0), mix(1), mix(2));
}

std::string Fmt(double v) { return absl::StrFormat("%.3g", v); }

// Past this many plans the plot draws one point per kCell x kCell pixels.
constexpr size_t kDrawAll = 400;
constexpr double kCell = 4;

}  // namespace

std::string FrontierSvg(const std::vector<Plan>& frontier, const Query& query,
                        std::optional<size_t> chosen) {
  double lat_lo = 1e300, lat_hi = 0, ns_lo = 1e300, ns_hi = 0, c_lo = 1;
  for (const Plan& p : frontier) {
    const ClusterCosts& m = p.root().metrics;
    lat_lo = std::min(lat_lo, m.latency_s), lat_hi = std::max(lat_hi, m.latency_s);
    ns_lo = std::min(ns_lo, m.node_seconds), ns_hi = std::max(ns_hi, m.node_seconds);
    c_lo = std::min(c_lo, m.completeness);
  }
  const bool c_log = c_lo < 0.05;
  const auto c_norm = [&](double c) {
    if (c_lo >= 1) return 1.0;
    return c_log ? (std::log10(c) - std::log10(c_lo)) / -std::log10(c_lo) : (c - c_lo) / (1 - c_lo);
  };
  const bool thin = frontier.size() > kDrawAll;
  SvgChart chart(
      thin ? absl::StrFormat("Pareto frontier: %d plans (drawn: one per %g-pixel cell)",
                             static_cast<int>(frontier.size()), kCell)
           : absl::StrFormat("Pareto frontier: %d plans", static_cast<int>(frontier.size())),
      MakeChartAxis(lat_lo, lat_hi), "latency (s)", MakeChartAxis(ns_lo, ns_hi),
      "rented node-seconds");
  const auto px = [&](double v) { return chart.X(v); };
  const auto py = [&](double v) { return chart.Y(v); };
  const ChartAxis& x = chart.x_axis();
  // The plans drawn: all of them, or past kDrawAll the most complete of
  // each cell (drawing only; the JSON and the text keep every plan).
  std::vector<size_t> drawn;
  if (!thin) {
    for (size_t i = 0; i < frontier.size(); ++i) drawn.push_back(i);
  } else {
    std::map<std::pair<int, int>, size_t> cells;
    for (size_t i = 0; i < frontier.size(); ++i) {
      const ClusterCosts& m = frontier[i].root().metrics;
      const std::pair<int, int> cell{static_cast<int>(px(m.latency_s) / kCell),
                                     static_cast<int>(py(m.node_seconds) / kCell)};
      auto [it, fresh] = cells.try_emplace(cell, i);
      if (!fresh && m.completeness > frontier[it->second].root().metrics.completeness) {
        it->second = i;
      }
    }
    for (const auto& [cell, i] : cells) drawn.push_back(i);
  }
  const double radius = thin ? 3 : 6;
  std::string s;
  for (size_t i : drawn) {
    const ClusterCosts& m = frontier[i].root().metrics;
    const std::string tip = absl::StrFormat(
        "plan %d: %s&#10;latency %.4g s, node-seconds %.4g, completeness %.4g", static_cast<int>(i),
        SvgEscape(TreeString(frontier[i], query)), m.latency_s, m.node_seconds, m.completeness);
    absl::StrAppendFormat(&s,
                          "<circle cx=\"%.1f\" cy=\"%.1f\" r=\"%g\" fill=\"%s\" stroke=\"#222\" "
                          "stroke-width=\"0.6\"><title>%s</title></circle>\n",
                          px(m.latency_s), py(m.node_seconds), radius,
                          Colour(c_norm(m.completeness)), tip);
  }
  if (chosen && *chosen < frontier.size()) {
    const ClusterCosts& m = frontier[*chosen].root().metrics;
    absl::StrAppendFormat(
        &s,
        "<circle cx=\"%.1f\" cy=\"%.1f\" r=\"11\" fill=\"none\" stroke=\"#d62728\" "
        "stroke-width=\"2.5\"/><text x=\"%.1f\" y=\"%.1f\" fill=\"#d62728\" "
        "stroke=\"white\" stroke-width=\"3\" paint-order=\"stroke\" "
        "font-weight=\"bold\" text-anchor=\"%s\">chosen (plan %d)</text>\n",
        px(m.latency_s), py(m.node_seconds),
        px(m.latency_s) + (x.Norm(m.latency_s) > 0.7 ? -14 : 14), py(m.node_seconds) - 12,
        x.Norm(m.latency_s) > 0.7 ? "end" : "start", static_cast<int>(*chosen));
  }
  // Completeness legend.
  const double lx = SvgChart::kLeft + chart.PlotWidth() + 40, ly = SvgChart::kTop + 20;
  absl::StrAppendFormat(&s, "<text x=\"%.0f\" y=\"%.0f\">completeness</text>\n", lx, ly - 8);
  for (int k = 0; k <= 20; ++k) {
    absl::StrAppendFormat(
        &s, "<rect x=\"%.0f\" y=\"%.1f\" width=\"18\" height=\"%.1f\" fill=\"%s\"/>\n", lx,
        ly + (20 - k) * 10.0, 10.5, Colour(k / 20.0));
  }
  absl::StrAppendFormat(&s, "<text x=\"%.0f\" y=\"%.0f\">1</text>\n", lx + 24, ly + 10);
  absl::StrAppendFormat(&s, "<text x=\"%.0f\" y=\"%.0f\">%s%s</text>\n", lx + 24, ly + 208,
                        Fmt(std::min(c_lo, 1.0)), c_log ? " (log)" : "");
  chart.Append(s);
  return chart.Finish();
}

}  // namespace sliceplan::cli
