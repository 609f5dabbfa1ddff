// machcut sensitivity: where adding or removing volume changes the wave drag at one Mach number
// (design/sensitivity.h, docs/method.md §8.7).
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <sstream>

#include "cli_commands.h"
#include "cli_common.h"
#include "cli_model.h"
#include "machcut/common/errors.h"
#include "machcut/common/limits.h"
#include "machcut/output/writers.h"

namespace machcut::cli {

namespace {

struct SensitivityCliOptions {
  ModelOptions model;
  EndOptions ends;
  double mach = 0.0;
  int cells = 4096;
  int rolls = 64;
  std::string csv, ply;
};

std::string to_csv(const Mesh& mesh, const SurfaceSensitivity& s) {
  std::ostringstream out;
  out << "x_m,y_m,z_m,vertex_area_m2,sensitivity_per_m\n";
  for (std::size_t v = 0; v < mesh.positions.size(); ++v) {
    const Vec3& p = mesh.positions[v];
    out << format_number(p.x) << ',' << format_number(p.y) << ',' << format_number(p.z) << ','
        << format_number(s.vertex_area[v]) << ',' << format_number(s.per_volume[v]) << '\n';
  }
  return out.str();
}

// ASCII PLY (Turk 1994, the Stanford polygon format): the analysis mesh with the sensitivity
// and the vertex area as vertex properties.
std::string to_ply(const Mesh& mesh, const SurfaceSensitivity& s) {
  std::ostringstream out;
  out << "ply\nformat ascii 1.0\n"
      << "comment machcut sensitivity: d(D/q)/dV per vertex at Mach " << format_number(s.mach)
      << ", 1/m (positive: added volume raises the drag)\n"
      << "comment " << kCaution << "\n"
      << "element vertex " << mesh.positions.size() << "\n"
      << "property double x\nproperty double y\nproperty double z\n"
      << "property double vertex_area\nproperty double sensitivity\n"
      << "element face " << mesh.triangles.size() << "\n"
      << "property list uchar int vertex_indices\nend_header\n";
  for (std::size_t v = 0; v < mesh.positions.size(); ++v) {
    const Vec3& p = mesh.positions[v];
    out << format_number(p.x) << ' ' << format_number(p.y) << ' ' << format_number(p.z) << ' '
        << format_number(s.vertex_area[v]) << ' ' << format_number(s.per_volume[v]) << '\n';
  }
  for (const Tri& t : mesh.triangles) out << "3 " << t[0] << ' ' << t[1] << ' ' << t[2] << '\n';
  return out.str();
}

// The summary: the range, the area-weighted mean, and the stations where pushing in or out
// gains most (ten bands of the length, area-weighted means).
void print_summary(const Mesh& mesh, const SurfaceSensitivity& s) {
  double lo = HUGE_VAL, hi = -HUGE_VAL, sum = 0.0, area = 0.0, x0 = HUGE_VAL, x1 = -HUGE_VAL;
  std::size_t vlo = 0, vhi = 0;
  for (std::size_t v = 0; v < mesh.positions.size(); ++v) {
    if (s.vertex_area[v] <= 0.0) continue;
    if (s.per_volume[v] < lo) lo = s.per_volume[v], vlo = v;
    if (s.per_volume[v] > hi) hi = s.per_volume[v], vhi = v;
    sum += s.per_volume[v] * s.vertex_area[v];
    area += s.vertex_area[v];
    x0 = std::min(x0, mesh.positions[v].x);
    x1 = std::max(x1, mesh.positions[v].x);
  }
  if (!(area > 0.0)) return;
  const double mean = sum / area;
  std::printf("sensitivity of D/q at M %s: d(D/q)/dV per vertex, 1/m (%zu vertices)\n",
              readable_number(s.mach).c_str(), mesh.positions.size());
  std::printf("  roll-averaged D/q on these grids %.6g m²; %s\n", s.drag_area, s.how.c_str());
  auto at = [&](std::size_t v) {
    char b[96];
    std::snprintf(b, sizeof b, "(%.4g, %.4g, %.4g) m", mesh.positions[v].x, mesh.positions[v].y,
                  mesh.positions[v].z);
    return std::string(b);
  };
  std::printf("  lowest  %.4g 1/m at %s\n  highest %.4g 1/m at %s\n  area-weighted mean %.4g 1/m\n",
              lo, at(vlo).c_str(), hi, at(vhi).c_str(), mean);
  std::printf("  by station (area-weighted mean per tenth of the length):\n");
  const int bands = 10;
  std::vector<double> bs(bands, 0.0), ba(bands, 0.0);
  for (std::size_t v = 0; v < mesh.positions.size(); ++v) {
    if (s.vertex_area[v] <= 0.0) continue;
    const int b =
        std::clamp(static_cast<int>((mesh.positions[v].x - x0) / (x1 - x0) * bands), 0, bands - 1);
    bs[static_cast<std::size_t>(b)] += s.per_volume[v] * s.vertex_area[v];
    ba[static_cast<std::size_t>(b)] += s.vertex_area[v];
  }
  for (int b = 0; b < bands; ++b) {
    if (ba[static_cast<std::size_t>(b)] <= 0.0) continue;
    const double m = bs[static_cast<std::size_t>(b)] / ba[static_cast<std::size_t>(b)];
    std::printf("    x %8.4g … %-8.4g m  %10.4g  %s\n", x0 + (x1 - x0) * b / bands,
                x0 + (x1 - x0) * (b + 1) / bands, m, m > mean ? "push in" : "push out");
  }
  std::printf(
      "  Adding volume where the value is high raises the drag. At constant volume, push in\n"
      "  where it is above the mean and out where it is below.\n");
  std::printf("%s\n", kCaution);
}

void run_sensitivity(const SensitivityCliOptions& o) {
  checked_mach(o.mach, "--mach");
  check_outputs({{"--csv", o.csv}, {"--ply", o.ply}}, o.model.files);
  const auto study = open_study(o.model, &o.ends);
  SensitivityOptions so;
  so.cells = o.cells;
  so.rolls = o.rolls;
  SurfaceSensitivity s;
  {
    Progress bar("sensitivity", o.model.quiet);
    bar.update(0.0);
    s = study->sensitivity(o.mach, so);
    bar.done();
  }
  const Mesh& mesh = study->engine().mesh();
  std::vector<OutputFile> files;
  if (!o.csv.empty()) files.push_back({o.csv, to_csv(mesh, s)});
  if (!o.ply.empty()) files.push_back({o.ply, to_ply(mesh, s)});
  if (!files.empty()) write_outputs(files, o.model.files);
  if (o.csv != "-" && o.ply != "-") print_summary(mesh, s);
  flush_stdout();
}

}  // namespace

void add_sensitivity_command(CLI::App& app) {
  auto o = std::make_shared<SensitivityCliOptions>();
  CLI::App* cmd = app.add_subcommand(
      "sensitivity",
      "Per vertex, the change of the roll-averaged wave drag D/q at one Mach number per unit\n"
      "volume added there by an outward normal displacement (1/m): where to push the surface in\n"
      "or out. Preliminary design estimate.");
  add_model_options(cmd, o->model);
  cmd->add_option("--mach", o->mach, "Mach number M (1 to 20)")->required();
  cmd->add_option("--cells", o->cells, "Slope-grid cells per roll (rounded up to a power of 2)")
      ->check(CLI::Range(64, 1 << 20))
      ->capture_default_str();
  cmd->add_option("--rolls", o->rolls,
                  "Roll angles averaged above M 1 (rounded up to a multiple of 4)")
      ->check(CLI::Range(4, 4096))
      ->capture_default_str();
  add_end_options(cmd, o->ends);
  cmd->add_option(
      "--csv", o->csv,
      "Write one row per vertex: x_m,y_m,z_m,vertex_area_m2,sensitivity_per_m ('-' = stdout)");
  cmd->add_option("--ply", o->ply,
                  "Write the mesh as ASCII PLY with the value as vertex property 'sensitivity'");
  cmd->callback([o] { run_sensitivity(*o); });
}

}  // namespace machcut::cli
