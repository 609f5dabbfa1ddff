// Least-drag area distributions (Eminton 1956; Eminton & Lord 1956) — see optimum.h.
#include "machcut/design/optimum.h"

#include <Eigen/Dense>

#include <algorithm>
#include <cassert>
#include <cmath>
#include <numbers>
#include <sstream>

#include "machcut/drag/eminton_lord.h"
#include "machcut/common/errors.h"
#include "machcut/output/writers.h"

namespace machcut {
namespace {

const char* const kSource = "least-drag target";

double phi_of(double u) { return std::acos(std::clamp(1.0 - 2.0 * u, -1.0, 1.0)); }

// I₁(φ) and I₂(φ) of the integrated sine series (docs/method.md §4.2): S = (l/2) Σ Aₙ Iₙ(φ).
double i1(double phi) { return 0.5 * (phi - std::sin(phi) * std::cos(phi)); }
double i2(double phi) { return 0.5 * (std::sin(phi) - std::sin(3.0 * phi) / 3.0); }

// Σₙ≥₁ Iₙ(φ)Iₙ(ψ)/n: G plus the n = 1 term (which carries the base area).
// G is Eminton & Lord's closed-form kernel Σₙ≥₂ (eminton_lord.h).
double full_kernel(double u, double v) { return eminton_lord_kernel(u, v) + i1(phi_of(u)) * i1(phi_of(v)); }

// Coefficients of the volume row: V = (π l²/8) A₁ + (π l²/16) A₂ (integration by parts).
double vol_c1(double l) { return std::numbers::pi * l * l / 8.0; }
double vol_c2(double l) { return std::numbers::pi * l * l / 16.0; }

// Gram entry of a point row with the volume row: Σₙ c_pn c_Vn / n.
double point_volume_gram(double u, double l) {
  const double phi = phi_of(u);
  return 0.5 * l * (i1(phi) * vol_c1(l) + 0.5 * i2(phi) * vol_c2(l));
}

struct Rows {
  std::vector<double> u, value;  // point constraints
  std::optional<double> volume;
};

// Solves the Lagrange system M λ = b; fills the body's weights and D/q = (π/4) λᵀb.
void solve_rows(const Rows& rows, double l, LeastDragBody& body) {
  const std::size_t np = rows.u.size();
  const std::size_t n = np + (rows.volume ? 1 : 0);
  if (n == 0) throw InputError(kSource, "nothing fixed: give a volume, a base area or areas at stations");
  Eigen::MatrixXd m(n, n);
  Eigen::VectorXd b(n);
  for (std::size_t i = 0; i < np; ++i) {
    for (std::size_t j = 0; j < np; ++j) m(i, j) = 0.25 * l * l * full_kernel(rows.u[i], rows.u[j]);
    b(i) = rows.value[i];
  }
  if (rows.volume) {
    for (std::size_t i = 0; i < np; ++i) m(i, np) = m(np, i) = point_volume_gram(rows.u[i], l);
    m(np, np) = vol_c1(l) * vol_c1(l) + 0.5 * vol_c2(l) * vol_c2(l);
    b(np) = *rows.volume;
  }
  const Eigen::LDLT<Eigen::MatrixXd> ldlt(m);
  if (ldlt.info() != Eigen::Success || !(ldlt.rcond() > 1e-13))
    throw InputError(kSource, "the fixed areas contradict each other (system is singular)");
  const Eigen::VectorXd lambda = ldlt.solve(b);
  body.pin_u = rows.u;
  body.pin_weight.assign(lambda.data(), lambda.data() + np);
  body.volume_weight = rows.volume ? lambda(np) : 0.0;
  body.drag_area = 0.25 * std::numbers::pi * lambda.dot(b);
}

Rows base_rows(const LeastDragProblem& p) {
  Rows rows;
  for (const AreaPin& pin : p.pins) {
    const double u = (pin.x - p.x0) / p.length;
    if (!(u > 0.0 && u < 1.0)) throw InputError(kSource, "fixed station x = " + format_number(pin.x) + " m lies outside the body");
    if (!(pin.area >= 0.0)) throw InputError(kSource, "fixed area at x = " + format_number(pin.x) + " m is negative");
    if (p.max_area && pin.area > *p.max_area) throw InputError(kSource, "fixed area at x = " + format_number(pin.x) + " m exceeds the maximum area");
    rows.u.push_back(u);
    rows.value.push_back(pin.area);
  }
  if (p.base_area) {
    if (!(*p.base_area >= 0.0)) throw InputError(kSource, "base area is negative");
    rows.u.push_back(1.0);
    rows.value.push_back(*p.base_area);
  }
  rows.volume = p.volume;
  if (p.volume && !(*p.volume > 0.0)) throw InputError(kSource, "volume must be positive");
  std::vector<double> sorted = rows.u;
  std::sort(sorted.begin(), sorted.end());
  for (std::size_t i = 1; i < sorted.size(); ++i)
    if (sorted[i] - sorted[i - 1] < 1e-6) throw InputError(kSource, "two fixed stations coincide");
  return rows;
}

// Largest area on a fine grid (u, S).
std::pair<double, double> grid_max(const LeastDragBody& body, int n, double* min_area) {
  std::pair<double, double> best{0.0, -1e300};
  double lo = 1e300;
  for (int i = 0; i <= n; ++i) {
    const double u = static_cast<double>(i) / n;
    const double s = least_drag_area(body, body.x0 + u * body.length);
    if (s > best.second) best = {u, s};
    lo = std::min(lo, s);
  }
  if (min_area) *min_area = lo;
  return best;
}

// Active set for S ≤ S_max: fix the area at the worst station, solve again.
void enforce_max_area(const LeastDragProblem& p, Rows& rows, LeastDragBody& body) {
  const int kMaxIterations = 40;
  for (int it = 0; it < kMaxIterations; ++it) {
    const auto [u, s] = grid_max(body, 1000, nullptr);
    if (s <= *p.max_area * (1.0 + 1e-3)) return;
    const bool crowded = std::any_of(rows.u.begin(), rows.u.end(),
                                     [&](double v) { return std::abs(v - u) < 2e-3; });
    if (crowded) break;
    rows.u.push_back(u);
    rows.value.push_back(*p.max_area);
    solve_rows(rows, p.length, body);
    ++body.active_max_pins;
  }
  body.max_area_met = grid_max(body, 1000, nullptr).second <= *p.max_area * (1.0 + 1e-3);
}

}  // namespace

LeastDragBody least_drag_body(const LeastDragProblem& p) {
  if (!(p.length > 0.0) || !std::isfinite(p.length)) throw InputError(kSource, "body length must be positive");
  Rows rows = base_rows(p);
  LeastDragBody body;
  body.x0 = p.x0;
  body.length = p.length;
  solve_rows(rows, p.length, body);
  if (p.max_area) enforce_max_area(p, rows, body);
  grid_max(body, 1000, &body.min_area);
  body.base_area = least_drag_area(body, p.x0 + p.length);
  // Volume from the series: V = (π l²/8) A₁ + (π l²/16) A₂, with A₁ = 4 S_B/(π l).
  double a2 = 0.0;  // A₂ = Σₖ λₖ c_k2 / 2
  for (std::size_t k = 0; k < body.pin_u.size(); ++k) a2 += body.pin_weight[k] * 0.5 * p.length * i2(phi_of(body.pin_u[k])) / 2.0;
  a2 += body.volume_weight * vol_c2(p.length) / 2.0;
  body.volume = 0.5 * p.length * body.base_area + vol_c2(p.length) * a2;
  return body;
}

double least_drag_area(const LeastDragBody& body, double x) {
  const double l = body.length;
  const double u = std::clamp((x - body.x0) / l, 0.0, 1.0);
  const double phi = phi_of(u);
  double s = 0.0;
  for (std::size_t k = 0; k < body.pin_u.size(); ++k) s += body.pin_weight[k] * 0.25 * l * l * full_kernel(u, body.pin_u[k]);
  s += body.volume_weight * 0.5 * l * (vol_c1(l) * i1(phi) + 0.5 * vol_c2(l) * i2(phi));
  return s;
}

double sears_haack_area(double x0, double length, double volume, double x) {
  const double xi = (x - x0) / length;
  if (xi <= 0.0 || xi >= 1.0) return 0.0;
  const double s_max = 16.0 * volume / (3.0 * std::numbers::pi * length);
  return s_max * std::pow(4.0 * xi * (1.0 - xi), 1.5);
}

double sears_haack_drag_area(double length, double volume) {
  return 128.0 * volume * volume / (std::numbers::pi * std::pow(length, 4));
}

CurveMeasures measure_curve(const AreaCurve& c) {
  CurveMeasures m;
  const std::size_t n = std::min(c.x.size(), c.area.size());
  if (n < 2) return m;
  m.x0 = c.x.front();
  m.length = c.x[n - 1] - c.x.front();
  m.base_area = c.area[n - 1];
  for (std::size_t i = 0; i < n; ++i) {
    if (c.area[i] > m.max_area) { m.max_area = c.area[i]; m.x_max_area = c.x[i]; }
    if (i > 0) m.volume += 0.5 * (c.area[i] + c.area[i - 1]) * (c.x[i] - c.x[i - 1]);
  }
  return m;
}

Correction correction_to(const AreaCurve& curve, const LeastDragBody& body) {
  Correction c;
  const std::size_t n = std::min(curve.x.size(), curve.area.size());
  for (std::size_t i = 0; i < n; ++i) {
    const double s = curve.area[i];
    const double t = least_drag_area(body, curve.x[i]);
    c.x.push_back(curve.x[i]);
    c.area.push_back(s);
    c.target.push_back(t);
    c.delta_area.push_back(t - s);
    c.radius.push_back(std::sqrt(std::max(s, 0.0) / std::numbers::pi));
    c.delta_radius.push_back(std::sqrt(std::max(t, 0.0) / std::numbers::pi) - c.radius.back());
  }
  return c;
}

std::string correction_csv(const Correction& c) {
  std::ostringstream out;
  out << "x_m,area_m2,target_area_m2,delta_area_m2,equivalent_radius_m,delta_radius_m\n";
  for (std::size_t i = 0; i < c.x.size(); ++i)
    out << format_number(c.x[i]) << ',' << format_number(c.area[i]) << ',' << format_number(c.target[i]) << ','
        << format_number(c.delta_area[i]) << ',' << format_number(c.radius[i]) << ','
        << format_number(c.delta_radius[i]) << '\n';
  return out.str();
}

}  // namespace machcut
