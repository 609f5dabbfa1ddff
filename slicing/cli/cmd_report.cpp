// machcut report: a self-contained HTML design report (DIR/index.html, DIR/correction.csv).
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <memory>
#include <sstream>

#include "cli_commands.h"
#include "cli_design.h"
#include "cli_model.h"
#include "machcut/common/errors.h"
#include "machcut/design/optimum.h"
#include "machcut/output/writers.h"
#include "machcut/output/report.h"
#include "machcut/sections/section.h"

namespace machcut::cli {
namespace {

struct ReportOptions {
  ModelOptions model;
  std::string out;
  std::vector<double> machs{1.2, 1.5, 2.0};
  double reference_area = 0.0;
  std::vector<std::string> fix;   // "X" (keep the model's area there) or "X:AREA"
  double max_area = 0.0;          // 0: none
  std::string base = "model";     // "model", "closed", "free" or an area in m²
  double rel_tol = 0.005;
  int stations = 201;
  EndOptions ends;
};

std::string short_number(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.4g", v);
  return buf;
}

double parse_number(const std::string& text, const std::string& option) {
  std::size_t used = 0;
  double v = 0.0;
  try { v = std::stod(text, &used); } catch (const std::exception&) { used = 0; }
  if (used != text.size() || !std::isfinite(v)) throw InputError(option, "'" + text + "' is not a number");
  return v;
}

// Interpolated area of the curve at x (0 outside).
double area_at(const AreaCurve& c, double x) {
  for (std::size_t i = 1; i < c.x.size(); ++i)
    if (x <= c.x[i] && x >= c.x[i - 1]) {
      const double t = (x - c.x[i - 1]) / (c.x[i] - c.x[i - 1]);
      return c.area[i - 1] + t * (c.area[i] - c.area[i - 1]);
    }
  return 0.0;
}

LeastDragProblem target_problem(const ReportOptions& o, const AreaCurve& m1, double volume,
                                std::vector<std::string>& lines) {
  const CurveMeasures cm = measure_curve(m1);
  LeastDragProblem p;
  p.x0 = cm.x0;
  p.length = cm.length;
  p.volume = volume;
  lines.push_back("same length as the model: " + short_number(cm.length) + " m, from x = " + short_number(cm.x0) + " m");
  lines.push_back("same volume as the model: " + short_number(volume) + " m³");
  if (o.base == "model") p.base_area = cm.base_area;
  else if (o.base == "closed") p.base_area = 0.0;
  else if (o.base != "free") p.base_area = parse_number(o.base, "--base-area");
  lines.push_back(p.base_area ? "base area " + short_number(*p.base_area) + " m²" : std::string("base area free"));
  for (const std::string& f : o.fix) {
    const auto colon = f.find(':');
    AreaPin pin;
    pin.x = parse_number(f.substr(0, colon), "--fix");
    pin.area = colon == std::string::npos ? area_at(m1, pin.x) : parse_number(f.substr(colon + 1), "--fix");
    p.pins.push_back(pin);
    lines.push_back("area " + short_number(pin.area) + " m² kept at x = " + short_number(pin.x) + " m");
  }
  if (o.max_area > 0) {
    p.max_area = o.max_area;
    lines.push_back("area at most " + short_number(o.max_area) + " m²");
  }
  return p;
}

std::vector<std::string> health_lines(const PreparedModel& model) {
  const HealthReport& h = model.health;
  std::vector<std::string> lines;
  std::ostringstream s;
  s << model.mesh.shell_names.size() << " shell(s), " << h.triangles << " triangles; "
    << (h.closed ? "all shells closed" : "open shells (holes closed for the analysis; areas carry error bounds)")
    << (model.united ? "; overlapping shells united" : "");
  lines.push_back(s.str());
  for (const std::string& n : model.notes) lines.push_back(n);
  for (const std::string& w : model.warnings) lines.push_back("warning: " + w);
  return lines;
}

void run_report(const ReportOptions& o) {
  const std::vector<double> machs = checked_machs(o.machs, "--mach");
  if (o.out.empty()) throw InputError("--out", "give the folder for the report");
  // The folder is made before the (long) analysis so that a bad --out fails at once.
  {
    std::error_code ec;
    for (const std::string& f : o.model.files)
      if (std::filesystem::equivalent(o.out, f, ec))
        throw InputError(o.out, "--out names an input file; give a folder for the report");
    std::filesystem::create_directories(o.out, ec);
    if (ec || !std::filesystem::is_directory(o.out, ec))
      throw InputError(o.out, "cannot create the report folder (--out): " +
                                  (ec ? ec.message() : std::string("not a folder")));
  }
  const PreparedModel model = load_model(o.model);
  ReportInput in;
  for (const std::string& f : model.files) in.title += (in.title.empty() ? "" : ", ") + std::filesystem::path(f).filename().string();
  in.version = "machcut 0.1.0";
  in.health = health_lines(model);
  in.shell_names = model.mesh.shell_names;
  in.curves.push_back(design_curve(model, 1.0, o.stations));
  for (double m : machs) if (m > 1.0) in.curves.push_back(design_curve(model, m, o.stations));
  std::vector<double> sweep = machs;
  if (sweep.empty() || sweep.front() > 1.0) sweep.insert(sweep.begin(), 1.0);
  for (const MachDrag& d : drag_sweep(model, sweep, o.rel_tol, o.ends, o.model))
    in.drag.push_back({d.mach, d.drag_area, d.error_estimate, d.ok,
                       !d.ok ? d.problem : d.stations_diverge ? "slope jumps: station refinement diverges" : d.converged ? "" : "not converged"});
  const ModelMeasures mm = measure_model(SectionEngine(model.analysis));
  in.measures = measure_curve(in.curves.front());
  in.measures.volume = mm.volume;
  in.sears_haack_drag_area = sears_haack_drag_area(in.measures.length, mm.volume);
  in.reference_area = o.reference_area;
  in.jumps = model_jumps(in.curves);
  in.target = least_drag_body(target_problem(o, in.curves.front(), mm.volume, in.constraints));
  in.correction = correction_to(in.curves.front(), in.target);
  write_output((std::filesystem::path(o.out) / "correction.csv").string(), correction_csv(in.correction), o.model.files);
  write_output((std::filesystem::path(o.out) / "index.html").string(), report_html(in), o.model.files);
  note(o.model, "report written to " + (std::filesystem::path(o.out) / "index.html").string());
}

}  // namespace

void add_report_command(CLI::App& app) {
  auto opts = std::make_shared<ReportOptions>();
  CLI::App* cmd = app.add_subcommand(
      "report",
      "Write a self-contained HTML design report (DIR/index.html, DIR/correction.csv): health, area\n"
      "curves, D/q and C_D against Mach, Sears–Haack comparison, area jumps, least-drag correction.");
  add_model_options(cmd, opts->model);
  add_end_options(cmd, opts->ends);
  cmd->add_option("--out", opts->out, "Folder for the report (created if missing)")->required();
  cmd->add_option("--mach", opts->machs, "Mach numbers above 1 (comma-separated); M = 1 is always included")->delimiter(',')->allow_extra_args(false)->capture_default_str();
  cmd->add_option("--ref-area", opts->reference_area, "Reference area for C_D, m² (0: no C_D)")->check(CLI::NonNegativeNumber);
  cmd->add_option("--fix", opts->fix, "Target: keep the area at station X (m), or fix it: X:AREA (m²); repeatable");
  cmd->add_option("--max-area", opts->max_area, "Target: largest area allowed, m²")->check(CLI::NonNegativeNumber);
  cmd->add_option("--base-area", opts->base, "Target base area: model (the model's), closed, free, or m²")->capture_default_str();
  cmd->add_option("--tol", opts->rel_tol, "Relative error target of each D/q")->check(CLI::Range(1e-5, 0.2))->capture_default_str();
  cmd->add_option("--stations", opts->stations, "Stations per area curve")->check(CLI::Range(40, 400))->capture_default_str();
  cmd->callback([opts] { run_report(*opts); });
}

}  // namespace machcut::cli
