#include "cli/svg_chart.h"

#include <algorithm>
#include <cmath>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"

namespace sliceplan::cli {
namespace {

std::string Fmt(double v) { return absl::StrFormat("%.4g", v); }

}  // namespace

double ChartAxis::Norm(double v) const {
  return log ? (std::log10(v) - std::log10(lo)) / (std::log10(hi) - std::log10(lo))
             : (v - lo) / (hi - lo);
}

std::vector<double> ChartAxis::Ticks() const {
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

ChartAxis MakeChartAxis(double lo, double hi, bool log) {
  if (lo <= 0) lo = hi > 0 ? hi * 1e-3 : 1;
  if (hi < lo) hi = lo;
  if (log || hi / lo > 20) return {lo / 1.3, hi * 1.3, true};
  const double pad = hi > lo ? (hi - lo) * 0.08 : std::max(1e-9, hi * 0.05);
  return {std::max(0.0, lo - pad), hi + pad, false};
}

std::string SvgEscape(const std::string& s) {
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

SvgChart::SvgChart(const std::string& title, ChartAxis x, const std::string& x_title, ChartAxis y,
                   const std::string& y_title)
    : x_(x), y_(y) {
  const double pw = PlotWidth(), ph = PlotHeight();
  svg_ = absl::StrFormat(
      "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%.0f\" height=\"%.0f\" "
      "viewBox=\"0 0 %.0f %.0f\" font-family=\"sans-serif\" font-size=\"12\">\n"
      "<rect width=\"100%%\" height=\"100%%\" fill=\"white\"/>\n",
      kWidth, kHeight, kWidth, kHeight);
  absl::StrAppendFormat(&svg_,
                        "<text x=\"%.0f\" y=\"28\" font-size=\"16\" font-weight=\"bold\">"
                        "%s</text>\n",
                        kLeft, SvgEscape(title));
  absl::StrAppendFormat(&svg_,
                        "<rect x=\"%.0f\" y=\"%.0f\" width=\"%.0f\" height=\"%.0f\" "
                        "fill=\"none\" stroke=\"#444\"/>\n",
                        kLeft, kTop, pw, ph);
  for (double t : x_.Ticks()) {
    absl::StrAppendFormat(&svg_,
                          "<line x1=\"%.1f\" y1=\"%.0f\" x2=\"%.1f\" y2=\"%.0f\" stroke=\"#ddd\"/>"
                          "<text x=\"%.1f\" y=\"%.0f\" text-anchor=\"middle\">%s</text>\n",
                          X(t), kTop, X(t), kTop + ph, X(t), kTop + ph + 18, Fmt(t));
  }
  for (double t : y_.Ticks()) {
    absl::StrAppendFormat(&svg_,
                          "<line x1=\"%.0f\" y1=\"%.1f\" x2=\"%.0f\" y2=\"%.1f\" stroke=\"#ddd\"/>"
                          "<text x=\"%.0f\" y=\"%.1f\" text-anchor=\"end\">%s</text>\n",
                          kLeft, Y(t), kLeft + pw, Y(t), kLeft - 6, Y(t) + 4, Fmt(t));
  }
  absl::StrAppendFormat(&svg_, "<text x=\"%.0f\" y=\"%.0f\" text-anchor=\"middle\">%s%s</text>\n",
                        kLeft + pw / 2, kHeight - 22, SvgEscape(x_title),
                        x_.log ? ", log scale" : "");
  absl::StrAppendFormat(&svg_,
                        "<text transform=\"translate(24 %.0f) rotate(-90)\" "
                        "text-anchor=\"middle\">%s%s</text>\n",
                        kTop + ph / 2, SvgEscape(y_title), y_.log ? ", log scale" : "");
}

double SvgChart::X(double v) const { return kLeft + x_.Norm(v) * PlotWidth(); }
double SvgChart::Y(double v) const { return kTop + (1 - y_.Norm(v)) * PlotHeight(); }

}  // namespace sliceplan::cli
