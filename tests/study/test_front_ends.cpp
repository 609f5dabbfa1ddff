// The three front ends on one study: the CLI (`machcut area/drag --json`), the Python module
// and the viewer's state layer (its worker) give identical areas and D/q for the same inputs
// (issue #9: to 1e-12 relative), on the demo aircraft and on a test body.
#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <memory>
#include <thread>

#include "test_support.h"
#include "worker.h"

using namespace machcut;
using Catch::Matchers::WithinRel;

namespace {

std::vector<std::string> demo_files() {
  std::vector<std::string> f;
  for (const auto& e : std::filesystem::directory_iterator(std::string(MACHCUT_SOURCE_DIR) + "/models/demo/baseline"))
    if (e.path().extension() == ".obj") f.push_back(e.path().string());
  std::sort(f.begin(), f.end());
  return f;
}

std::string joined(const std::vector<std::string>& files, const char* sep = " ") {
  std::string s;
  for (const std::string& f : files) s += (s.empty() ? "" : sep) + f;
  return s;
}

// Runs Python with the module on its path; returns what the script prints.
std::string run_python(const std::string& script) {
  const std::string path = test::temp_path("front_ends.py");
  {
    std::FILE* f = std::fopen(path.c_str(), "w");
    REQUIRE(f);
    std::fputs(script.c_str(), f);
    std::fclose(f);
  }
  // A private cache folder: tests never touch the user's prepared-model cache.
  const std::string cmd = std::string("XDG_CACHE_HOME='") + test::temp_path("front_ends_cache") + "' PYTHONPATH='" +
                          MACHCUT_PYTHON_DIR + "' '" + MACHCUT_PYTHON + "' '" + path + "'";
  std::unique_ptr<std::FILE, int (*)(std::FILE*)> p(popen(cmd.c_str(), "r"), pclose);
  REQUIRE(p);
  std::string out;
  char buf[4096];
  for (std::size_t n; (n = std::fread(buf, 1, sizeof buf, p.get())) > 0;) out.append(buf, n);
  return out;
}

struct Viewed {
  std::vector<double> x, area;
  double dq = 0.0;
};

// The viewer's worker: load, one curve and the D/q at `mach`, as the window asks for them.
Viewed through_viewer(const std::vector<std::string>& files, const std::vector<std::string>& captures,
                      double mach, double roll, int stations) {
  view::Worker w;
  view::LoadJob job;
  job.files = files;
  job.controls.captures = captures;
  w.load(job);
  view::WorkerOutput acc;
  const auto deadline = std::chrono::steady_clock::now() + std::chrono::minutes(5);
  auto wait = [&](auto done) {
    while (std::chrono::steady_clock::now() < deadline) {
      view::WorkerOutput o = w.take();
      if (o.load) acc.load = std::move(o.load);
      for (auto& c : o.curves) acc.curves.push_back(c);
      if (o.drag) acc.drag = o.drag;
      if (done()) return true;
      std::this_thread::sleep_for(std::chrono::milliseconds(5));
    }
    return false;
  };
  REQUIRE(wait([&] { return acc.load.has_value(); }));
  REQUIRE(acc.load->ok);
  view::Controls c;
  c.mach = mach;
  c.roll_deg = roll;
  c.stations = stations;
  w.request_curve(view::curve_key(c, acc.load->summary.united));
  w.request_drag(mach, stations);
  REQUIRE(wait([&] { return !acc.curves.empty() && acc.drag && acc.drag->total_dq >= 0; }));
  return {acc.curves.back()->curve.x, acc.curves.back()->curve.area, acc.drag->total_dq};
}

void same(const std::vector<double>& a, const std::vector<double>& b) {
  REQUIRE(a.size() == b.size());
  for (std::size_t i = 0; i < a.size(); ++i)
    if (a[i] != b[i]) CHECK_THAT(a[i], WithinRel(b[i], 1e-12));
}

void check_identity(const std::vector<std::string>& files, const std::vector<std::string>& captures,
                    double mach, double roll, int stations) {
  std::string cap_cli, cap_py = "[";
  for (const std::string& c : captures) {
    cap_cli += " --capture " + c;
    cap_py += "'" + c + "',";
  }
  cap_py += "]";
  char args[128];
  std::snprintf(args, sizeof args, " --mach %.17g --roll %.17g --stations %d", mach, roll, stations);
  const auto area = test::run_cli("area " + joined(files) + args + " --json - -q");
  REQUIRE(area.exit_code == 0);
  const auto aj = nlohmann::json::parse(area.out);
  char margs[64];
  std::snprintf(margs, sizeof margs, " --mach %.17g", mach);
  const auto drag = test::run_cli("drag " + joined(files) + cap_cli + margs + " --json - -q");
  REQUIRE(drag.exit_code == 0);
  const auto dj = nlohmann::json::parse(drag.out);
  const double cli_dq = dj["results"][0]["drag_area"].get<double>();

  const std::string py = run_python(
      "import json, machcut\n"
      "s = machcut.Study(['" + joined(files, "','") + "'], capture=" + cap_py + ")\n"
      "a = s.area(mach=" + std::to_string(mach) + ", roll=" + std::to_string(roll) + ", stations=" + std::to_string(stations) + ")\n"
      "d = s.drag([" + std::to_string(mach) + "])\n"
      "print(json.dumps({'x': list(a['x']), 'area': list(a['area']), 'dq': d[0]['drag_area']}))\n");
  INFO(py);
  const auto pj = nlohmann::json::parse(py);
  const Viewed v = through_viewer(files, captures, mach, roll, stations);

  same(pj["x"].get<std::vector<double>>(), aj["x"].get<std::vector<double>>());
  same(pj["area"].get<std::vector<double>>(), aj["area"].get<std::vector<double>>());
  same(v.x, aj["x"].get<std::vector<double>>());
  same(v.area, aj["area"].get<std::vector<double>>());
  CHECK_THAT(pj["dq"].get<double>(), WithinRel(cli_dq, 1e-12));
  CHECK_THAT(v.dq, WithinRel(cli_dq, 1e-12));
}

}  // namespace

TEST_CASE("front ends: CLI, Python and viewer agree on the demo aircraft", "[front_ends]") {
  // mach and roll exactly representable in decimal so that all three parse the same double.
  check_identity(demo_files(), {"nacelles.obj"}, 1.5, 30.0, 81);
}

TEST_CASE("front ends: CLI, Python and viewer agree on a test body", "[front_ends]") {
  const std::string f = test::write_obj(test::make_body_of_revolution({0, 1, 3, 6, 8}, {0, 0.4, 0.6, 0.5, 0}, 48),
                                        "front_ends_body.obj");
  check_identity({f}, {}, 1.25, 0.0, 61);
}
