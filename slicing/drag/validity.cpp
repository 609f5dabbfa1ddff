#include "machcut/drag/validity.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <numbers>
#include <numeric>
#include <unordered_map>

namespace machcut {

namespace {

constexpr double kDeg = 180.0 / std::numbers::pi;

// Closest point of triangle abc to p (Ericson, Real-Time Collision Detection, 2005, §5.1.5).
Vec3 closest_on_triangle(Vec3 p, Vec3 a, Vec3 b, Vec3 c) {
  const Vec3 ab = b - a, ac = c - a, ap = p - a;
  const double d1 = dot(ab, ap), d2 = dot(ac, ap);
  if (d1 <= 0 && d2 <= 0) return a;
  const Vec3 bp = p - b;
  const double d3 = dot(ab, bp), d4 = dot(ac, bp);
  if (d3 >= 0 && d4 <= d3) return b;
  const double vc = d1 * d4 - d3 * d2;
  if (vc <= 0 && d1 >= 0 && d3 <= 0) return a + (d1 / (d1 - d3)) * ab;
  const Vec3 cp = p - c;
  const double d5 = dot(ab, cp), d6 = dot(ac, cp);
  if (d6 >= 0 && d5 <= d6) return c;
  const double vb = d5 * d2 - d1 * d6;
  if (vb <= 0 && d2 >= 0 && d6 <= 0) return a + (d2 / (d2 - d6)) * ac;
  const double va = d3 * d6 - d5 * d4;
  if (va <= 0 && (d4 - d3) >= 0 && (d5 - d6) >= 0)
    return b + ((d4 - d3) / ((d4 - d3) + (d5 - d6))) * (c - b);
  const double denom = 1.0 / (va + vb + vc);
  return a + (vb * denom) * ab + (vc * denom) * ac;
}

struct UnionFind {
  std::vector<std::uint32_t> parent;
  explicit UnionFind(std::size_t n) : parent(n) { std::iota(parent.begin(), parent.end(), 0u); }
  std::uint32_t find(std::uint32_t v) {
    while (parent[v] != v) v = parent[v] = parent[parent[v]];
    return v;
  }
  void unite(std::uint32_t a, std::uint32_t b) { parent[find(a)] = find(b); }
};

Vec3 centroid(const Mesh& m, const Tri& t) {
  return (1.0 / 3.0) * (m.positions[t[0]] + m.positions[t[1]] + m.positions[t[2]]);
}

}  // namespace

double steep_limit_deg(double mach) {
  return std::min(std::asin(1.0 / std::max(1.0, mach)) * kDeg, 60.0);
}

std::vector<std::uint32_t> triangle_parts(const Mesh& mesh, const Mesh& parts) {
  std::vector<std::uint32_t> out(mesh.triangles.size(), 0);
  for (std::size_t t = 0; t < out.size() && t < mesh.shell.size(); ++t) out[t] = mesh.shell[t];
  if (parts.triangles.empty()) return out;
  std::fill(out.begin(), out.end(), 0u);
  // A uniform grid of buckets over the parts' triangles (each in every bucket its box meets).
  const Box3 box = bounding_box(parts);
  const double diag = norm(box.hi - box.lo);
  // Buckets of a few triangles' size on the surface: side³ ~ (area per triangle)^{3/2}.
  const double per_triangle = surface_area(parts) / static_cast<double>(parts.triangles.size());
  const double side = std::max(1e-9 * diag, 3.0 * std::sqrt(per_triangle));
  const auto n_of = [&](double extent) {
    return std::max<long>(1, static_cast<long>(std::ceil(extent / side)));
  };
  const long nx = n_of(box.hi.x - box.lo.x), ny = n_of(box.hi.y - box.lo.y),
             nz = n_of(box.hi.z - box.lo.z);
  auto cell = [&](double v, double lo, long n) {
    return std::clamp(static_cast<long>((v - lo) / side), 0L, n - 1);
  };
  std::unordered_map<long, std::vector<std::uint32_t>> buckets;
  for (std::uint32_t f = 0; f < parts.triangles.size(); ++f) {
    Box3 b;
    for (std::uint32_t v : parts.triangles[f]) expand(b, parts.positions[v]);
    for (long i = cell(b.lo.x, box.lo.x, nx); i <= cell(b.hi.x, box.lo.x, nx); ++i)
      for (long j = cell(b.lo.y, box.lo.y, ny); j <= cell(b.hi.y, box.lo.y, ny); ++j)
        for (long k = cell(b.lo.z, box.lo.z, nz); k <= cell(b.hi.z, box.lo.z, nz); ++k)
          buckets[(i * ny + j) * nz + k].push_back(f);
  }
  // A united triangle lies on the surface of the part it came from: the nearest part triangle
  // to its centroid. The centroid's own bucket holds every triangle whose box contains it; the
  // neighbours are searched only when none passes within rounding of it.
  const double on_surface = 1e-7 * diag;
  for (std::size_t t = 0; t < mesh.triangles.size(); ++t) {
    const Vec3 p = centroid(mesh, mesh.triangles[t]);
    const long ci = cell(p.x, box.lo.x, nx), cj = cell(p.y, box.lo.y, ny),
               ck = cell(p.z, box.lo.z, nz);
    double best = HUGE_VAL;
    for (long ring = 0; ring <= 3 && best > on_surface && (ring <= 1 || best == HUGE_VAL); ++ring)
      for (long i = ci - ring; i <= ci + ring; ++i)
        for (long j = cj - ring; j <= cj + ring; ++j)
          for (long k = ck - ring; k <= ck + ring; ++k) {
            if (i < 0 || j < 0 || k < 0 || i >= nx || j >= ny || k >= nz) continue;
            const auto it = buckets.find((i * ny + j) * nz + k);
            if (it == buckets.end()) continue;
            for (std::uint32_t f : it->second) {
              const Tri& q = parts.triangles[f];
              const Vec3 c = closest_on_triangle(p, parts.positions[q[0]], parts.positions[q[1]],
                                                 parts.positions[q[2]]);
              const double d = norm(p - c);
              if (d < best) {
                best = d;
                out[t] = f < parts.shell.size() ? parts.shell[f] : 0;
              }
            }
          }
  }
  return out;
}

std::vector<ValidityFeature> steep_features(const Mesh& mesh, double mach,
                                            const std::vector<std::uint32_t>& part_of,
                                            const std::vector<std::string>& part_names,
                                            const std::vector<bool>& skip) {
  const double limit = std::sin(steep_limit_deg(mach) / kDeg);
  const std::size_t nt = mesh.triangles.size();
  std::vector<char> steep(nt, 0);
  std::vector<double> frontal(nt, 0.0), nx(nt, 0.0);
  for (std::size_t t = 0; t < nt; ++t) {
    if (t < skip.size() && skip[t]) continue;
    const Tri& f = mesh.triangles[t];
    const Vec3 n = cross(mesh.positions[f[1]] - mesh.positions[f[0]],
                         mesh.positions[f[2]] - mesh.positions[f[0]]);
    const double len = norm(n);
    if (!(len > 0.0)) continue;
    nx[t] = n.x / len;
    frontal[t] = 0.5 * n.x;  // signed y–z projected area
    // Strictly steeper, with a margin of rounding: a face exactly at the limit is not counted.
    steep[t] = std::fabs(nx[t]) > limit * (1.0 + 1e-12) ? 1 : 0;
  }
  // Connected through shared vertices, within one part, facing the same way (up- or downstream).
  UnionFind groups(nt);
  std::unordered_map<std::uint64_t, std::uint32_t> first_at;  // (part, facing, vertex) → a triangle
  for (std::uint32_t t = 0; t < nt; ++t) {
    if (!steep[t]) continue;
    const std::uint64_t part = t < part_of.size() ? part_of[t] : 0;
    const std::uint64_t aft = nx[t] > 0.0 ? 1 : 0;
    for (std::uint32_t v : mesh.triangles[t]) {
      const auto [it, fresh] = first_at.try_emplace((part << 33) | (aft << 32) | v, t);
      if (!fresh) groups.unite(t, it->second);
    }
  }
  std::unordered_map<std::uint32_t, std::size_t> index;  // group root → feature
  std::vector<ValidityFeature> out;
  std::vector<std::uint32_t> part_of_feature;
  std::vector<double> upstream, surface;
  for (std::uint32_t t = 0; t < nt; ++t) {
    if (!steep[t]) continue;
    const auto [it, fresh] = index.try_emplace(groups.find(t), out.size());
    if (fresh) {
      out.emplace_back();
      out.back().x_from = HUGE_VAL;
      out.back().x_to = -HUGE_VAL;
      out.back().faces_upstream = false;
      const std::uint32_t part = t < part_of.size() ? part_of[t] : 0;
      part_of_feature.push_back(part);
      out.back().part = part < part_names.size() ? part_names[part] : "model";
      upstream.push_back(0.0);
      surface.push_back(0.0);
    }
    ValidityFeature& f = out[it->second];
    f.triangles.push_back(t);
    f.frontal_area += std::fabs(frontal[t]);
    upstream[it->second] += -frontal[t];  // > 0 where it faces upstream
    surface[it->second] += std::fabs(frontal[t]) / std::max(std::fabs(nx[t]), 1e-300);
    f.steepest_deg = std::max(f.steepest_deg, std::asin(std::min(1.0, std::fabs(nx[t]))) * kDeg);
    for (std::uint32_t v : mesh.triangles[t]) {
      f.x_from = std::min(f.x_from, mesh.positions[v].x);
      f.x_to = std::max(f.x_to, mesh.positions[v].x);
    }
  }
  for (std::size_t i = 0; i < out.size(); ++i) {
    out[i].faces_upstream = upstream[i] >= 0.0;
    out[i].mean_deg = surface[i];  // the surface area for now: inclination after merging
  }
  // Groups of one part, facing the same way, whose x ranges overlap are one feature (a ring of
  // coarse facets, a fin's leading edge broken by the union).
  for (bool merged = true; merged;) {
    merged = false;
    for (std::size_t i = 0; i < out.size() && !merged; ++i)
      for (std::size_t j = i + 1; j < out.size() && !merged; ++j) {
        if (part_of_feature[i] != part_of_feature[j] ||
            out[i].faces_upstream != out[j].faces_upstream)
          continue;
        if (out[j].x_from > out[i].x_to || out[i].x_from > out[j].x_to) continue;
        ValidityFeature& a = out[i];
        const ValidityFeature& b = out[j];
        const double up = (a.faces_upstream ? 1 : -1) * a.frontal_area +
                          (b.faces_upstream ? 1 : -1) * b.frontal_area;
        a.x_from = std::min(a.x_from, b.x_from);
        a.x_to = std::max(a.x_to, b.x_to);
        a.frontal_area += b.frontal_area;
        a.mean_deg += b.mean_deg;
        a.steepest_deg = std::max(a.steepest_deg, b.steepest_deg);
        a.faces_upstream = up >= 0.0;
        a.triangles.insert(a.triangles.end(), b.triangles.begin(), b.triangles.end());
        out.erase(out.begin() + static_cast<std::ptrdiff_t>(j));
        part_of_feature.erase(part_of_feature.begin() + static_cast<std::ptrdiff_t>(j));
        merged = true;
      }
  }
  for (ValidityFeature& f : out)
    f.mean_deg =
        f.mean_deg > 0.0 ? std::asin(std::min(1.0, f.frontal_area / f.mean_deg)) * kDeg : 0.0;
  std::sort(out.begin(), out.end(), [](const ValidityFeature& p, const ValidityFeature& q) {
    return p.frontal_area > q.frontal_area;
  });
  return out;
}

std::string validity_advice(const std::vector<ValidityFeature>& features, double mach,
                            bool resolution_limited) {
  if (features.empty()) return "";
  const bool shares = std::isfinite(features.front().drag_share);
  auto flat_front = [](const ValidityFeature& v) { return v.faces_upstream && v.mean_deg > 85.0; };
  // Without D/q (a step in S), the flat faces across the flow are what stops it.
  const auto worst =
      std::max_element(features.begin(), features.end(), [&](const auto& p, const auto& q) {
        if (shares) return std::fabs(p.drag_share) < std::fabs(q.drag_share);
        if (flat_front(p) != flat_front(q)) return flat_front(q);
        return p.frontal_area < q.frontal_area;
      });
  const ValidityFeature& f = *worst;
  char span[80];
  // A face normal to the flow lies at one station.
  if (std::fabs(f.x_to - f.x_from) < 5e-4 * std::max(1.0, std::fabs(f.x_from)))
    std::snprintf(span, sizeof span, "%.3g m", f.x_from);
  else
    std::snprintf(span, sizeof span, "%.3g–%.3g m", f.x_from, f.x_to);
  char where[400];
  std::snprintf(where, sizeof where,
                "%s at x = %s faces the flow more steeply than %.3g° (frontal area %.3g m²",
                f.part.c_str(), span, steep_limit_deg(mach), f.frontal_area);
  std::string s = where;
  if (shares) {
    char share[120];
    std::snprintf(share, sizeof share, ", %.0f%% of D/q", 100.0 * f.drag_share);
    s += share;
  }
  s += ")";
  if (features.size() > 1)
    s += " — the largest of " + std::to_string(features.size()) + " such features";
  s += ": ";
  if (flat_front(f))
    s += "if it is an intake, model it as flow-through (a capture); otherwise expect a blunt-body "
         "drag of the order of q times its frontal area, which linear theory does not give";
  else if (!f.faces_upstream)
    s += "fair the aft face (slopes inside the Mach angle) or end it as a flat base normal to the "
         "flow, which the wake closes";
  else
    s += "fair it (a nose or leading edge inside the Mach cone, facets fine enough to follow the "
         "shape), or expect a blunt-body drag that linear theory does not give";
  if (resolution_limited) {
    const auto grows = std::max_element(
        features.begin(), features.end(),
        [](const auto& p, const auto& q) { return std::fabs(p.growth) < std::fabs(q.growth); });
    s += "; the value depends on the cell size until this is done";
    if (grows != worst && std::fabs(grows->growth) > std::fabs(f.growth)) {
      char more[300];
      std::snprintf(more, sizeof more,
                    " (most of the growth with refinement comes from %s at x = %.3g–%.3g m)",
                    grows->part.c_str(), grows->x_from, grows->x_to);
      s += more;
    }
  }
  s += ".";
  return s;
}

}  // namespace machcut
