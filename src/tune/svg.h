// Internal: small hand-written SVG plots for the tune report, and XML
// escaping. Every plot has a title, labelled axes with ticks and a legend;
// the output is well-formed XML (usable inline in XHTML) and references
// nothing outside itself.
//
// An SvgPlot is built by one thread: add shapes, then Finish().
#ifndef KINDRED_TUNE_SVG_H_
#define KINDRED_TUNE_SVG_H_

#include <string>
#include <string_view>
#include <utility>
#include <vector>

namespace kindred::tune_internal {

// `text` as XML character data or attribute value: repaired to valid UTF-8,
// control characters (other than tab, LF, CR) replaced by U+FFFD, and
// & < > " ' escaped.
std::string EscapeXml(std::string_view text);

// Series colours, distinguishable and readable on white.
inline constexpr const char* kPalette[] = {"#1f5fa8", "#d0641c", "#2e8b3d",
                                           "#8a3fa0", "#b22a2a", "#5a6b7b"};

// The smallest step of the form 1, 2 or 5 times a power of ten (at least 1)
// that cuts [0, largest] into at most 8 ticks.
double NiceStep(double largest);

struct Axis {
  std::string label;
  double min = 0;
  double max = 1;
  double tick_step = 0.1;
  int tick_decimals = 1;
};

class SvgPlot {
 public:
  SvgPlot(std::string title, Axis x, Axis y);

  // A line through `points` (data coordinates), with a legend entry when
  // `legend` is not empty. `dash` is an SVG stroke-dasharray or empty.
  void Line(const std::vector<std::pair<double, double>>& points, std::string_view color,
            std::string_view legend, std::string_view dash = "");
  // A dot with a tooltip.
  void Dot(double x, double y, std::string_view color, std::string_view tooltip,
           bool ringed = false);
  // A bar from (x0, 0) to (x1, y) with a tooltip.
  void Bar(double x0, double x1, double y, std::string_view color, std::string_view tooltip);
  // A vertical marker line across the plot, labelled at the top.
  void Marker(double x, std::string_view color, std::string_view label);
  // A legend entry for dots.
  void DotLegend(std::string_view color, std::string_view legend);
  // The <svg> element.
  std::string Finish() const;

 private:
  double X(double x) const;
  double Y(double y) const;
  std::string Axes() const;
  std::string Legend() const;

  std::string title_;
  Axis x_, y_;
  std::string body_;
  struct LegendEntry {
    std::string color, label, dash;
    bool dot;
  };
  std::vector<LegendEntry> legend_;
};

}  // namespace kindred::tune_internal

#endif  // KINDRED_TUNE_SVG_H_
