#include "cli/frontier_plot.h"

#include <algorithm>
#include <cmath>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"

namespace sliceplan::cli {
namespace {

constexpr double kWidth = 860, kHeight = 560;
constexpr double kLeft = 90, kRight = 170, kTop = 50, kBottom = 70;

std::string Escape(const std::string& s) {
  std::string out;
  for (char c : s) {
    if (c == '<')
      out += "&lt;";
    else if (c == '>')
      out += "&gt;";
    else if (c == '&')
      out += "&amp;";
    else
      out += c;
  }
  return out;
}

// One axis: linear or log10, padded, with tick values.
struct Axis {
  double lo, hi;
  bool log;
  double Norm(double v) const {
    return log ? (std::log10(v) - std::log10(lo)) / (std::log10(hi) - std::log10(lo))
               : (v - lo) / (hi - lo);
  }
  std::vector<double> Ticks() const {
    std::vector<double> t;
    if (log) {  // decades, or 1-2-5 steps when fewer than three decades show
      for (const double step : {1.0, 2.0, 5.0}) {
        for (double d = std::pow(10, std::floor(std::log10(lo))); d <= hi * 1.0001; d *= 10) {
          if (d * step >= lo * 0.9999 && d * step <= hi * 1.0001) t.push_back(d * step);
        }
        if (step == 1.0 && t.size() >= 3) return t;
      }
      std::sort(t.begin(), t.end());
      return t;
    }
    const double raw = (hi - lo) / 5;
    const double mag = std::pow(10, std::floor(std::log10(raw)));
    const double step = raw / mag < 2 ? 2 * mag : raw / mag < 5 ? 5 * mag : 10 * mag;
    for (double v = std::ceil(lo / step) * step; v <= hi * 1.0001; v += step) t.push_back(v);
    return t;
  }
};

Axis MakeAxis(double lo, double hi) {
  if (lo <= 0) lo = hi > 0 ? hi * 1e-3 : 1;
  const bool log = hi / lo > 20;
  if (log) return {lo / 1.3, hi * 1.3, true};
  const double pad = hi > lo ? (hi - lo) * 0.08 : std::max(1e-9, hi * 0.05);
  return {std::max(0.0, lo - pad), hi + pad, false};
}

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
  const Axis x = MakeAxis(lat_lo, lat_hi), y = MakeAxis(ns_lo, ns_hi);
  const bool c_log = c_lo < 0.05;
  const auto c_norm = [&](double c) {
    if (c_lo >= 1) return 1.0;
    return c_log ? (std::log10(c) - std::log10(c_lo)) / -std::log10(c_lo) : (c - c_lo) / (1 - c_lo);
  };
  const double pw = kWidth - kLeft - kRight, ph = kHeight - kTop - kBottom;
  const auto px = [&](double v) { return kLeft + x.Norm(v) * pw; };
  const auto py = [&](double v) { return kTop + (1 - y.Norm(v)) * ph; };

  std::string s = absl::StrFormat(
      "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%.0f\" height=\"%.0f\" "
      "viewBox=\"0 0 %.0f %.0f\" font-family=\"sans-serif\" font-size=\"12\">\n"
      "<rect width=\"100%%\" height=\"100%%\" fill=\"white\"/>\n",
      kWidth, kHeight, kWidth, kHeight);
  absl::StrAppendFormat(&s,
                        "<text x=\"%.0f\" y=\"28\" font-size=\"16\" font-weight=\"bold\">"
                        "Pareto frontier: %d plans</text>\n",
                        kLeft, static_cast<int>(frontier.size()));
  absl::StrAppendFormat(&s,
                        "<rect x=\"%.0f\" y=\"%.0f\" width=\"%.0f\" height=\"%.0f\" "
                        "fill=\"none\" stroke=\"#444\"/>\n",
                        kLeft, kTop, pw, ph);
  for (double t : x.Ticks()) {
    absl::StrAppendFormat(&s,
                          "<line x1=\"%.1f\" y1=\"%.0f\" x2=\"%.1f\" y2=\"%.0f\" stroke=\"#ddd\"/>"
                          "<text x=\"%.1f\" y=\"%.0f\" text-anchor=\"middle\">%s</text>\n",
                          px(t), kTop, px(t), kTop + ph, px(t), kTop + ph + 18, Fmt(t));
  }
  for (double t : y.Ticks()) {
    absl::StrAppendFormat(&s,
                          "<line x1=\"%.0f\" y1=\"%.1f\" x2=\"%.0f\" y2=\"%.1f\" stroke=\"#ddd\"/>"
                          "<text x=\"%.0f\" y=\"%.1f\" text-anchor=\"end\">%s</text>\n",
                          kLeft, py(t), kLeft + pw, py(t), kLeft - 6, py(t) + 4, Fmt(t));
  }
  absl::StrAppendFormat(&s,
                        "<text x=\"%.0f\" y=\"%.0f\" text-anchor=\"middle\">latency (s)%s</text>\n",
                        kLeft + pw / 2, kHeight - 22, x.log ? ", log scale" : "");
  absl::StrAppendFormat(&s,
                        "<text transform=\"translate(24 %.0f) rotate(-90)\" text-anchor=\"middle\">"
                        "rented node-seconds%s</text>\n",
                        kTop + ph / 2, y.log ? ", log scale" : "");
  for (size_t i = 0; i < frontier.size(); ++i) {
    const ClusterCosts& m = frontier[i].root().metrics;
    const std::string tip = absl::StrFormat(
        "plan %d: %s&#10;latency %.4g s, node-seconds %.4g, completeness %.4g", static_cast<int>(i),
        Escape(TreeString(frontier[i], query)), m.latency_s, m.node_seconds, m.completeness);
    absl::StrAppendFormat(&s,
                          "<circle cx=\"%.1f\" cy=\"%.1f\" r=\"6\" fill=\"%s\" stroke=\"#222\" "
                          "stroke-width=\"0.6\"><title>%s</title></circle>\n",
                          px(m.latency_s), py(m.node_seconds), Colour(c_norm(m.completeness)), tip);
  }
  if (chosen && *chosen < frontier.size()) {
    const ClusterCosts& m = frontier[*chosen].root().metrics;
    absl::StrAppendFormat(
        &s,
        "<circle cx=\"%.1f\" cy=\"%.1f\" r=\"11\" fill=\"none\" stroke=\"#d62728\" "
        "stroke-width=\"2.5\"/><text x=\"%.1f\" y=\"%.1f\" fill=\"#d62728\" "
        "font-weight=\"bold\" text-anchor=\"%s\">chosen (plan %d)</text>\n",
        px(m.latency_s), py(m.node_seconds),
        px(m.latency_s) + (x.Norm(m.latency_s) > 0.7 ? -14 : 14), py(m.node_seconds) - 12,
        x.Norm(m.latency_s) > 0.7 ? "end" : "start", static_cast<int>(*chosen));
  }
  // Completeness legend.
  const double lx = kLeft + pw + 40, ly = kTop + 20;
  absl::StrAppendFormat(&s, "<text x=\"%.0f\" y=\"%.0f\">completeness</text>\n", lx, ly - 8);
  for (int k = 0; k <= 20; ++k) {
    absl::StrAppendFormat(
        &s, "<rect x=\"%.0f\" y=\"%.1f\" width=\"18\" height=\"%.1f\" fill=\"%s\"/>\n", lx,
        ly + (20 - k) * 10.0, 10.5, Colour(k / 20.0));
  }
  absl::StrAppendFormat(&s, "<text x=\"%.0f\" y=\"%.0f\">1</text>\n", lx + 24, ly + 10);
  absl::StrAppendFormat(&s, "<text x=\"%.0f\" y=\"%.0f\">%s%s</text>\n", lx + 24, ly + 208,
                        Fmt(std::min(c_lo, 1.0)), c_log ? " (log)" : "");
  return s + "</svg>\n";
}

}  // namespace sliceplan::cli
