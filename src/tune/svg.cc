#include "tune/svg.h"

#include <algorithm>
#include <cmath>

#include "absl/strings/str_format.h"
#include "kindred/text.h"

namespace kindred::tune_internal {
namespace {

constexpr double kWidth = 780, kHeight = 380;
constexpr double kLeft = 64, kRight = 230, kTop = 36, kBottom = 56;
constexpr double kPlotWidth = kWidth - kLeft - kRight;
constexpr double kPlotHeight = kHeight - kTop - kBottom;

}  // namespace

std::string EscapeXml(std::string_view text) {
  const std::string valid = RepairUtf8(text);
  std::string out;
  out.reserve(valid.size());
  for (char c : valid) {
    const auto byte = static_cast<unsigned char>(c);
    switch (c) {
      case '&':
        out += "&amp;";
        break;
      case '<':
        out += "&lt;";
        break;
      case '>':
        out += "&gt;";
        break;
      case '"':
        out += "&quot;";
        break;
      case '\'':
        out += "&#39;";
        break;
      default:
        if ((byte < 0x20 && c != '\t' && c != '\n' && c != '\r') || byte == 0x7f) {
          out += "\xEF\xBF\xBD";
        } else {
          out.push_back(c);
        }
    }
  }
  return out;
}

double NiceStep(double largest) {
  for (double power = 1;; power *= 10) {
    for (double m : {1.0, 2.0, 5.0}) {
      if (largest / (m * power) <= 8) return m * power;
    }
  }
}

SvgPlot::SvgPlot(std::string title, Axis x, Axis y)
    : title_(std::move(title)), x_(std::move(x)), y_(std::move(y)) {}

double SvgPlot::X(double x) const {
  return kLeft + (std::clamp(x, x_.min, x_.max) - x_.min) / (x_.max - x_.min) * kPlotWidth;
}

double SvgPlot::Y(double y) const {
  return kTop + kPlotHeight -
         (std::clamp(y, y_.min, y_.max) - y_.min) / (y_.max - y_.min) * kPlotHeight;
}

void SvgPlot::Line(const std::vector<std::pair<double, double>>& points, std::string_view color,
                   std::string_view legend, std::string_view dash) {
  std::string coordinates;
  for (const auto& [x, y] : points) coordinates += absl::StrFormat("%.1f,%.1f ", X(x), Y(y));
  body_ += absl::StrFormat(
      "<polyline points=\"%s\" fill=\"none\" stroke=\"%s\" "
      "stroke-width=\"2\"%s/>\n",
      coordinates, std::string(color),
      dash.empty() ? "" : absl::StrFormat(" stroke-dasharray=\"%s\"", std::string(dash)));
  if (!legend.empty()) {
    legend_.push_back({std::string(color), std::string(legend), std::string(dash), false});
  }
}

void SvgPlot::Dot(double x, double y, std::string_view color, std::string_view tooltip,
                  bool ringed) {
  body_ += absl::StrFormat(
      "<circle cx=\"%.1f\" cy=\"%.1f\" r=\"%s\" fill=\"%s\" "
      "fill-opacity=\"0.7\"%s><title>%s"
      "</title></circle>\n",
      X(x), Y(y), ringed ? "5" : "3.5", std::string(color),
      ringed ? " stroke=\"#000\" stroke-width=\"1.5\"" : "", EscapeXml(tooltip));
}

void SvgPlot::Bar(double x0, double x1, double y, std::string_view color,
                  std::string_view tooltip) {
  const double top = Y(y), bottom = Y(y_.min);
  body_ += absl::StrFormat(
      "<rect x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" "
      "height=\"%.1f\" fill=\"%s\"><title>%s</title>"
      "</rect>\n",
      X(x0) + 1, top, std::max(0.0, X(x1) - X(x0) - 2), bottom - top, std::string(color),
      EscapeXml(tooltip));
}

void SvgPlot::Marker(double x, std::string_view color, std::string_view label) {
  body_ += absl::StrFormat(
      "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" stroke=\"%s\" "
      "stroke-dasharray=\"4 3\"/>\n<text x=\"%.1f\" y=\"%.1f\" "
      "font-size=\"11\" "
      "text-anchor=\"middle\" fill=\"%s\">%s</text>\n",
      X(x), kTop, X(x), kTop + kPlotHeight, std::string(color), X(x), kTop - 4, std::string(color),
      EscapeXml(label));
}

void SvgPlot::DotLegend(std::string_view color, std::string_view legend) {
  legend_.push_back({std::string(color), std::string(legend), "", true});
}

std::string SvgPlot::Axes() const {
  std::string out = absl::StrFormat(
      "<rect x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" "
      "height=\"%.1f\" fill=\"none\" "
      "stroke=\"#444\"/>\n",
      kLeft, kTop, kPlotWidth, kPlotHeight);
  const auto ticks = [](const Axis& axis) {
    std::vector<double> values;
    const double first = std::ceil(axis.min / axis.tick_step - 1e-9);
    // Ticks at 0 and above only: a band below 0 holds markers, not values.
    for (double i = std::max(first, 0.0); i * axis.tick_step <= axis.max + 1e-9; ++i) {
      values.push_back(i * axis.tick_step + 0.0);
    }
    return values;
  };
  for (double t : ticks(x_)) {
    out += absl::StrFormat(
        "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" "
        "stroke=\"#444\"/>"
        "<text x=\"%.1f\" y=\"%.1f\" font-size=\"11\" "
        "text-anchor=\"middle\">%.*f</text>\n",
        X(t), kTop + kPlotHeight, X(t), kTop + kPlotHeight + 5, X(t), kTop + kPlotHeight + 18,
        x_.tick_decimals, t);
  }
  for (double t : ticks(y_)) {
    out += absl::StrFormat(
        "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" "
        "y2=\"%.1f\" stroke=\"#ddd\"/>"
        "<text x=\"%.1f\" y=\"%.1f\" font-size=\"11\" "
        "text-anchor=\"end\">%.*f</text>\n",
        kLeft, Y(t), kLeft + kPlotWidth, Y(t), kLeft - 6, Y(t) + 4, y_.tick_decimals, t);
  }
  out += absl::StrFormat(
      "<text x=\"%.1f\" y=\"%.1f\" font-size=\"13\" "
      "text-anchor=\"middle\">%s</text>\n"
      "<text x=\"16\" y=\"%.1f\" font-size=\"13\" text-anchor=\"middle\" "
      "transform=\"rotate(-90 16 %.1f)\">%s</text>\n",
      kLeft + kPlotWidth / 2, kHeight - 14, EscapeXml(x_.label), kTop + kPlotHeight / 2,
      kTop + kPlotHeight / 2, EscapeXml(y_.label));
  return out;
}

std::string SvgPlot::Legend() const {
  std::string out;
  double y = kTop + 10;
  const double x = kLeft + kPlotWidth + 14;
  for (const LegendEntry& entry : legend_) {
    if (entry.dot) {
      out += absl::StrFormat("<circle cx=\"%.1f\" cy=\"%.1f\" r=\"4\" fill=\"%s\"/>", x + 11, y,
                             entry.color);
    } else {
      out += absl::StrFormat(
          "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" stroke=\"%s\" "
          "stroke-width=\"2\"%s/>",
          x, y, x + 22, y, entry.color,
          entry.dash.empty() ? "" : absl::StrFormat(" stroke-dasharray=\"%s\"", entry.dash));
    }
    out += absl::StrFormat("<text x=\"%.1f\" y=\"%.1f\" font-size=\"11\">%s</text>\n", x + 28,
                           y + 4, EscapeXml(entry.label));
    y += 18;
  }
  return out;
}

std::string SvgPlot::Finish() const {
  return absl::StrFormat(
      "<svg width=\"%.0f\" height=\"%.0f\" viewBox=\"0 0 %.0f %.0f\" "
      "role=\"img\" "
      "font-family=\"sans-serif\">\n<title>%s</title>\n<text x=\"%.1f\" "
      "y=\"20\" "
      "font-size=\"14\" font-weight=\"bold\">%s</text>\n%s%s%s</svg>\n",
      kWidth, kHeight, kWidth, kHeight, EscapeXml(title_), kLeft, EscapeXml(title_), Axes(), body_,
      Legend());
}

}  // namespace kindred::tune_internal
