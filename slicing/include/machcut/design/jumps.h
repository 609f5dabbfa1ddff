// Area jumps: the stations where an area curve steps or its slope kinks (canopy, wing-root
// leading edge, nacelle lips, tail junctions, a blister), ranked by their share of the wave
// drag.
//
// Detection (one-sided fits, a common edge detector for sampled signals): at every gap
// between neighbouring stations, a quadratic is fitted by least squares to the stations
// within a window W upstream and another to those within W downstream; their difference at
// the gap gives the step in area, the difference of their slopes the kink. Smooth curves give
// differences of order S‴W²; a step or kink gives its own size. Candidates are local maxima of
// |step| + W·|kink| above a threshold.
// Share: the region around the jump is replaced by a cubic that joins the curve upstream and
// downstream with matching area and slope (a local smooth fit), and the drag of the
// equivalent body before minus after is the jump's drag change (eminton_lord.h: Eminton–Lord). The
// shares of neighbouring jumps overlap and need not add up to one.
#pragma once

#include <cstdint>
#include <functional>
#include <span>
#include <string>
#include <vector>

#include "machcut/sections/area_curve.h"

namespace machcut {

struct JumpOptions {
  double window_frac = 0.025;   // W as a fraction of the curve's length (at least 3 stations)
  double smooth_frac = 0.05;    // half-width of the smoothed region, fraction of length
  double min_size_frac = 0.01;  // threshold of |step| + W|kink| as a fraction of the max area
  int max_jumps = 12;           // the largest shares kept
  double shell_frac = 0.25;     // a shell is named when its own size is >= this × the largest
  int min_window_gaps = 3;      // the finest window: this many station gaps (see below)
};

struct AreaJump {
  double mach = 1.0;           // of the curve it was found on
  double x = 0.0;              // station, m
  double step = 0.0;           // area downstream − upstream, m²
  double slope_change = 0.0;   // dS/dx downstream − upstream, m²/m (= m)
  double size = 0.0;           // |step| + W|slope_change|, m² (the detection measure)
  std::string kind;            // "step" or "kink"
  double x_from = 0.0;         // smoothed region, m
  double x_to = 0.0;
  double window = 0.0;         // fit window W it was found with, m (halved down from
                               // window_frac·length to min_window_gaps gaps for short features)
  double drag_change = 0.0;    // D/q(curve) − D/q(smoothed curve), m² (> 0: the jump costs drag)
  double share = 0.0;          // drag_change / D/q(curve); 0 when D/q is 0
  std::vector<std::uint32_t> shells;  // indices into per_shell (largest contribution first)
};

// D/q (m²) of an equivalent body given by sampled areas; e.g. eminton_lord_fit(x, a).drag_area.
using CurveDrag = std::function<double(std::span<const double> x, std::span<const double> area)>;

// Scales: the detection runs with W = window_frac·length and again with W halved while W
// spans at least min_window_gaps station gaps, so that a feature shorter than the first window
// (a narrow band, a short step) is found as the steps it is rather than as a blurred kink; a
// jump found at several scales is kept once (at the finest window that finds it), and its
// smoothed region scales with its window.
// Finds and ranks the jumps of `curve` (x strictly increasing, >= 8 stations; shorter curves
// give none). `curve.per_shell`, when present, names the shells that cause each jump. When
// `drag` is empty the jumps are ranked by size and drag_change/share are 0. Result: largest
// share (or size) first, at most options.max_jumps.
std::vector<AreaJump> find_jumps(const AreaCurve& curve, const CurveDrag& drag,
                                 const JumpOptions& options = {});

// The default drag of a sampled curve: the Eminton–Lord least-drag curve through it (eminton_lord.h);
// 0 when the fit fails.
double eminton_lord_drag(std::span<const double> x, std::span<const double> area);

// The curve with [x_from, x_to] replaced by the cubic that matches the one-sided quadratic
// fits (window W) at both ends in area and slope. Same stations.
std::vector<double> smooth_region(const AreaCurve& curve, double x_from, double x_to, double window);

}  // namespace machcut
