// Generated test meshes (closed, outward-oriented) and helpers shared by the tests.
#pragma once

#include <functional>
#include <string>
#include <vector>

#include "machcut/common/mesh.h"
#include "machcut/intake/model.h"

namespace machcut::test {

// UV sphere of radius r centred at c: `rings` latitude bands, `segments` longitudes.
Mesh make_sphere(Vec3 c, double r, int rings, int segments);

// Closed body of revolution about the x axis through radii r[i] at stations x[i]
// (r[0] and r.back() may be 0 for pointed ends; otherwise flat caps close the body).
Mesh make_body_of_revolution(const std::vector<double>& x, const std::vector<double>& r,
                             int segments);

// A body of revolution of length l whose cross-section area is area_of_u(u), u = x/l, on
// `rings` cosine-spaced stations (nose at x = 0); each ring's polygon is scaled to enclose that
// area exactly, so faceting does not bias the areas.
Mesh body_with_area(const std::function<double(double)>& area_of_u, double l, int rings,
                    int segments);

// A slender closed body of revolution 30 m long, pointed at both ends, radius
// 1.5 [4u(1 − u)]^0.75 (1 + wave · sin 40u): rings × segments quads (≈ 1M triangles at
// 501 × 1000). For benchmarks.
Mesh make_slender_body(int rings, int segments, double wave);

// Axis-aligned box [lo, hi].
Mesh make_box(Vec3 lo, Vec3 hi);
// make_box with a zero-area triangle (a, m, b) on the edge a–b of its first triangle, m the
// midpoint of a–b: the neighbour across a–b is split at m, so the shell stays closed and every
// edge keeps two triangles. One shell (id 0), no name.
Mesh make_box_with_sliver(Vec3 lo, Vec3 hi);

// Torus about the x axis: major radius R (tube centre), minor radius a, centred at x = cx.
Mesh make_torus(double cx, double R, double a, int major_segments, int minor_segments);

// Rotates every vertex by `deg` degrees about the x axis.
Mesh rotate_about_x(Mesh m, double deg);

// A rectangular wing of chord c from y0 to y1 with a symmetric parabolic-arc (biconvex) section
// of thickness ratio tau, z = ±2 tau x (c − x)/c: `n` chordwise panels, `span_panels` spanwise,
// flat tips (fans from the leading edge); closed, outward, one shell "wing".
Mesh biconvex_wing_between(double c, double y0, double y1, double tau, int n, int span_panels = 1);

// A generated clean mesh as prepare_model gives a closed one: mesh = analysis, usable, one
// shell named "part" when it has no names, files {"generated"}.
PreparedModel prepared_model(Mesh m);

// Writes an ASCII STL / an OBJ of the mesh into the test temp folder; returns the path.
std::string write_stl_ascii(const Mesh& m, const std::string& name);
std::string write_obj(const Mesh& m, const std::string& name);
std::string temp_path(const std::string& name);

// The whole content of a file, byte for byte ("" when it cannot be read).
std::string read_file(const std::string& path);

// Runs the machcut CLI with `args`; returns the exit code, stdout and stderr. timeout_seconds
// > 0: the CLI is killed (SIGKILL, coreutils `timeout`) after that long, and the exit code is
// then 137 (128 + 9, as for any death by a signal: exit_code > 128 means a signal).
struct RunResult {
  int exit_code = -1;
  std::string out;
  std::string err;
};
// `stdout_to`: a path standard output goes to instead of being captured (r.out is then empty).
RunResult run_cli(const std::string& args, int timeout_seconds = 0, const std::string& stdout_to = "");

}  // namespace machcut::test
