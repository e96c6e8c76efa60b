// The frame of an SVG chart, drawn with no external plotting program: a
// title, a plot area with grid lines and tick labels on both axes, axis
// titles. Callers append their marks in plot coordinates (X(), Y()).
// An axis is logarithmic when its range spans more than a factor of 20
// (common practice) or when asked.
#ifndef SLICEPLAN_CLI_SVG_CHART_H_
#define SLICEPLAN_CLI_SVG_CHART_H_

#include <string>
#include <vector>

namespace sliceplan::cli {

struct ChartAxis {
  double lo = 0, hi = 1;
  bool log = false;
  // v's place along the axis, 0 at lo and 1 at hi.
  double Norm(double v) const;
  // Tick values: decades (or 1-2-5 steps) on a log axis, round steps else.
  std::vector<double> Ticks() const;
};

// An axis over [lo, hi], padded; logarithmic when hi / lo > 20 or `log`.
ChartAxis MakeChartAxis(double lo, double hi, bool log = false);

// Escapes <, > and & for SVG text.
std::string SvgEscape(const std::string& s);

class SvgChart {
 public:
  static constexpr double kWidth = 860, kHeight = 560;
  static constexpr double kLeft = 90, kRight = 170, kTop = 50, kBottom = 70;

  SvgChart(const std::string& title, ChartAxis x, const std::string& x_title, ChartAxis y,
           const std::string& y_title);

  const ChartAxis& x_axis() const { return x_; }
  // Pixel positions of data values.
  double X(double v) const;
  double Y(double v) const;
  // The plot area's width and height in pixels.
  double PlotWidth() const { return kWidth - kLeft - kRight; }
  double PlotHeight() const { return kHeight - kTop - kBottom; }

  // Appends raw SVG elements.
  void Append(const std::string& elements) { svg_ += elements; }
  // The whole document.
  std::string Finish() const { return svg_ + "</svg>\n"; }

 private:
  ChartAxis x_, y_;
  std::string svg_;
};

}  // namespace sliceplan::cli

#endif  // SLICEPLAN_CLI_SVG_CHART_H_
