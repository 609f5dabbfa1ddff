#include "model_source.h"

#include <algorithm>
#include <cmath>
#include <numbers>

#include "machcut/common/errors.h"
#include "machcut/intake/import.h"

namespace machcut::view {

namespace {


// Closed body of revolution about the axis (x, yc, zc): radii r[i] at stations x[i]; pointed
// where r is 0, a flat cap otherwise. Outward, counter-clockwise triangles.
void add_revolution(Mesh& m, const std::vector<double>& x, const std::vector<double>& r,
                    double yc, double zc, int seg, std::uint32_t shell) {
  std::vector<std::uint32_t> first(x.size());
  for (std::size_t i = 0; i < x.size(); ++i) {
    first[i] = static_cast<std::uint32_t>(m.positions.size());
    const int count = r[i] == 0.0 ? 1 : seg;
    for (int j = 0; j < count; ++j) {
      const double a = 2.0 * std::numbers::pi * j / seg;
      m.positions.push_back({x[i], yc + r[i] * std::cos(a), zc + r[i] * std::sin(a)});
    }
  }
  auto at = [&](std::size_t i, int j) { return r[i] == 0.0 ? first[i] : first[i] + static_cast<std::uint32_t>(j % seg); };
  auto tri = [&](std::uint32_t a, std::uint32_t b, std::uint32_t c) {
    if (a == b || b == c || a == c) return;
    m.triangles.push_back({a, b, c});
    m.shell.push_back(shell);
  };
  for (std::size_t i = 0; i + 1 < x.size(); ++i)
    for (int j = 0; j < seg; ++j) {
      tri(at(i, j), at(i, j + 1), at(i + 1, j + 1));
      tri(at(i, j), at(i + 1, j + 1), at(i + 1, j));
    }
  for (std::size_t end : {std::size_t{0}, x.size() - 1}) {
    if (r[end] == 0.0) continue;
    const auto c = static_cast<std::uint32_t>(m.positions.size());
    m.positions.push_back({x[end], yc, zc});
    for (int j = 0; j < seg; ++j)
      end == 0 ? tri(c, at(end, j + 1), at(end, j)) : tri(c, at(end, j), at(end, j + 1));
  }
}

}  // namespace

std::shared_ptr<const Study> open_study(const std::vector<std::string>& files, const Controls& c,
                                        const StageProgress& progress) {
  StudyOptions o;
  o.files = files;
  o.units = c.units;
  o.flow = c.flow;
  o.up = c.up;
  o.sum = !c.unite;
  o.captures = c.captures;
  o.skip = c.skip;
  o.only = c.only;
  StudySetup setup = study_setup(o);
  setup.model.progress = progress;
  PreparedModel p = prepare_model(files, setup.model);
  return std::make_shared<const Study>(std::move(p), setup.ends);
}

PreparedModel generated_model(std::size_t triangles) {
  // Triangle count ≈ 2·rings·seg per body; the fuselage takes 80 %.
  const double budget = static_cast<double>(std::max<std::size_t>(triangles, 1000));
  const int seg = std::max(16, static_cast<int>(std::sqrt(budget * 0.8 / 2.0 / 1.5)));
  const int rings = std::max(8, static_cast<int>(budget * 0.8 / (2.0 * seg)));
  std::vector<double> x, r;
  const double length = 12.0;
  for (int i = 0; i <= rings; ++i) {
    const double xi = length * i / rings;
    const double xi_n = xi / length;
    // Ogive nose, parallel mid-body, gentle boattail to a flat base of radius 0.25 m.
    double rad = 0.6;
    if (xi_n < 0.3) rad = 0.6 * std::sqrt(std::sin(0.5 * std::numbers::pi * xi_n / 0.3));
    if (xi_n > 0.75) rad = 0.6 - 0.35 * (xi_n - 0.75) / 0.25;
    x.push_back(xi);
    r.push_back(i == 0 ? 0.0 : rad);
  }
  PreparedModel out;
  Mesh& m = out.mesh;
  add_revolution(m, x, r, 0.0, 0.0, seg, 0);
  const int pod_rings = std::max(4, rings / 10);
  std::vector<double> px, pr;
  for (int i = 0; i <= pod_rings; ++i) {
    const double u = static_cast<double>(i) / pod_rings;
    px.push_back(6.0 + 3.0 * u);
    pr.push_back(0.28 * std::sqrt(std::max(0.0, std::sin(std::numbers::pi * u))));
  }
  pr.front() = pr.back() = 0.0;
  add_revolution(m, px, pr, -2.2, -0.7, seg, 1);
  add_revolution(m, px, pr, 2.2, -0.7, seg, 2);
  m.shell_names = {"generated#fuselage", "generated#pod-left", "generated#pod-right"};
  out.analysis = m;
  out.health = check_health(m);  // closed and manifold by construction; the panel shows it
  out.united = false;
  out.usable = true;
  out.files = {"generated"};
  out.notes.push_back("generated test configuration (invented): fuselage and two pods");
  return out;
}

}  // namespace machcut::view
