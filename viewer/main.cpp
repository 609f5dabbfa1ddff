// machcut-view: the desktop viewer. Parses options and hands over to app.cpp.
#include <CLI/CLI.hpp>

#include <cstdio>
#include <exception>
#include <iostream>

#include "app.h"

int main(int argc, char** argv) {
  using namespace machcut::view;
  AppOptions o;
  double station = 0.0;
  std::string size;
  CLI::App app{
      "machcut-view — shows a model with its Mach cutting plane beside its area distribution.\n"
      "Results are preliminary design estimates (linear theory, zero lift); confirm them with\n"
      "validated analysis, test and the applicable codes and licensed practice."};
  app.add_option("files", o.files, "Mesh files (STL, OBJ, PLY, OFF, glTF/GLB, COLLADA, AMF, X3D); together one model");
  app.add_option("--mach", o.controls.mach, "Mach number (>= 1; 1 = normal cuts)")->capture_default_str();
  app.add_option("--roll", o.controls.roll_deg, "Roll angle of the Mach planes, degrees")->capture_default_str();
  auto* st = app.add_option("--station", station, "Cursor station X, m (default: middle of the range)");
  app.add_option("--stations", o.controls.stations, "Stations per area curve")->capture_default_str();
  app.add_option("--units", o.controls.units, "Length unit of the input: m, mm, cm, in, ft")->capture_default_str();
  app.add_option("--flow", o.controls.flow, "File axis pointing from nose to tail")->capture_default_str();
  app.add_option("--up", o.controls.up, "File axis pointing up")->capture_default_str();
  app.add_option("--capture", o.controls.captures,
                 "Flow-through shells for wave drag (FILE#k or all shells of FILE): the stream tube "
                 "captured by their flat inlet faces is subtracted. Repeatable")
      ->allow_extra_args(false);
  app.add_option("--skip", o.controls.skip,
                 "Leave this part out of the analysis (shell, part or file name, as machcut's --skip; "
                 "drawn grey). Repeatable")
      ->allow_extra_args(false);
  app.add_option("--only", o.controls.only,
                 "Analyse only this part (as machcut's --only; the others drawn grey). Repeatable")
      ->allow_extra_args(false);
  std::vector<std::string> show;
  app.add_option("--show", show,
                 "Start with this overlay on: 'sensitivity' paints the drag sensitivity (where to push "
                 "the surface in or out) at --mach. Repeatable")
      ->allow_extra_args(false)
      ->check(CLI::IsMember({"sensitivity"}));
  bool sum = false;
  app.add_flag("--sum", sum, "Sum overlapping shells instead of uniting them");
  app.add_option("--screenshot", o.screenshot, "Render one frame to this PNG and exit (no window needed)");
  app.add_option("--size", size, "Window or screenshot size WxH (default 1440x900)");
  app.add_option("--bench-frames", o.bench_frames, "Benchmark: frames per scenario; prints frame times");
  app.add_option("--generate", o.generated_triangles,
                 "Use a generated test configuration of about this many triangles instead of files");
  app.add_option("--state-file", o.state_file,
                 "Window: write the viewer's state (files, station, camera, results, screen rectangles) "
                 "as JSON to this file whenever it changes, for scripted tests");
  app.add_option("--timeout", o.timeout_s, "Screenshot: longest wait for results, s")->capture_default_str();
  try {
    app.parse(argc, argv);
    if (st->count() > 0) o.station = station;
    o.controls.unite = !sum;
    for (const std::string& v : show)
      if (v == "sensitivity") o.controls.show_sensitivity = true;
    if (!size.empty() && (std::sscanf(size.c_str(), "%dx%d", &o.width, &o.height) != 2 || o.width < 320 ||
                          o.height < 240 || o.width > 8192 || o.height > 8192))
      throw CLI::ValidationError("--size", "expected WxH between 320x240 and 8192x8192, got '" + size + "'");
    if (!(o.controls.mach >= 1.0)) throw CLI::ValidationError("--mach", "must be >= 1");
    if (o.controls.stations < 2) throw CLI::ValidationError("--stations", "must be >= 2");
    if (!o.screenshot.empty() && o.files.empty() && o.generated_triangles == 0)
      throw CLI::ValidationError("--screenshot", "needs mesh files (or --generate N)");
  } catch (const CLI::ParseError& e) {
    const int code = app.exit(e);
    return code == 0 ? 0 : 2;
  }
  try {
    if (o.bench_frames > 0) return run_bench(o);
    if (!o.screenshot.empty()) return run_screenshot(o);
    return run_window(o);
  } catch (const std::exception& e) {
    std::cerr << "machcut-view: internal error: " << e.what() << "\n";
    return 3;
  }
}
