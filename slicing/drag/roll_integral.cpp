#include "machcut/drag/roll_integral.h"

#include <algorithm>
#include <array>
#include <cstdint>
#include <cmath>
#include <map>
#include <numbers>

namespace machcut {

namespace {

// Gauss–Kronrod (7, 15) nodes on [−1, 1] (positive half, xgk[7] = 0) and weights, as
// tabulated in QUADPACK (Piessens et al., 1983). Gauss nodes are xgk[1], xgk[3], xgk[5], 0.
constexpr double kXgk[8] = {0.991455371120812639206854697526329, 0.949107912342758524526189684047851,
                            0.864864423359769072789712788640926, 0.741531185599394439863864773280788,
                            0.586087235467691130294144845693013, 0.405845151377397166906606412076961,
                            0.207784955007898467600689403773245, 0.0};
constexpr double kWgk[8] = {0.022935322010529224963732008058970, 0.063092092629978553290700663189204,
                            0.104790010322250183839876322541518, 0.140653259715525918745189590510238,
                            0.169004726639267902826583426598550, 0.190350578064785409913256402421014,
                            0.204432940075298892414161999234649, 0.209482141084727828012999174891714};
constexpr double kWg[4] = {0.129484966168869693270611432679082, 0.279705391489276667901467771423780,
                           0.381830050505118944950369775488975, 0.417959183673469387755102040816327};

// One quadrature interval [t0, t1] of the mapped variable of piece [a, b] (degrees).
struct Interval {
  double a = 0.0, b = 0.0;
  double t0 = 0.0, t1 = 1.0;
  double value = 0.0;          // ∫ D dθ over the interval, m²·deg
  double error = 0.0;          // |Kronrod − Gauss|, m²·deg
  double station_value = 0.0;  // ∫ station_error dθ, m²·deg
  double coarse_value = 0.0;   // ∫ coarse_error dθ, m²·deg
  std::array<double, 4> increment_values{};  // ∫ increments dθ, m²·deg
};

// θ(t) = a + (b − a)(3t² − 2t³) and its derivative.
double map_theta(const Interval& iv, double t) { return iv.a + (iv.b - iv.a) * t * t * (3 - 2 * t); }
double map_slope(const Interval& iv, double t) { return (iv.b - iv.a) * 6 * t * (1 - t); }

// The 15 Kronrod nodes of an interval in t.
std::array<double, 15> nodes_t(const Interval& iv) {
  std::array<double, 15> t{};
  const double c = 0.5 * (iv.t0 + iv.t1), h = 0.5 * (iv.t1 - iv.t0);
  for (int k = 0; k < 7; ++k) {
    t[2 * k] = c - h * kXgk[k];
    t[2 * k + 1] = c + h * kXgk[k];
  }
  t[14] = c;
  return t;
}

// Kronrod and Gauss sums from the 15 samples (same order as nodes_t).
void apply_rule(Interval& iv, const RollSample* s) {
  const std::array<double, 15> t = nodes_t(iv);
  const double h = 0.5 * (iv.t1 - iv.t0);
  double k = 0.0, g = 0.0, st = 0.0, co = 0.0;
  std::array<double, 4> inc{};
  for (int i = 0; i < 15; ++i) {
    const int j = i == 14 ? 7 : i / 2;
    const double jac = map_slope(iv, t[static_cast<std::size_t>(i)]);
    k += kWgk[j] * s[i].drag_area * jac;
    st += kWgk[j] * s[i].station_error * jac;
    co += kWgk[j] * s[i].coarse_error * jac;
    for (std::size_t l = 0; l < inc.size(); ++l) inc[l] += kWgk[j] * s[i].increments[l] * jac;
    if (j % 2 == 1 && j < 7) g += kWg[j / 2] * s[i].drag_area * jac;
    if (j == 7) g += kWg[3] * s[i].drag_area * jac;
  }
  iv.value = h * k;
  iv.station_value = h * st;
  iv.coarse_value = h * co;
  for (std::size_t l = 0; l < inc.size(); ++l) iv.increment_values[l] = h * inc[l];
  iv.error = h * std::fabs(k - g);
}

struct Domain {
  double lo = 0.0, hi = 0.0, factor = 1.0;  // θ range (deg) and symmetry multiplicity
};

Domain domain_of(RollSymmetry s) {
  switch (s) {
    case RollSymmetry::left_right: return {-90.0, 90.0, 2.0};
    case RollSymmetry::up_down: return {0.0, 180.0, 2.0};
    case RollSymmetry::both: return {0.0, 90.0, 4.0};
    case RollSymmetry::none: break;
  }
  return {-90.0, 270.0, 1.0};
}

// Break angles and their mirror images folded into the open domain, sorted, deduplicated.
std::vector<double> folded_breaks(const std::vector<double>& breaks, RollSymmetry s,
                                  const Domain& d) {
  std::vector<double> out;
  for (double b : breaks) {
    std::vector<double> images{b};
    if (s == RollSymmetry::left_right || s == RollSymmetry::both) images.push_back(180.0 - b);
    if (s == RollSymmetry::up_down || s == RollSymmetry::both) images.push_back(-b);
    if (s == RollSymmetry::both) images.push_back(180.0 + b);
    for (double im : images)
      for (int k = -2; k <= 2; ++k) {
        const double v = im + 360.0 * k;
        if (v > d.lo + 1e-9 && v < d.hi - 1e-9) out.push_back(v);
      }
  }
  std::sort(out.begin(), out.end());
  out.erase(std::unique(out.begin(), out.end(), [](double p, double q) { return q - p < 1e-9; }),
            out.end());
  return out;
}

// Initial intervals: the pieces between breaks, split so there are at least `min_pieces`.
std::vector<Interval> initial_intervals(const std::vector<double>& cuts, int min_pieces) {
  std::vector<Interval> out;
  const double total = cuts.back() - cuts.front();
  for (std::size_t i = 0; i + 1 < cuts.size(); ++i) {
    const double len = cuts[i + 1] - cuts[i];
    const int k = std::max(1, static_cast<int>(std::ceil(min_pieces * len / total - 1e-9)));
    for (int j = 0; j < k; ++j) {
      Interval iv;
      iv.a = cuts[i];
      iv.b = cuts[i + 1];
      iv.t0 = static_cast<double>(j) / k;
      iv.t1 = static_cast<double>(j + 1) / k;
      out.push_back(iv);
    }
  }
  return out;
}

// Evaluates the rule on every interval of `batch` with one provider call.
bool evaluate(const RollProvider& provider, std::vector<Interval>& batch, RollIntegral& result) {
  std::vector<double> rolls;
  rolls.reserve(15 * batch.size());
  for (const Interval& iv : batch)
    for (double t : nodes_t(iv)) rolls.push_back(map_theta(iv, t));
  const std::vector<RollSample> s = provider(rolls);
  if (s.size() != rolls.size()) {
    result.ok = false;
    result.problem = "roll provider returned the wrong number of samples";
    return false;
  }
  for (const RollSample& r : s)
    if (!r.ok || !std::isfinite(r.drag_area)) {
      result.ok = false;
      result.problem = r.problem.empty() ? "non-finite drag at a roll angle" : r.problem;
      return false;
    }
  for (std::size_t i = 0; i < batch.size(); ++i) apply_rule(batch[i], &s[15 * i]);
  result.samples.insert(result.samples.end(), s.begin(), s.end());
  result.evaluations += static_cast<int>(s.size());
  return true;
}

void summarise(const std::vector<Interval>& ivs, const Domain& d, RollIntegral& r) {
  double v = 0.0, e = 0.0, st = 0.0, co = 0.0;
  std::array<double, 4> inc{};
  for (const Interval& iv : ivs) {
    v += iv.value;
    e += iv.error;
    st += iv.station_value;
    co += iv.coarse_value;
    for (std::size_t l = 0; l < inc.size(); ++l) inc[l] += iv.increment_values[l];
  }
  const double scale = d.factor / 360.0;  // (1/2π) ∫ dθ with θ in degrees
  r.drag_area = scale * v;
  r.quadrature_error = scale * e;
  r.station_error = scale * st;
  r.coarse_error = scale * co;
  for (std::size_t l = 0; l < inc.size(); ++l) r.increments[l] = scale * inc[l];
  r.pieces = static_cast<int>(ivs.size());
}

// Splits the intervals holding the larger half of the total error (at most `max_splits`);
// removes them from `ivs` and returns their halves (to be evaluated).
std::vector<Interval> split_worst(std::vector<Interval>& ivs, std::size_t max_splits) {
  std::sort(ivs.begin(), ivs.end(), [](const Interval& p, const Interval& q) { return p.error > q.error; });
  double total = 0.0;
  for (const Interval& iv : ivs) total += iv.error;
  std::vector<Interval> children;
  double taken = 0.0;
  std::size_t n = 0;
  while (n < ivs.size() && n < max_splits && (n == 0 || taken < 0.5 * total) &&
         ivs[n].t1 - ivs[n].t0 > 1e-12) {
    taken += ivs[n].error;
    Interval left = ivs[n], right = ivs[n];
    left.t1 = right.t0 = 0.5 * (ivs[n].t0 + ivs[n].t1);
    children.push_back(left);
    children.push_back(right);
    ++n;
  }
  ivs.erase(ivs.begin(), ivs.begin() + static_cast<std::ptrdiff_t>(n));
  return children;
}

}  // namespace

const char* symmetry_name(RollSymmetry s) {
  switch (s) {
    case RollSymmetry::left_right: return "left-right";
    case RollSymmetry::up_down: return "up-down";
    case RollSymmetry::both: return "left-right and up-down";
    case RollSymmetry::none: break;
  }
  return "none";
}

RollIntegral integrate_rolls(const RollProvider& provider, const RollIntegralOptions& o) {
  RollIntegral result;
  const Domain d = domain_of(o.symmetry);
  std::vector<double> cuts = folded_breaks(o.breaks_deg, o.symmetry, d);
  cuts.insert(cuts.begin(), d.lo);
  cuts.push_back(d.hi);
  std::vector<Interval> ivs = initial_intervals(cuts, std::max(1, o.min_pieces));
  if (!evaluate(provider, ivs, result)) return result;
  for (;;) {
    summarise(ivs, d, result);
    if (o.progress) o.progress(result.evaluations);
    const double target = std::max({o.rel_tol * std::fabs(result.drag_area), o.abs_tol,
                                    o.abs_tol_of ? o.abs_tol_of(result) : 0.0});
    if (result.quadrature_error <= target) {
      result.converged = true;
      break;
    }
    const int budget = (o.max_evaluations - result.evaluations) / 30;
    if (budget < 1) break;
    std::vector<Interval> children = split_worst(ivs, static_cast<std::size_t>(budget));
    if (children.empty()) break;
    if (!evaluate(provider, children, result)) return result;
    ivs.insert(ivs.end(), children.begin(), children.end());
  }
  summarise(ivs, d, result);
  std::sort(result.samples.begin(), result.samples.end(),
            [](const RollSample& p, const RollSample& q) { return p.roll_deg < q.roll_deg; });
  return result;
}

namespace {

Vec3 unit(Vec3 v) {
  const double n = norm(v);
  return n > 0.0 ? (1.0 / n) * v : Vec3{};
}

// Sharp edges (two faces meeting at more than the threshold) as (direction, length), the
// direction's sign fixed so that the larger-magnitude component ordering is stable. An edge used
// by more than two faces is taken between its first and its last face.
//
// The edges are found by bucketing the half-edges by their lower vertex (counting sort), 8 bytes
// a half-edge plus 4 a vertex: a hash map of the edges took 40 bytes a node and its bucket array
// besides, 383 MB of the 1.05 GB peak of `drag` on a 5M-triangle body (heaptrack, issue 13).
std::vector<std::pair<Vec3, double>> sharp_edges(const Mesh& mesh, double min_dihedral_deg) {
  std::vector<std::uint32_t> offset(mesh.positions.size() + 1, 0);
  for (const Tri& t : mesh.triangles)
    for (int k = 0; k < 3; ++k) ++offset[std::min(t[k], t[(k + 1) % 3]) + 1];
  for (std::size_t v = 1; v < offset.size(); ++v) offset[v] += offset[v - 1];
  std::vector<std::pair<std::uint32_t, std::uint32_t>> entry(3 * mesh.triangles.size());  // (upper vertex, face)
  {
    std::vector<std::uint32_t> fill(offset.begin(), offset.end() - 1);
    for (std::size_t f = 0; f < mesh.triangles.size(); ++f)
      for (int k = 0; k < 3; ++k) {
        const std::uint32_t a = mesh.triangles[f][k], b = mesh.triangles[f][(k + 1) % 3];
        entry[fill[std::min(a, b)]++] = {std::max(a, b), static_cast<std::uint32_t>(f)};
      }
  }
  auto normal = [&](std::uint32_t f) {
    const Tri& t = mesh.triangles[f];
    const Vec3* p = mesh.positions.data();
    return unit(cross(p[t[1]] - p[t[0]], p[t[2]] - p[t[0]]));
  };
  const double cos_min = std::cos(min_dihedral_deg * std::numbers::pi / 180.0);
  std::vector<std::pair<Vec3, double>> out;
  for (std::uint32_t a = 0; a + 1 < offset.size(); ++a) {
    const auto first = entry.begin() + offset[a], last = entry.begin() + offset[a + 1];
    std::sort(first, last);  // by upper vertex, then face: an edge's faces side by side
    for (auto run = first; run != last;) {
      auto end = run + 1;
      while (end != last && end->first == run->first) ++end;
      const bool boundary = end - run == 1;
      const std::uint32_t b = run->first, f0 = run->second, f1 = (end - 1)->second;
      run = end;
      if (boundary || dot(normal(f0), normal(f1)) > cos_min) continue;
      Vec3 d = mesh.positions[b] - mesh.positions[a];
      const double len = norm(d);
      if (len == 0.0) continue;
      d = (1.0 / len) * d;
      if (d.x < 0 || (d.x == 0 && (d.y < 0 || (d.y == 0 && d.z < 0)))) d = -1.0 * d;
      out.push_back({d, len});
    }
  }
  return out;
}

}  // namespace

std::vector<double> singular_roll_angles(const Mesh& mesh, double mach, double min_dihedral_deg,
                                         double min_length_frac, int max_breaks) {
  const double beta = std::sqrt(std::max(0.0, mach * mach - 1.0));
  if (beta <= 0.0 || mesh.triangles.empty()) return {};
  const Box3 box = bounding_box(mesh);
  const double min_length = min_length_frac * (box.hi.x - box.lo.x);
  // Group directions in 0.5° bins of (elevation from the y-z plane, azimuth).
  std::map<std::pair<long, long>, std::pair<Vec3, double>> bins;
  for (const auto& [d, len] : sharp_edges(mesh, min_dihedral_deg)) {
    const double el = std::asin(std::clamp(d.x, -1.0, 1.0)) * 180.0 / std::numbers::pi;
    const double az = std::atan2(d.z, d.y) * 180.0 / std::numbers::pi;
    auto& bin = bins[{std::lround(2 * el), std::lround(2 * az)}];
    bin.first = bin.first + len * d;
    bin.second += len;
  }
  std::vector<std::pair<double, double>> found;  // (length, angle)
  for (const auto& [key, bin] : bins) {
    if (bin.second < min_length) continue;
    const Vec3 d = unit(bin.first);
    // dₓ = β ρ cos(θ − φ), ρ = √(d_y² + d_z²), φ = atan2(d_z, d_y) (docs/method.md §5.3).
    const double rho = std::hypot(d.y, d.z);
    if (rho <= 0.0) continue;
    const double c = d.x / (beta * rho);
    if (std::fabs(c) > 1.0) continue;
    const double phi = std::atan2(d.z, d.y), w = std::acos(c);
    for (double t : {phi + w, phi - w}) {
      double deg = std::fmod(t * 180.0 / std::numbers::pi, 360.0);
      if (deg < 0) deg += 360.0;
      found.push_back({bin.second, deg});
    }
  }
  std::sort(found.begin(), found.end(), [](auto& p, auto& q) { return p.first > q.first; });
  std::vector<double> out;
  for (const auto& f : found)
    if (static_cast<int>(out.size()) < max_breaks) out.push_back(f.second);
  std::sort(out.begin(), out.end());
  return out;
}

RollSymmetry detect_roll_symmetry(const std::function<std::vector<double>(double)>& curve_at,
                                  double rel_tol) {
  bool lr = true, ud = true;
  auto same = [&](const std::vector<double>& p, const std::vector<double>& q) {
    double peak = 0.0, diff = 0.0;
    for (std::size_t i = 0; i < p.size() && i < q.size(); ++i) {
      peak = std::max(peak, std::fabs(p[i]));
      diff = std::max(diff, std::fabs(p[i] - q[i]));
    }
    return p.size() == q.size() && diff <= rel_tol * peak;
  };
  // Generic angles: no symmetry of a real model maps them onto each other by accident.
  for (double t : {23.7, 61.3, 137.9}) {
    const std::vector<double> c = curve_at(t);
    if (lr) lr = same(c, curve_at(180.0 - t));
    if (ud) ud = same(c, curve_at(-t));
  }
  if (lr && ud) return RollSymmetry::both;
  if (lr) return RollSymmetry::left_right;
  if (ud) return RollSymmetry::up_down;
  return RollSymmetry::none;
}

}  // namespace machcut
