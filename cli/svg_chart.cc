#include "cli/svg_chart.h"

#include <algorithm>
#include <cmath>
#include <iterator>
#include <string>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"

namespace sliceplan::cli {
namespace {

std::string Fmt(double v) { return absl::StrFormat("%.4g", v); }

// Round durations for a time axis, in seconds; the major ones first
// (each a factor of about 10 above the last), then the ones between.
constexpr double kMinute = 60, kHour = 3600, kDay = 86400, kYear = 365 * kDay;
const std::vector<double>& MajorDurations() {
  static const auto* v = new std::vector<double>{
      1e-6,        1e-5,         1e-4,         1e-3,         1e-2,        0.1,
      1,           10,           kMinute,      10 * kMinute, kHour,       10 * kHour,
      kDay,        10 * kDay,    100 * kDay,   kYear,        10 * kYear,  100 * kYear,
      1e3 * kYear, 1e4 * kYear,  1e5 * kYear,  1e6 * kYear,  1e7 * kYear, 1e8 * kYear,
      1e9 * kYear, 1e10 * kYear, 1e11 * kYear, 1e12 * kYear};
  return *v;
}
const std::vector<double>& MinorDurations() {
  static const auto* v = new std::vector<double>{
      2e-3,      5e-3,      2e-2,     5e-2,        0.2,         0.5,          2,
      5,         20,        30,       2 * kMinute, 5 * kMinute, 20 * kMinute, 30 * kMinute,
      2 * kHour, 5 * kHour, 2 * kDay, 5 * kDay,    20 * kDay,   50 * kDay};
  return *v;
}

std::vector<double> TimeTicks(double lo, double hi) {
  std::vector<double> t;
  const auto add = [&](const std::vector<double>& from) {
    for (double d : from) {
      if (d >= lo * 0.9999 && d <= hi * 1.0001) t.push_back(d);
    }
  };
  add(MajorDurations());
  if (t.size() < 4) add(MinorDurations());
  std::sort(t.begin(), t.end());
  // At most about 8 labels: every other major one (or fewer) over a range
  // of many decades.
  const size_t step = (t.size() + 7) / 8;
  if (step > 1) {
    std::vector<double> thinned;
    for (size_t i = 0; i < t.size(); i += step) thinned.push_back(t[i]);
    t = std::move(thinned);
  }
  return t;
}

}  // namespace

std::string HumanSeconds(double s) {
  if (!std::isfinite(s) || s <= 0) return absl::StrFormat("%g s", s);
  struct Unit {
    double seconds;
    const char* name;
  };
  static constexpr Unit kUnits[] = {{1e-6, "us"}, {1e-3, "ms"},   {1, "s"},        {kMinute, "min"},
                                    {kHour, "h"}, {kDay, "days"}, {kYear, "years"}};
  constexpr int kLast = static_cast<int>(std::size(kUnits)) - 1;
  // The largest unit at most `s`, then one up if the rounded figure
  // reaches it ("999.9 ms" is "1 s", never "1e+03 ms").
  int u = 0;
  while (u < kLast && s >= kUnits[u + 1].seconds) ++u;
  const auto figure = [](double v) {  // whole years in full up to a million
    return v >= 1000 && v < 1e6 ? absl::StrFormat("%.0f", v) : absl::StrFormat("%.3g", v);
  };
  std::string text = figure(s / kUnits[u].seconds);
  if (u < kLast && std::stod(text) * kUnits[u].seconds >= kUnits[u + 1].seconds) {
    ++u;
    text = figure(s / kUnits[u].seconds);
  }
  const bool one = text == "1";
  const std::string unit = one && u == 5 ? "day" : one && u == 6 ? "year" : kUnits[u].name;
  return absl::StrCat(text, " ", unit);
}

double ChartAxis::Norm(double v) const {
  return log ? (std::log10(v) - std::log10(lo)) / (std::log10(hi) - std::log10(lo))
             : (v - lo) / (hi - lo);
}

std::vector<double> ChartAxis::Ticks() const {
  if (!fixed_ticks.empty()) return fixed_ticks;
  if (seconds) {
    // Round durations where at least two fall in the range; else (a
    // narrow range, or one past a million days) the plain ticks below.
    if (std::vector<double> t = TimeTicks(lo, hi); t.size() >= 2) return t;
  }
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
                          X(t), kTop, X(t), kTop + ph, X(t), kTop + ph + 18,
                          x_.seconds ? HumanSeconds(t) : Fmt(t));
  }
  for (double t : y_.Ticks()) {
    absl::StrAppendFormat(&svg_,
                          "<line x1=\"%.0f\" y1=\"%.1f\" x2=\"%.0f\" y2=\"%.1f\" stroke=\"#ddd\"/>"
                          "<text x=\"%.0f\" y=\"%.1f\" text-anchor=\"end\">%s</text>\n",
                          kLeft, Y(t), kLeft + pw, Y(t), kLeft - 6, Y(t) + 4,
                          y_.seconds ? HumanSeconds(t) : Fmt(t));
  }
  absl::StrAppendFormat(&svg_, "<text x=\"%.0f\" y=\"%.0f\" text-anchor=\"middle\">%s%s</text>\n",
                        kLeft + pw / 2, kHeight - 22, SvgEscape(x_title),
                        x_.log ? ", log scale" : "");
  absl::StrAppendFormat(&svg_,
                        "<text transform=\"translate(16 %.0f) rotate(-90)\" "
                        "text-anchor=\"middle\">%s%s</text>\n",
                        kTop + ph / 2, SvgEscape(y_title), y_.log ? ", log scale" : "");
}

void SvgChart::Legend(int row, const std::string& mark, const std::string& text) {
  const double x = kLeft + PlotWidth() + 16, y = kTop + 10 + 20 * row;
  absl::StrAppendFormat(&svg_,
                        "<g transform=\"translate(%.0f %.0f)\">%s</g>"
                        "<text x=\"%.0f\" y=\"%.0f\">%s</text>\n",
                        x + 8, y, mark, x + 22, y + 4, SvgEscape(text));
}

double SvgChart::X(double v) const { return kLeft + x_.Norm(v) * PlotWidth(); }
double SvgChart::Y(double v) const { return kTop + (1 - y_.Norm(v)) * PlotHeight(); }

}  // namespace sliceplan::cli
