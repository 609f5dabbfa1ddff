// The area distribution of least wave drag under the designer's constraints, and the
// "coke-bottle" correction that turns a given area curve into it.
//
// Method: slender-body wave drag in the sine-series form (von Kármán 1935 (mem); see
// docs/method.md §4.2): with x = (l/2)(1 − cos φ), S′(x) = Σₙ Aₙ sin nφ, D/q = (π/4) Σₙ n Aₙ².
// Every constraint used here is linear in the Aₙ, so the least-drag body is found with Lagrange
// multipliers in closed form — the construction of Eminton (ARC R&M 3341, 1956 (mem)) and Eminton &
// Lord (J. R. Aeronaut. Soc. 60, 1956 (mem)):
//   - area fixed at a station uᵢ = xᵢ/l:  (l/2) Σₙ Aₙ Iₙ(φᵢ) = Sᵢ;
//   - base area S_B = S(l): the same with u = 1 (only n = 1 survives: A₁ = 4 S_B/(π l));
//   - volume V: V = l S_B/2 + (π l²/16) A₂ (integration by parts), one more multiplier row.
// The Gram matrix of the point constraints is (l²/4) Σₙ Iₙ(φᵢ)Iₙ(φⱼ)/n, written in closed form
// as Eminton & Lord's kernel G (n ≥ 2) plus the n = 1 term. A maximum area is an inequality:
// it is enforced by an active set — where the optimum exceeds it, the area there is fixed at
// the maximum and the system is solved again.
//
// Like every result of machcut this is a preliminary design estimate from linear theory.
#pragma once

#include <optional>
#include <span>
#include <string>
#include <vector>

#include "machcut/sections/area_curve.h"

namespace machcut {

// An area fixed at a station.
struct AreaPin {
  double x = 0.0;     // station, m (absolute, same axis as the body's x0)
  double area = 0.0;  // m², >= 0
};

// What the least-drag body must satisfy. The body spans [x0, x0 + length] and S(x0) = 0.
struct LeastDragProblem {
  double x0 = 0.0;
  double length = 0.0;                // m, > 0
  std::optional<double> volume;       // m³; empty: volume free
  std::optional<double> base_area;    // m², S(x0 + length); empty: base free
  std::vector<AreaPin> pins;          // interior stations x0 < x < x0 + length
  std::optional<double> max_area;     // m²; empty: no limit
};

// The least-drag body: S(u) = Σₖ λₖ (constraint k's influence function), kept in a form that
// can be evaluated anywhere.
struct LeastDragBody {
  double x0 = 0.0;
  double length = 0.0;
  std::vector<double> pin_u;       // u = (x − x0)/l of the point constraints (base: u = 1)
  std::vector<double> pin_weight;  // their multipliers (m² / unit kernel)
  double volume_weight = 0.0;      // multiplier of the volume row (0 when volume is free)
  double drag_area = 0.0;          // D/q of the body, m² (slender-body, lateral surface only)
  double volume = 0.0;             // m³
  double base_area = 0.0;          // m²
  int active_max_pins = 0;         // stations added to honour max_area
  bool max_area_met = true;        // false when the active set did not converge
  double min_area = 0.0;           // smallest area on [x0, x0 + l]; < 0 means the pins conflict
};

// Solves the problem. Throws InputError (source "least-drag target") when it has no solution:
// length <= 0, a pin outside the body or two pins closer than 1e-6 l, negative areas, a
// max_area smaller than a pin, or an over-determined system. With only `volume` (and
// base_area = 0) the result is the Sears–Haack body (Haack 1941; Sears 1947); with base and
// volume the Haack–Adams body (Adams, NACA TN 2550 (mem)); with base only von Kármán's ogive.
LeastDragBody least_drag_body(const LeastDragProblem& problem);

// S(x) of the body, m² (0 upstream of x0; S_B downstream of x0 + l).
double least_drag_area(const LeastDragBody& body, double x);

// Closed-form Sears–Haack area at x for a body of length l from x0 with volume V:
// S = S_max [4ξ(1 − ξ)]^{3/2}, S_max = 16 V/(3π l) (Sears 1947).
double sears_haack_area(double x0, double length, double volume, double x);
// D/q = 128 V²/(π l⁴) (Sears 1947).
double sears_haack_drag_area(double length, double volume);

// Length, volume, and end area of an area curve (trapezoid rule over its stations; the curve
// is taken to span its first to last station). Degenerate curves (< 2 stations) give zeros.
struct CurveMeasures {
  double x0 = 0.0;
  double length = 0.0;     // m
  double volume = 0.0;     // m³
  double max_area = 0.0;   // m²
  double x_max_area = 0.0; // m
  double base_area = 0.0;  // area at the last station, m²
};
CurveMeasures measure_curve(const AreaCurve& curve);

// The redesign ("coke-bottle") correction at the curve's stations.
struct Correction {
  std::vector<double> x;             // m
  std::vector<double> area;          // current area, m²
  std::vector<double> target;        // least-drag target area, m²
  std::vector<double> delta_area;    // target − current, m² (< 0: take area out)
  std::vector<double> radius;        // equivalent radius √(S/π) of the current area, m
  std::vector<double> delta_radius;  // √(target/π) − √(S/π), m
};
Correction correction_to(const AreaCurve& curve, const LeastDragBody& body);

// CSV text of a correction: header line, then one row per station (SI units in the header).
std::string correction_csv(const Correction& c);

}  // namespace machcut
