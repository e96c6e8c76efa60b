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
  // Ticks at exactly these values (the plotted ones) instead of ones
  // chosen from the range.
  std::vector<double> fixed_ticks;
  // Tick labels as durations in human units (HumanSeconds), the ticks at
  // round durations (1 ms, 10 ms, ..., 1 min, 10 min, 1 h, 1 day, ...).
  bool seconds = false;
  // v's place along the axis, 0 at lo and 1 at hi.
  double Norm(double v) const;
  // Tick values: decades (or 1-2-5 steps) on a log axis, round steps else.
  std::vector<double> Ticks() const;
};

// An axis over [lo, hi], padded; logarithmic when hi / lo > 20 or `log`.
ChartAxis MakeChartAxis(double lo, double hi, bool log = false);

// A duration in the unit a person reads it in: "250 ms", "1.5 s",
// "10 min", "3.2 h", "7.6 days" (3 significant digits).
std::string HumanSeconds(double seconds);

// Escapes <, > and & for SVG text.
std::string SvgEscape(const std::string& s);

class SvgChart {
 public:
  static constexpr double kWidth = 920, kHeight = 560;
  static constexpr double kLeft = 110, kRight = 210, kTop = 50, kBottom = 70;

  SvgChart(const std::string& title, ChartAxis x, const std::string& x_title, ChartAxis y,
           const std::string& y_title);

  const ChartAxis& x_axis() const { return x_; }
  // Pixel positions of data values.
  double X(double v) const;
  double Y(double v) const;
  // The plot area's width and height in pixels.
  double PlotWidth() const { return kWidth - kLeft - kRight; }
  double PlotHeight() const { return kHeight - kTop - kBottom; }

  // A legend entry in the right margin, `row` lines below its top:
  // `mark` is SVG drawn around (0, 0) (a circle, a line), then the text.
  void Legend(int row, const std::string& mark, const std::string& text);

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
