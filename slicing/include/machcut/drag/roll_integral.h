// The roll-angle average of the supersonic area rule (Jones, NACA Report 1284, 1956; Hayes
// 1947): D/q = (1/2π) ∮ D(θ)/q dθ, by adaptive quadrature that knows where D(θ) is singular.
//
// D(θ) has integrable logarithmic peaks at the roll angles where a Mach plane contains a
// straight edge across which the surface slope jumps (docs/method.md §5.3: for edge direction d,
// dₓ = β(d_y cos θ + d_z sin θ)). A uniform average over a fixed number of angles converges
// slowly there (a rectangular wing with βA = 4 averaged over 36 angles is ~3 times too low).
// So: the period is split at those angles; each piece is mapped by the cubic t ↦ 3t² − 2t³,
// which removes the logarithm's effect on the quadrature (the integrand times the mapping's
// derivative vanishes at the ends); then globally adaptive Gauss–Kronrod (7, 15) quadrature
// bisects the pieces with the largest error estimates. No node ever lies on a break angle.
// The curve provider is a function, so the integral is tested without a mesh.
#pragma once

#include <array>
#include <functional>
#include <span>
#include <string>
#include <vector>

#include "machcut/common/mesh.h"

namespace machcut {

// What one roll angle contributes, as computed by a provider.
struct RollSample {
  double roll_deg = 0.0;
  double drag_area = 0.0;      // D(θ)/q, m²
  double station_error = 0.0;  // estimated error of drag_area from the station count, m² (>= 0)
  double coarse_error = 0.0;   // the same one station level coarser (for the convergence
                               // ratio), m² (>= 0); 0 when not computed
  double length = 0.0;         // length of the equivalent body at this roll, m
  double base_area = 0.0;      // area at the tail station (0 for a closed tail), m²
  double peak_area = 0.0;      // largest sampled area, m²
  double kink_width = 0.0;     // m: width S′ steps were spread over (slope grid; 0: none)
  // Signed changes of drag_area from one station level to the next finer, coarsest first: the
  // last is D(h) − D(2h). `levels` of them are set (4 on the slope grid: h … 16h; 2 for the
  // sampled-area fits), the rest 0. m².
  std::array<double, 4> increments{};
  int levels = 0;
  bool ok = true;              // false: the provider could not compute it (see problem)
  std::string problem;
};

// Computes the samples for a batch of roll angles (degrees); may run them in parallel.
// Must return one sample per angle, in the same order.
using RollProvider = std::function<std::vector<RollSample>(std::span<const double> rolls_deg)>;

// Mirror symmetries of the model that make D(θ) symmetric.
enum class RollSymmetry {
  none,
  left_right,  // y → −y: D(θ) = D(180° − θ); integrate θ ∈ [−90°, 90°]
  up_down,     // z → −z: D(θ) = D(−θ); integrate θ ∈ [0°, 180°]
  both,        // both: integrate θ ∈ [0°, 90°]
};
const char* symmetry_name(RollSymmetry s);

struct RollIntegral;

struct RollIntegralOptions {
  double rel_tol = 0.0025;            // target of the quadrature error estimate / |D/q|
  double abs_tol = 0.0;               // m²; stops also when the estimate falls below this
  // May be empty: a further absolute tolerance (m²) computed from the integral so far — e.g. a
  // fraction of the station error, which the quadrature need not undercut.
  std::function<double(const RollIntegral& so_far)> abs_tol_of;
  RollSymmetry symmetry = RollSymmetry::none;
  std::vector<double> breaks_deg;     // singular roll angles (any range; folded here)
  int min_pieces = 4;                 // initial pieces over the integration range (>= 1)
  int max_evaluations = 3000;         // provider calls in all; the result says if it was hit
  std::function<void(int evaluations)> progress;  // may be empty
};

struct RollIntegral {
  double drag_area = 0.0;           // (1/2π) ∮ D(θ)/q dθ, m²
  double quadrature_error = 0.0;    // estimate of the roll-quadrature error, m²
  double station_error = 0.0;       // (1/2π) ∮ station_error(θ) dθ over the same nodes, m²
  double coarse_error = 0.0;        // (1/2π) ∮ coarse_error(θ) dθ, m²
  std::array<double, 4> increments{};  // (1/2π) ∮ increments(θ) dθ: the changes of drag_area
                                    // itself from level to level, coarsest first, m²
  int evaluations = 0;              // provider samples used
  int pieces = 0;                   // quadrature intervals at the end
  bool converged = false;           // quadrature error estimate met the tolerance
  bool ok = true;                   // false: a sample failed (problem says which)
  std::string problem;
  std::vector<RollSample> samples;  // every sample, sorted by roll angle
};

// Integrates the provider's D(θ) over the roll angle. Never evaluates on a break angle or its
// mirror images. Stops when quadrature_error <= max(rel_tol |D/q|, abs_tol) or at
// max_evaluations (converged = false).
RollIntegral integrate_rolls(const RollProvider& provider, const RollIntegralOptions& options);

// Roll angles (degrees, in [0, 360)) at which a Mach plane at Mach `mach` contains a straight
// sharp edge of `mesh`: edges whose adjacent faces meet at more than `min_dihedral_deg`,
// grouped by direction; a direction counts when its edges total at least `min_length_frac` of
// the model's x extent. M = 1 gives none (all roll angles are then the same). At most
// `max_breaks` angles, the strongest (longest) first.
std::vector<double> singular_roll_angles(const Mesh& mesh, double mach,
                                         double min_dihedral_deg = 15.0,
                                         double min_length_frac = 0.05, int max_breaks = 24);

// The mirror symmetries under which the provider's area curves agree: tests whether the area
// curves at θ and 180° − θ (left–right) and at θ and −θ (up–down) coincide to `rel_tol` of
// the largest area, at a few generic roll angles. `curve_at(roll_deg)` returns areas at
// stations given as fractions of each roll's own station range (same fractions every call).
RollSymmetry detect_roll_symmetry(
    const std::function<std::vector<double>(double roll_deg)>& curve_at, double rel_tol = 1e-7);

}  // namespace machcut
