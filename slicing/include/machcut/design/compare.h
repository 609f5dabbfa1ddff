// Comparing two design variants: where along the body the change of wave drag comes from.
//
// For fixed stations the Eminton–Lord drag (eminton_lord.h) is a quadratic form D(S) = B(S, S) in the
// sampled areas, so the change between variants splits exactly:
//     D(S_B) − D(S_A) = B(Δ, Σ),  Δ = S_B − S_A,  Σ = S_A + S_B,
// and with Δ = Σ_z w_z Δ for a partition of unity w_z (hat functions over zones along x),
//     D(S_B) − D(S_A) = Σ_z B(w_z Δ, Σ),  B(u, v) = [D(u + v) − D(u − v)]/4  (polarization).
// Each zone's term is the drag change its own area change causes, interacting with the whole
// body; the terms add up to the total.
#pragma once

#include <span>
#include <string>
#include <vector>

#include "machcut/drag/wave_drag.h"

namespace machcut {

struct ZoneContribution {
  double x_center = 0.0;         // m, centre of the zone's hat function
  double x_from = 0.0, x_to = 0.0;  // m, its support
  double delta_drag_area = 0.0;  // m²; the zones add up to the total change
};

struct DragDifference {
  double drag_area_a = 0.0;      // Eminton–Lord D/q of A on these stations, m²
  double drag_area_b = 0.0;
  double delta_drag_area = 0.0;  // B − A, m²
  std::vector<ZoneContribution> zones;
  bool ok = false;               // false: a fit failed (too few stations, non-finite data)
  std::string problem;           // why not ok (grid split)
};

// Splits D/q(B) − D/q(A) over `zones` (>= 1) equal zones along the common stations `x`
// (strictly increasing, >= 2; first = nose of both, last = tail). area_a/area_b have x's size.
DragDifference drag_difference_by_zone(std::span<const double> x, std::span<const double> area_a,
                                       std::span<const double> area_b, int zones);

// The same split on the exact slope grid (slope_grid.h) of both models at M = 1, their ends
// closed as their WaveDragModels close them, on one grid of `cells` cells reaching 1/64 of the
// combined length beyond both ends: per cell −(1/2π)(b − a)ᵢ[K(a + b)]ᵢ, summed over `zones`
// equal zones of the combined station range (the margins join the end zones). The zones add up
// to the M = 1 drag change on that grid. Not ok when a model's ends leave a step in S, or when
// either model uses the Eminton–Lord fallback (captures given as areas).
// At mach > 1 the split is made on each of `rolls` evenly spaced roll angles' Mach-plane
// curves (zones along the station X, common to all rolls) and averaged over the rolls: the
// zones then add up to the midpoint-rule roll average of the drag change.
DragDifference drag_difference_by_zone(const WaveDragModel& a, const WaveDragModel& b, int zones,
                                       int cells = 16384, double mach = 1.0, int rolls = 36);

}  // namespace machcut
