// Line plots drawn with Cairo into SVG or PNG bytes (no files, no display): axes with units,
// a grid at 1-2-5 ticks, a legend, optional vertical station markers.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

namespace machcut {

struct PlotSeries {
  std::string label;            // legend text; empty: not in the legend
  std::vector<double> x, y;     // same size; non-finite points break the line
  std::uint32_t rgb = 0x1b6f8a; // 0xRRGGBB
  bool dashed = false;
  bool points = false;          // draw a dot at each point (for sparse data)
  double width = 2.0;           // line width, px
};

struct PlotMarker {
  double x = 0.0;               // vertical line at this abscissa
  std::string label;            // short text at the top of the line
};

struct Plot {
  std::string title;
  std::string x_label;          // with unit, e.g. "station x (m)"
  std::string y_label;          // with unit, e.g. "area (m²)"
  std::vector<PlotSeries> series;
  std::vector<PlotMarker> markers;
  bool zero_line = false;       // emphasise y = 0
  bool y_from_zero = false;     // include 0 in the y range
};

// The plot as an SVG document (UTF-8 text) / PNG bytes, width × height pixels. An empty plot
// (no finite point) is drawn with its axes and the note "no data".
std::string plot_svg(const Plot& plot, int width = 760, int height = 360);
std::string plot_png(const Plot& plot, int width = 760, int height = 360);

// The "nice" tick positions (1, 2, 5 × 10ⁿ) covering [lo, hi] with about `target` intervals
// (strictly increasing: fewer when [lo, hi] is too narrow for the doubles near it to resolve).
// {lo} when hi <= lo, either end is not finite or target < 1.
std::vector<double> nice_ticks(double lo, double hi, int target);

}  // namespace machcut
