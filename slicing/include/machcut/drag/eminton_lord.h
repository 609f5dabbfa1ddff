// Zero-lift wave drag of one equivalent body from its sampled area distribution.
//
// Method: the Eminton–Lord least-drag curve through the sampled areas (E. Eminton, "On the
// minimisation and numerical evaluation of wave drag", RAE Report Aero 2564, 1955, also ARC
// R&M 3341; Eminton & Lord, J. R. Aeronaut. Soc. 60, 1956). Of all smooth area curves with
// S(0) = 0, S′(0) = S′(l) = 0 that pass through the given areas, it is the one whose
// von Kármán slender-body integral
//     D/q = −(1/2π) ∫∫ S″(x₁) S″(x₂) ln|x₁ − x₂| dx₁ dx₂       (von Kármán & Moore 1932)
// is least, and its drag follows in closed form from a small symmetric positive-definite
// linear system. Why this and not a truncated least-squares sine series (D/q = (π/4) Σ n Aₙ²):
// it needs no derivative of the mesh data and no choice of truncation order, it interpolates
// every sampled area, and it converges monotonically from below as stations are added, so
// the change on doubling the stations is an honest error estimate. Its weakness — nearly
// coincident stations make the system ill-conditioned — is avoided by using nested
// end-clustered (cosine) stations of at most a few hundred points.
//
// A base area S_B = S(l) > 0 is closed by a constant-area wake: the curve continues as a
// cylinder (S′(l) = 0). With S′(l) = 0 this equals the forebody (lateral-surface) pressure
// drag of a body with a base in slender-body theory (Ward, "Linearized theory of steady
// high-speed flow", 1955; Ashley & Landahl, "Aerodynamics of wings and bodies", 1965); base
// pressure drag itself is not given by linear theory. When the real curve ends with a slope
// S′(l) ≠ 0, the drag of the wake-closed curve grows like ln(N) with the station count: the
// caller sees this as station refinement that does not converge.
#pragma once

#include <span>
#include <string>
#include <vector>

namespace machcut {

// The least-drag fit through sampled areas; enough to evaluate its curve and drag.
struct EmintonLordFit {
  double x0 = 0.0;         // nose station, m (S = 0 there)
  double length = 0.0;     // l, m
  double base_area = 0.0;  // S_B = S(x0 + l), m²; closed by a constant-area wake
  std::vector<double> u;   // interior stations as fractions of l, strictly inside (0, 1)
  std::vector<double> mu;  // weights μᵢ of the kernel G(·, uᵢ), m²
  double drag_area = 0.0;  // D/q of the fitted curve, m²
  bool ok = false;         // false: fewer than 2 stations, l <= 0, non-finite data, or a
                           // singular system; `problem` says which
  std::string problem;
};

// Fits the Eminton–Lord curve to areas `area` (m²) at stations `x` (m, strictly increasing).
// x.front() is the nose (its area is taken as 0 whatever area.front() says: the curve starts
// at zero; a non-zero nose area is a flat-faced nose with infinite linear-theory drag),
// x.back() the tail, whose area is the base area S_B (0 for a closed tail). Stations closer
// than 1e-9 l to a neighbour are dropped (they carry no information and spoil conditioning).
// Shapes: x.size() == area.size() >= 2.
EmintonLordFit eminton_lord_fit(std::span<const double> x, std::span<const double> area);

// S(x) of a fit (m²): 0 upstream of the nose, S_B downstream of the tail.
double eminton_lord_area(const EmintonLordFit& fit, double x);

// The kernel G(u, v) = Σₙ≥₂ Iₙ(φ) Iₙ(ψ)/n in closed form (Eminton 1955); u, v in [0, 1].
// Exposed for least-drag design with constraints, which solves systems in the same kernel.
double eminton_lord_kernel(double u, double v);

// The von Kármán ogive shape s₀(u) = (φ − sin φ cos φ)/π, φ = arccos(1 − 2u): S = S_B s₀ is
// the least-drag body of given length and base area (D/q = 4 S_B²/(π l²)).
double karman_ogive_shape(double u);

// The Sears–Haack reference drag is sears_haack_drag_area(length, volume) in optimum.h.

}  // namespace machcut
