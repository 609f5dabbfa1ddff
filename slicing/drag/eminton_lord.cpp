#include "machcut/drag/eminton_lord.h"

#include <Eigen/Dense>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <map>
#include <memory>
#include <mutex>
#include <numbers>

namespace machcut {

namespace {

struct Samples {
  std::vector<double> u;  // interior fractions of the length
  std::vector<double> s;  // areas there, m²
};

// Interior stations of (x, area) as fractions of the length, skipping stations that
// (nearly) coincide with the previous kept one or with the ends.
Samples interior_samples(std::span<const double> x, std::span<const double> area, double x0,
                         double l) {
  Samples out;
  double last = 0.0;
  for (std::size_t i = 1; i + 1 < x.size(); ++i) {
    const double u = (x[i] - x0) / l;
    if (u - last <= 1e-9 || 1.0 - u <= 1e-9) continue;
    out.u.push_back(u);
    out.s.push_back(area[i]);
    last = u;
  }
  return out;
}

// The Eminton–Lord matrix G(uᵢ, uⱼ) depends only on the station fractions, not on the areas,
// the length or the roll angle. A roll integral asks for the same fractions (cosine stations
// over each roll's own length) hundreds of times, so the factorised matrix is cached. The
// fractions are snapped to multiples of 2⁻⁴⁰ (a shift of at most 1e-12 of the length) so that
// the key is exact and the result deterministic whichever roll asks first.
struct Factorised {
  std::vector<double> u;
  Eigen::LDLT<Eigen::MatrixXd> ldlt;
};

constexpr double kSnap = 1099511627776.0;  // 2⁴⁰

std::shared_ptr<const Factorised> factorised_kernel(const std::vector<double>& u_in) {
  std::vector<std::int64_t> key(u_in.size());
  for (std::size_t i = 0; i < u_in.size(); ++i) key[i] = std::llround(u_in[i] * kSnap);
  static std::mutex mutex;
  static std::map<std::vector<std::int64_t>, std::shared_ptr<const Factorised>> cache;
  {
    const std::lock_guard<std::mutex> lock(mutex);
    const auto it = cache.find(key);
    if (it != cache.end()) return it->second;
  }
  auto f = std::make_shared<Factorised>();
  const std::size_t n = key.size();
  for (std::int64_t k : key) f->u.push_back(static_cast<double>(k) / kSnap);
  Eigen::MatrixXd g(n, n);
  for (std::size_t i = 0; i < n; ++i)
    for (std::size_t j = 0; j <= i; ++j) {
      const double gij = eminton_lord_kernel(f->u[i], f->u[j]);
      g(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) = gij;
      g(static_cast<Eigen::Index>(j), static_cast<Eigen::Index>(i)) = gij;
    }
  f->ldlt.compute(g);
  const std::lock_guard<std::mutex> lock(mutex);
  if (cache.size() >= 256) cache.clear();  // bounded: station sets are few in practice
  cache.emplace(std::move(key), f);
  return f;
}

bool all_finite(std::span<const double> v) {
  return std::all_of(v.begin(), v.end(), [](double a) { return std::isfinite(a); });
}

}  // namespace

double karman_ogive_shape(double u) {
  u = std::clamp(u, 0.0, 1.0);
  const double phi = std::acos(1.0 - 2.0 * u);
  return (phi - std::sin(phi) * std::cos(phi)) / std::numbers::pi;
}

double eminton_lord_kernel(double u, double v) {
  // G(u, v) = −(u − v)² k + 2(u + v − 2uv) σ (Eminton 1955; the closed form of
  // Σₙ≥₂ Iₙ(φ)Iₙ(ψ)/n, checked against the series in tests/test_drag.cpp).
  const double sigma = std::sqrt(std::max(0.0, u * v * (1.0 - u) * (1.0 - v)));
  const double a = std::sqrt(std::max(0.0, u * (1.0 - v)));
  const double b = std::sqrt(std::max(0.0, v * (1.0 - u)));
  const double d = u - v;
  double log_term = 0.0;
  if (d != 0.0 && a + b > 0.0) log_term = d * d * std::log(std::fabs((a + b) / (a - b)));
  return -log_term + 2.0 * (u + v - 2.0 * u * v) * sigma;
}

EmintonLordFit eminton_lord_fit(std::span<const double> x, std::span<const double> area) {
  EmintonLordFit fit;
  if (x.size() < 2 || x.size() != area.size()) {
    fit.problem = "need at least two stations with one area each";
    return fit;
  }
  if (!all_finite(x) || !all_finite(area)) {
    fit.problem = "non-finite station or area";
    return fit;
  }
  fit.x0 = x.front();
  fit.length = x.back() - x.front();
  fit.base_area = area.back();
  if (!(fit.length > 0.0)) {
    fit.problem = "zero length";
    return fit;
  }
  const Samples smp = interior_samples(x, area, fit.x0, fit.length);
  const std::size_t n = smp.u.size();
  const double l2 = fit.length * fit.length;
  // The von Kármán ogive term carries the base area (A₁ of the sine series).
  fit.drag_area = 4.0 * fit.base_area * fit.base_area / (std::numbers::pi * l2);
  fit.mu.assign(n, 0.0);
  if (n == 0) {
    fit.ok = true;
    return fit;
  }
  const std::shared_ptr<const Factorised> system = factorised_kernel(smp.u);
  fit.u = system->u;
  Eigen::VectorXd r(n);
  for (std::size_t i = 0; i < n; ++i)
    r(static_cast<Eigen::Index>(i)) = smp.s[i] - fit.base_area * karman_ogive_shape(fit.u[i]);
  const Eigen::VectorXd mu = system->ldlt.solve(r);
  if (system->ldlt.info() != Eigen::Success || !mu.allFinite()) {
    fit.problem = "the least-drag system is singular (stations too close together)";
    return fit;
  }
  for (std::size_t i = 0; i < n; ++i) fit.mu[i] = mu(static_cast<Eigen::Index>(i));
  // D/q = 4 S_B²/(π l²) + (π/l²) Σ μᵢ rᵢ (Eminton 1955).
  fit.drag_area += std::numbers::pi / l2 * mu.dot(r);
  fit.ok = std::isfinite(fit.drag_area);
  if (!fit.ok) fit.problem = "non-finite drag";
  return fit;
}

double eminton_lord_area(const EmintonLordFit& fit, double x) {
  if (!(fit.length > 0.0)) return 0.0;
  const double u = (x - fit.x0) / fit.length;
  if (u <= 0.0) return 0.0;
  if (u >= 1.0) return fit.base_area;
  double s = fit.base_area * karman_ogive_shape(u);
  for (std::size_t j = 0; j < fit.u.size(); ++j) s += fit.mu[j] * eminton_lord_kernel(u, fit.u[j]);
  return s;
}

}  // namespace machcut
