// The exact Mach-plane area curve of a faceted model, held as its slope S′ on a uniform grid of
// stations, and von Kármán's drag integral evaluated on it without sampling the areas.
//
// Why: for a closed triangle mesh the projected section area is exactly
//     S(X) = −Σ_T A_T φ_T(X),
// A_T the triangle's signed area projected on the y–z plane (negative where it faces
// upstream), φ_T(X) the fraction of the triangle lying upstream of the plane f = X (f as in
// section.h). φ_T is the distribution function of a linear function over a triangle, so
//     S′(X) = Σ_T H_T Λ_T(X),   H_T = −2 A_T / (f₃ − f₁),
// Λ_T the unit tent rising from the triangle's first station f₁ to its middle one f₂ and
// falling to its last f₃ (f₁ ≤ f₂ ≤ f₃). S′ is therefore piecewise linear with knots at the
// vertex stations, and a triangle with an edge in the plane (f₁ = f₂) makes S′ step. Its
// mean over a grid cell — the cell's share of S divided by the cell width — is exact, in
// O(#triangles + #cells) work: inside a straight piece of a tent it is the tent's value at the
// cell centre (difference arrays for long runs), and the at most three cells holding a corner
// get the exact share from φ_T. No triangle's area is lost however narrow its tent (a facet
// nearly lying in the Mach plane), unlike S′ or S sampled at stations, where the drag jumps
// whenever a refinement first resolves such a tent.
//
// The drag (von Kármán & Moore 1932):
//     D/q = −(1/2π) ∫∫ S″(x₁) S″(x₂) ln|x₁ − x₂| dx₁ dx₂,   S′ = 0 at both ends,
// is evaluated for S′ piecewise linear through the cell means at the cell centres: S″ is then
// constant between neighbouring centres with integrals aⱼ (the steps), and
// D/q = −(1/2π) Σᵢⱼ aᵢ aⱼ Kᵢ₋ⱼ with K the cell-averaged logarithm (the ln h term vanishes
// because Σ aⱼ = 0), a Toeplitz quadratic form computed by FFT (Eigen's FFT module). The mean
// over two cells is the mean of their means, so the grids of half, a quarter … as many cells
// come exactly from the same pass, hence the error estimate.
// Edges lying exactly in the plane (at M = 1 every ring of a lofted mesh lies in a normal
// plane) make S′ step: a kink of S, for which the integral is logarithmically infinite. On a
// faceted surface such a kink stands for a bend spread over the facets that meet there, so the
// net S′ step in a cell is spread evenly over the local facet scale: the mean station extent
// of the triangles that carry such an edge there (about the mean of the facet lengths before
// and after a ring). This is our own modelling choice, stated in the results.
// Faces lying in the plane make S itself step: such steps that other faces do not cancel
// (a flat nose, an inlet face not treated by a capture tube) give infinite linear-theory drag
// and are reported, never integrated.
#pragma once

#include <cmath>
#include <span>
#include <memory>
#include <vector>

#include "machcut/common/mesh.h"
#include "machcut/sections/section.h"

namespace machcut {

// The mean of S′ over each cell of the nodes g_k = lo + k (hi − lo)/cells, k = 0 … cells
// (exact: the cell's share of S over its width), S′ at the nodes from them, and the steps of S
// in each cell.
//
// Why cell means and not S′ at the nodes: S′ sampled at the nodes sees a narrow tent (a facet
// nearly lying in the Mach plane, whose S rises within less than a cell) only when a node falls
// inside it — then as a spike of height 2A/(f₃ − f₁), otherwise not at all, so D(θ) jumps from
// one roll angle to the next. The cell mean keeps every triangle's whole area in S at any cell
// size (S at the nodes is exact), and it nests: the mean over two cells is the mean of their
// means, so coarser grids come from the same pass (docs/method.md §4.3).
struct SlopeGrid {
  double lo = 0.0;                // first node, m
  double hi = 0.0;                // last node, m
  double tail = HUGE_VAL;         // m: faces lying in the plane at or after this station are
                                  // the model's base: the curve continues at the base area
                                  // (a constant-area wake), so they are not steps of S
  std::vector<double> average;    // mean S′ over cell j, (S(g_{j+1}) − S(g_j))/cell, m (cells
                                  // values; steps of S from faces in the plane not included)
  std::vector<double> slope;      // S′ at node g_k: the mean over the two cells that meet
                                  // there (S(g_{k+1}) − S(g_{k−1}))/(2 cell), m (cells + 1)
  // Per cell, each empty until the first such face or edge is met:
  std::vector<double> area_step;    // net step of S from faces lying in the plane, m²
  std::vector<double> kink;         // net step of S′ from edges lying in the plane, m
  std::vector<double> kink_moment;  // Σ step × its position in the cell (0 … 1), m
  std::vector<double> kink_extent;  // summed station extents of those triangles, m
  std::vector<int> kink_count;      // how many triangles carry such an edge
  double tail_area = 0.0;           // m²: S just upstream of `tail` (the base area; 0 when
                                    // no tail is set)
};

// An empty grid of `cells` >= 1 cells over [lo, hi] (lo < hi), no tail set.
SlopeGrid make_slope_grid(double lo, double hi, int cells);

// A mesh prepared for adding its S′ to many grids (one per Mach number and roll angle): the
// triangles with a non-zero y–z projected area and those areas. A class because that
// preparation is reused across roll angles. Thread-safe for concurrent const calls.
class SlopeMesh {
 public:
  // `mesh`: closed and oriented outward, or a set of closed shells whose areas add. Its
  // positions are copied.
  explicit SlopeMesh(const Mesh& mesh);

  // The same as SlopeMesh(concatenate({*mesh, extra})) — same triangles in the same order, so
  // bitwise the same grids — but `mesh`'s positions are read where they are, not copied: `mesh`
  // must outlive this object and stay unchanged (a SectionEngine's mesh, say). `extra` (end
  // tubes, often empty) is copied. Saves 24 bytes a vertex and the concatenated copy.
  SlopeMesh(const Mesh* mesh, const Mesh& extra);

  // Adds the S′ of the Mach-plane area curve to `grid`. Triangles beyond the grid add only what
  // reaches its nodes. A triangle whose stations span less than 1e-12 of the grid length lies
  // in the plane (its projected area is a step of S in its cell); an edge whose stations differ
  // by less than that lies in the plane (its triangle's tent steps there: grid.kink).
  void add_slopes(const MachPlanes& planes, SlopeGrid& grid) const;

 private:
  struct Part {
    std::shared_ptr<const std::vector<Vec3>> positions;  // owned, or borrowed (no owner)
    std::vector<Tri> triangles;      // those with a non-zero projected area
    std::vector<double> twice_area;  // twice their signed y–z projected areas, m²
  };
  static Part make_part(std::shared_ptr<const std::vector<Vec3>> positions,
                        const std::vector<Tri>& triangles);
  std::vector<Part> parts_;  // their triangles added in this order
};

// SlopeMesh(mesh).add_slopes(planes, grid), for a single use.
void add_mesh_slopes(const Mesh& mesh, const MachPlanes& planes, SlopeGrid& grid);

// The cell means of S′ (grid.average), m. With `spread_kinks` the net S′ step of the edges
// lying in the plane in each cell is spread evenly over the mean extent of their triangles: the
// step is taken out and a ramp of that width centred on the cell put in (clipped at the ends;
// one cell or less: left in place). `widest`, when given, receives the largest width used, m
// (0: none).
std::vector<double> slope_averages(const SlopeGrid& grid, bool spread_kinks = true,
                                   double* widest = nullptr);

// The steps of S′ from cell means `avg`, m, as many as `avg`: S′ is taken piecewise linear
// through the means at the cell centres (0 beyond the ends), and aⱼ = avg[j] − avg[j − 1] is its
// step from the centre of cell j − 1 to that of cell j, i.e. over the cell-wide interval centred
// on node g_j (the fall after the last cell, 0 when the grid reaches beyond the curve, is added
// to the last step so that the steps sum to 0).
std::vector<double> steps_from_averages(std::span<const double> avg);

// Cell means on the grid with half as many cells (means of neighbours); `avg` has an even size.
std::vector<double> coarsen_averages(std::span<const double> avg);

// steps_from_averages(slope_averages(grid, spread_kinks, widest)).
std::vector<double> slope_steps(const SlopeGrid& grid, bool spread_kinks = true,
                                double* widest = nullptr);

// The largest area of the curve at the grid's nodes, m², from the cell means (exact; steps of
// S not included): a scale for tolerances.
double largest_area(const SlopeGrid& grid);

// True when a step of S (faces lying in the plane, not cancelled by others) exceeds 1e-9 of
// `scale` (m²); `cell` receives the first such cell.
bool has_area_step(const SlopeGrid& grid, double scale, std::size_t* cell = nullptr);

// Sums of neighbouring steps (`steps` has an even size): the S″ integrals over pairs of cells.
// (The drag's coarser grids come from coarsen_averages, which nests exactly.)
std::vector<double> coarsen_steps(std::span<const double> steps);

// D/q (m²) of the curve whose S″ has the cell integrals `steps` on a uniform grid (the cell
// width cancels when the steps sum to zero, i.e. S′ = 0 at both ends). Empty: 0.
double von_karman_drag_area(std::span<const double> steps);

// Per-cell shares of D/q(B) − D/q(A) for two step arrays on the same grid (same size):
// −(1/2π) (b − a)ᵢ [K (a + b)]ᵢ, m². They add up to the difference exactly (K is symmetric).
std::vector<double> drag_change_by_cell(std::span<const double> steps_a, std::span<const double> steps_b);

// K a: the cell-averaged logarithm applied to `steps` (the Toeplitz operator of the drag form,
// by FFT), one value per step; −(1/2π) bᵀ(K a) is the bilinear form whose diagonal is
// von_karman_drag_area (both arrays summing to 0).
std::vector<double> log_kernel_apply(std::span<const double> steps);

// The functional derivative of D/q (the form above) with respect to volume added at each node
// g_j, j = 0 … steps.size() − 1, in 1/m: ∂(D/q)/∂V at g_j for S raised by δV/`cell` at that
// node alone. With c = K a (the same Toeplitz operator, by FFT) and a_j the second difference
// of S at the nodes over `cell`, it is −(1/π)(c_{j−1} − 2c_j + c_{j+1})/cell², the discrete
// form of g(X) = −(1/π) d²/dX² ∫ S″(ξ) ln|X − ξ| dξ (docs/method.md §8.7). The two end nodes
// copy their neighbours (the grid's margins hold no surface). Empty: empty.
std::vector<double> drag_gradient(std::span<const double> steps, double cell);

// K_m = ∫₀¹∫₀¹ ln|m + u − v| du dv, the cell-averaged logarithm for cells m apart (unit width).
double cell_log_kernel(int m);

}  // namespace machcut
