#include "test_support.h"

#include <array>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <numbers>
#include <sstream>
#include <sys/wait.h>
#include <unistd.h>

namespace machcut::test {

namespace {
// Flips every triangle when the mesh encloses negative volume (generators use one convention,
// this keeps the result outward whatever the parametrisation's handedness).
Mesh orient_outward(Mesh m) {
  if (signed_volume(m) < 0)
    for (Tri& t : m.triangles) std::swap(t[1], t[2]);
  return m;
}

}  // namespace

Mesh make_body_of_revolution(const std::vector<double>& x, const std::vector<double>& r,
                             int segments) {
  Mesh m;
  const std::size_t n = x.size();
  std::vector<std::vector<std::uint32_t>> ring(n);
  for (std::size_t i = 0; i < n; ++i) {
    if (r[i] == 0.0) {
      ring[i].assign(static_cast<std::size_t>(segments), static_cast<std::uint32_t>(m.positions.size()));
      m.positions.push_back({x[i], 0.0, 0.0});
      continue;
    }
    for (int j = 0; j < segments; ++j) {
      const double phi = 2.0 * std::numbers::pi * j / segments;
      ring[i].push_back(static_cast<std::uint32_t>(m.positions.size()));
      m.positions.push_back({x[i], r[i] * std::cos(phi), r[i] * std::sin(phi)});
    }
  }
  // Side: (i,j) (i,j+1) (i+1,j+1) (i+1,j) is counter-clockwise seen from outside.
  for (std::size_t i = 0; i + 1 < n; ++i)
    for (int j = 0; j < segments; ++j) {
      const std::size_t j1 = static_cast<std::size_t>((j + 1) % segments);
      const std::uint32_t a = ring[i][static_cast<std::size_t>(j)], b = ring[i][j1];
      const std::uint32_t c = ring[i + 1][j1], d = ring[i + 1][static_cast<std::size_t>(j)];
      if (a != b) m.triangles.push_back({a, b, c});
      if (c != d) m.triangles.push_back({a, c, d});
    }
  // Flat caps where the end radius is not zero.
  if (r.front() != 0.0) {
    const auto c = static_cast<std::uint32_t>(m.positions.size());
    m.positions.push_back({x.front(), 0.0, 0.0});
    for (int j = 0; j < segments; ++j)
      m.triangles.push_back({c, ring[0][static_cast<std::size_t>((j + 1) % segments)],
                             ring[0][static_cast<std::size_t>(j)]});
  }
  if (r.back() != 0.0) {
    const auto c = static_cast<std::uint32_t>(m.positions.size());
    m.positions.push_back({x.back(), 0.0, 0.0});
    for (int j = 0; j < segments; ++j)
      m.triangles.push_back({c, ring[n - 1][static_cast<std::size_t>(j)],
                             ring[n - 1][static_cast<std::size_t>((j + 1) % segments)]});
  }
  m.shell.assign(m.triangles.size(), 0);
  m.shell_names = {"body"};
  return m;
}

Mesh make_sphere(Vec3 c, double r, int rings, int segments) {
  std::vector<double> x, rad;
  for (int i = 0; i <= rings; ++i) {
    const double t = std::numbers::pi * i / rings;
    x.push_back(c.x - r * std::cos(t));
    rad.push_back(i == 0 || i == rings ? 0.0 : r * std::sin(t));
  }
  Mesh m = make_body_of_revolution(x, rad, segments);
  for (Vec3& p : m.positions) p = {p.x, p.y + c.y, p.z + c.z};
  m.shell_names = {"sphere"};
  return m;
}

Mesh body_with_area(const std::function<double(double)>& area_of_u, double l, int rings,
                    int segments) {
  constexpr double pi = 3.14159265358979323846;
  const double scale = std::sqrt(2 * pi / (segments * std::sin(2 * pi / segments)));
  std::vector<double> x, r;
  for (int i = 0; i <= rings; ++i) {
    const double u = 0.5 * (1 - std::cos(pi * i / rings));
    x.push_back(u * l);
    r.push_back(scale * std::sqrt(std::max(0.0, area_of_u(u)) / pi));
  }
  r.front() = 0.0;
  return make_body_of_revolution(x, r, segments);
}

Mesh make_slender_body(int rings, int segments, double wave) {
  std::vector<double> x, r;
  for (int i = 0; i < rings; ++i) {
    const double u = static_cast<double>(i) / (rings - 1);
    x.push_back(30.0 * u);
    const double sh = std::pow(4 * u * (1 - u), 0.75);
    r.push_back(i == 0 || i == rings - 1 ? 0.0 : 1.5 * sh * (1 + wave * std::sin(40 * u)));
  }
  return make_body_of_revolution(x, r, segments);
}

Mesh make_box(Vec3 lo, Vec3 hi) {
  Mesh m;
  for (int i = 0; i < 8; ++i)
    m.positions.push_back({(i & 1) ? hi.x : lo.x, (i & 2) ? hi.y : lo.y, (i & 4) ? hi.z : lo.z});
  const int quads[6][4] = {{0, 2, 6, 4}, {1, 5, 7, 3}, {0, 4, 5, 1},
                           {2, 3, 7, 6}, {0, 1, 3, 2}, {4, 6, 7, 5}};
  for (const auto& q : quads) {
    m.triangles.push_back({static_cast<std::uint32_t>(q[0]), static_cast<std::uint32_t>(q[1]),
                           static_cast<std::uint32_t>(q[2])});
    m.triangles.push_back({static_cast<std::uint32_t>(q[0]), static_cast<std::uint32_t>(q[2]),
                           static_cast<std::uint32_t>(q[3])});
  }
  m.shell.assign(m.triangles.size(), 0);
  m.shell_names = {"box"};
  return orient_outward(m);
}

Mesh make_box_with_sliver(Vec3 lo, Vec3 hi) {
  Mesh box = make_box(lo, hi);
  const Tri t = box.triangles[0];
  const std::uint32_t a = t[0], b = t[1];
  std::size_t nb = 0;
  for (std::size_t i = 1; i < box.triangles.size(); ++i)
    for (int k = 0; k < 3; ++k)
      if (box.triangles[i][k] == b && box.triangles[i][(k + 1) % 3] == a) nb = i;
  const Tri n = box.triangles[nb];
  int k = 0;
  while (!(n[k] == b && n[(k + 1) % 3] == a)) ++k;
  const std::uint32_t d = n[(k + 2) % 3];
  const auto m = static_cast<std::uint32_t>(box.positions.size());
  box.positions.push_back(0.5 * (box.positions[a] + box.positions[b]));
  box.triangles[nb] = {b, m, d};
  box.triangles.push_back({m, a, d});
  box.triangles.push_back({a, m, b});
  box.shell.assign(box.triangles.size(), 0);
  return box;
}

Mesh make_torus(double cx, double R, double a, int nu, int nv) {
  Mesh m;
  for (int i = 0; i < nu; ++i)
    for (int j = 0; j < nv; ++j) {
      const double u = 2 * std::numbers::pi * i / nu, v = 2 * std::numbers::pi * j / nv;
      const double w = R + a * std::cos(v);
      m.positions.push_back({cx + a * std::sin(v), w * std::cos(u), w * std::sin(u)});
    }
  auto id = [&](int i, int j) { return static_cast<std::uint32_t>((i % nu) * nv + (j % nv)); };
  for (int i = 0; i < nu; ++i)
    for (int j = 0; j < nv; ++j) {
      m.triangles.push_back({id(i, j), id(i + 1, j), id(i + 1, j + 1)});
      m.triangles.push_back({id(i, j), id(i + 1, j + 1), id(i, j + 1)});
    }
  m.shell.assign(m.triangles.size(), 0);
  m.shell_names = {"torus"};
  return orient_outward(m);
}

Mesh rotate_about_x(Mesh m, double deg) {
  const double t = deg * std::numbers::pi / 180.0, c = std::cos(t), s = std::sin(t);
  for (Vec3& p : m.positions) p = {p.x, c * p.y - s * p.z, s * p.y + c * p.z};
  return m;
}

std::string read_file(const std::string& path) {
  std::ifstream f(path, std::ios::binary);
  std::stringstream ss;
  ss << f.rdbuf();
  return ss.str();
}

std::string temp_path(const std::string& name) {
  // One folder per test process: CTest runs test programs in parallel, and two of them may
  // write files of the same name.
  const auto dir = std::filesystem::temp_directory_path() /
                   ("machcut_tests_" + std::to_string(getpid()));
  std::filesystem::create_directories(dir);
  return (dir / name).string();
}

std::string write_stl_ascii(const Mesh& m, const std::string& name) {
  const std::string path = temp_path(name);
  std::ofstream f(path);
  f.precision(17);
  f << "solid test\n";
  for (const Tri& t : m.triangles) {
    f << " facet normal 0 0 0\n  outer loop\n";
    for (std::uint32_t v : t)
      f << "   vertex " << m.positions[v].x << " " << m.positions[v].y << " " << m.positions[v].z
        << "\n";
    f << "  endloop\n endfacet\n";
  }
  f << "endsolid test\n";
  return path;
}

std::string write_obj(const Mesh& m, const std::string& name) {
  const std::string path = temp_path(name);
  std::ofstream f(path);
  f.precision(17);
  for (const Vec3& p : m.positions) f << "v " << p.x << " " << p.y << " " << p.z << "\n";
  for (const Tri& t : m.triangles) f << "f " << t[0] + 1 << " " << t[1] + 1 << " " << t[2] + 1 << "\n";
  return path;
}

RunResult run_cli(const std::string& args, int timeout_seconds, const std::string& stdout_to) {
  static int counter = 0;
  // The process id keeps test programs that CTest runs in parallel apart.
  const std::string tag = std::to_string(getpid()) + "_" + std::to_string(counter++);
  const std::string out = temp_path("cli_out_" + tag);
  const std::string err = temp_path("cli_err_" + tag);
  // A prepared-model cache of this process's own, emptied at its first use: tests never read
  // or fill the user's cache, and a cache left by an earlier process of the same id is gone.
  // Its size limit is fixed too, whatever the user's MACHCUT_CACHE_MAX_MB says.
  static const std::string cache = [] {
    const std::string dir = temp_path("xdg_cache");
    std::error_code ec;
    std::filesystem::remove_all(dir, ec);
    return dir;
  }();
  const std::string cmd = "XDG_CACHE_HOME='" + cache + "' MACHCUT_CACHE_MAX_MB=256 " +
                          (timeout_seconds > 0 ? "timeout -s KILL " + std::to_string(timeout_seconds) + " " : std::string()) +
                          std::string(MACHCUT_CLI_PATH) + " " + args + " >" + (stdout_to.empty() ? out : stdout_to) + " 2>" + err +
                          " </dev/null";
  const int status = std::system(cmd.c_str());
  RunResult r;
  r.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  if (stdout_to.empty()) r.out = read_file(out);
  r.err = read_file(err);
  return r;
}

Mesh biconvex_wing_between(double c, double y0, double y1, double tau, int n, int span_panels) {
  Mesh m;
  auto z = [&](double x) { return 2 * tau * x * (c - x) / c; };
  // Section loop: upper surface from LE to TE, lower back to LE (LE and TE shared).
  std::vector<std::pair<double, double>> loop;
  for (int i = 0; i <= n; ++i) loop.push_back({c * i / n, z(c * i / n)});
  for (int i = n - 1; i >= 1; --i) loop.push_back({c * i / n, -z(c * i / n)});
  const auto k = static_cast<std::uint32_t>(loop.size());
  const auto ns = static_cast<std::uint32_t>(span_panels);
  for (std::uint32_t s = 0; s <= ns; ++s)
    for (auto [x, zz] : loop) m.positions.push_back({x, y0 + (y1 - y0) * s / ns, zz});
  for (std::uint32_t s = 0; s < ns; ++s)
    for (std::uint32_t i = 0; i < k; ++i) {
      const std::uint32_t j = (i + 1) % k, o = s * k, p = (s + 1) * k;
      m.triangles.push_back({o + i, o + j, p + j});
      m.triangles.push_back({o + i, p + j, p + i});
    }
  // Tips: fans from the LE vertex.
  const std::uint32_t last = ns * k;
  for (std::uint32_t i = 1; i + 1 < k; ++i) {
    m.triangles.push_back({0, i + 1, i});
    m.triangles.push_back({last, last + i, last + i + 1});
  }
  if (signed_volume(m) < 0)
    for (Tri& t : m.triangles) std::swap(t[1], t[2]);
  m.shell.assign(m.triangles.size(), 0);
  m.shell_names = {"wing"};
  return m;
}

PreparedModel prepared_model(Mesh m) {
  PreparedModel p;
  if (m.shell_names.empty()) m.shell_names = {"part"};
  p.mesh = p.analysis = std::move(m);
  p.usable = true;
  p.files = {"generated"};
  return p;
}

}  // namespace machcut::test
