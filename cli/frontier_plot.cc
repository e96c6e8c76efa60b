#include "cli/frontier_plot.h"

#include <algorithm>
#include <cmath>
#include <map>
#include <utility>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "cli/render.h"
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

namespace {

// The rule in words: "prefer latency_s", or the weights; then each bound.
std::string RuleText(const ChoiceRule& rule) {
  const Preference& p = rule.prefer;
  std::string out;
  const int ones = (p.latency == 1) + (p.node_seconds == 1) + (p.incompleteness == 1);
  const int zeros = (p.latency == 0) + (p.node_seconds == 0) + (p.incompleteness == 0);
  if (ones == 1 && zeros == 2) {
    out = p.latency == 1        ? "least latency_s"
          : p.node_seconds == 1 ? "least node_seconds"
                                : "most completeness";
  } else {
    out = absl::StrFormat("least %g latency_s + %g node_seconds + %g (1 - completeness)", p.latency,
                          p.node_seconds, p.incompleteness);
  }
  return out;
}

// A tooltip's tree: whole up to kTipChars characters, else cut there
// (a plan of hundreds of relations would make the file megabytes).
constexpr size_t kTipChars = 600;
std::string TipTree(const WidePlan& plan, const WideQuery& query) {
  std::string tree = PhysicalTreeString(plan, query);
  if (tree.size() <= kTipChars) return tree;
  tree.resize(kTipChars);
  return absl::StrCat(tree, " ... (", query.size(), " relations; the JSON has the whole tree)");
}

std::string BoundText(const Bound& b) {
  return absl::StrFormat("%s %s %g", MetricLabel(b.metric), b.at_most ? "<=" : ">=", b.value);
}

}  // namespace

std::string FrontierSvg(const std::vector<WidePlan>& frontier, const WideQuery& query,
                        std::optional<size_t> chosen, const ChoiceRule& rule) {
  double lat_lo = 1e300, lat_hi = 0, ns_lo = 1e300, ns_hi = 0, c_lo = 1;
  for (const WidePlan& p : frontier) {
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
        SvgEscape(TipTree(frontier[i], query)), m.latency_s, m.node_seconds, m.completeness);
    absl::StrAppendFormat(&s,
                          "<circle cx=\"%.1f\" cy=\"%.1f\" r=\"%g\" fill=\"%s\" stroke=\"#222\" "
                          "stroke-width=\"0.6\"><title>%s</title></circle>\n",
                          px(m.latency_s), py(m.node_seconds), radius,
                          Colour(c_norm(m.completeness)), tip);
  }
  // The bounds on the two axes, as lines across the plot.
  for (const Bound& b : rule.bounds) {
    if (b.metric == Metric::kCompleteness) continue;  // in the legend's words
    const bool vertical = b.metric == Metric::kLatency;
    const double at = vertical ? px(b.value) : py(b.value);
    const double lo = vertical ? SvgChart::kLeft : SvgChart::kTop;
    const double span = vertical ? chart.PlotWidth() : chart.PlotHeight();
    // Outside the plotted range, or no place on a log axis (a bound <= 0).
    if (!std::isfinite(at) || at < lo || at > lo + span) continue;
    const double x1 = vertical ? at : SvgChart::kLeft, x2 = vertical ? at : lo + span;
    const double y1 = vertical ? SvgChart::kTop : at;
    const double y2 = vertical ? SvgChart::kTop + chart.PlotHeight() : at;
    absl::StrAppendFormat(&s,
                          "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" stroke=\"#555\" "
                          "stroke-dasharray=\"5 4\" stroke-width=\"1.5\"/><text x=\"%.1f\" "
                          "y=\"%.1f\" fill=\"#555\">%s</text>\n",
                          x1, y1, x2, y2, vertical ? at + 4 : SvgChart::kLeft + 4,
                          vertical ? SvgChart::kTop + 14 : at - 4, SvgEscape(BoundText(b)));
  }
  // The chosen plan: ringed, and named in the margin with a leader line,
  // so its label never covers other points.
  const double lx = SvgChart::kLeft + chart.PlotWidth() + 16;
  if (chosen && *chosen < frontier.size()) {
    const ClusterCosts& m = frontier[*chosen].root().metrics;
    const double cx = px(m.latency_s), cy = py(m.node_seconds);
    const double ty = SvgChart::kTop + 16;
    absl::StrAppendFormat(
        &s,
        "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" stroke=\"#d62728\" "
        "stroke-width=\"1\" stroke-dasharray=\"3 2\"/>"
        "<circle cx=\"%.1f\" cy=\"%.1f\" r=\"11\" fill=\"none\" stroke=\"#d62728\" "
        "stroke-width=\"2.5\"/>"
        "<text x=\"%.1f\" y=\"%.1f\" fill=\"#d62728\" font-weight=\"bold\">chosen: plan %d</text>"
        "<text x=\"%.1f\" y=\"%.1f\" font-size=\"11\">latency %s</text>"
        "<text x=\"%.1f\" y=\"%.1f\" font-size=\"11\">node-seconds %s</text>"
        "<text x=\"%.1f\" y=\"%.1f\" font-size=\"11\">completeness %s</text>\n",
        cx + 8, cy - 8, lx - 4, ty - 4, cx, cy, lx, ty, static_cast<int>(*chosen), lx, ty + 15,
        Fmt(m.latency_s) + " s", lx, ty + 29, Fmt(m.node_seconds), lx, ty + 43,
        Fmt(m.completeness));
  } else if (!rule.bounds.empty()) {
    absl::StrAppendFormat(&s,
                          "<text x=\"%.1f\" y=\"%.1f\" fill=\"#d62728\" font-weight=\"bold\">"
                          "no plan meets the bounds</text>\n",
                          lx, SvgChart::kTop + 16.0);
  }
  // How the plan was chosen.
  double ry = SvgChart::kTop + 78;
  absl::StrAppendFormat(&s, "<text x=\"%.1f\" y=\"%.1f\" font-size=\"11\">chosen by: %s</text>\n",
                        lx, ry, SvgEscape(RuleText(rule)));
  for (const Bound& b : rule.bounds) {
    ry += 14;
    absl::StrAppendFormat(&s, "<text x=\"%.1f\" y=\"%.1f\" font-size=\"11\">bound: %s</text>\n", lx,
                          ry, SvgEscape(BoundText(b)));
  }
  // The third objective: the colour scale, labelled.
  const double cy0 = ry + 52;
  absl::StrAppendFormat(&s,
                        "<text x=\"%.1f\" y=\"%.1f\">colour: completeness</text>"
                        "<text x=\"%.1f\" y=\"%.1f\" font-size=\"11\">(the third objective%s)"
                        "</text>\n",
                        lx, cy0 - 22, lx, cy0 - 8, c_log ? ", log scale" : "");
  constexpr int kSteps = 20;
  constexpr double kStep = 9;
  for (int k = 0; k <= kSteps; ++k) {
    absl::StrAppendFormat(
        &s, "<rect x=\"%.1f\" y=\"%.1f\" width=\"16\" height=\"%.1f\" fill=\"%s\"/>\n", lx,
        cy0 + (kSteps - k) * kStep, kStep + 0.5, Colour(static_cast<double>(k) / kSteps));
  }
  // Labels at five values along the scale, as the plans' values map.
  for (int k = 0; k <= 4; ++k) {
    const double t = k / 4.0;
    const double c = c_lo >= 1 ? 1.0
                     : c_log   ? std::pow(10, std::log10(c_lo) * (1 - t))
                               : c_lo + t * (1 - c_lo);
    absl::StrAppendFormat(&s, "<text x=\"%.1f\" y=\"%.1f\" font-size=\"11\">%s</text>\n", lx + 22,
                          cy0 + (1 - t) * kSteps * kStep + 8, Fmt(c));
    if (c_lo >= 1) break;
  }
  chart.Append(s);
  return chart.Finish();
}

}  // namespace sliceplan::cli
