// machcut report: a self-contained HTML design report (DIR/index.html, DIR/correction.csv).
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <memory>
#include <sstream>

#include "cli_commands.h"
#include "cli_model.h"
#include "machcut/common/errors.h"
#include "machcut/common/limits.h"
#include "machcut/output/report.h"
#include "machcut/output/writers.h"

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

void run_report(const ReportOptions& o) {
  const std::vector<double> machs = checked_machs(o.machs, "--mach");
  if (o.out.empty()) throw InputError("--out", "give the folder for the report");
  {
    std::error_code ec;
    for (const std::string& f : o.model.files)
      if (std::filesystem::equivalent(o.out, f, ec))
        throw InputError(o.out, "--out names an input file; give a folder for the report");
    if (std::filesystem::exists(o.out, ec) && !std::filesystem::is_directory(o.out, ec))
      throw InputError(o.out, "--out is not a folder");
  }
  const auto study = open_study(o.model, &o.ends);
  ReportRequest q;
  q.machs = machs;
  q.reference_area = o.reference_area;
  q.stations = o.stations;
  q.drag.rel_tol = o.rel_tol;
  q.target.base = o.base;
  q.target.fix = o.fix;
  q.target.max_area = o.max_area;
  q.target.stations = o.stations;
  q.version = "machcut 0.1.0";
  ReportInput in;
  {
    Progress bar("report", o.model.quiet);
    in = study->report_input(q, [&](double f) { bar.update(f); });
  }
  // The folder appears only now, when everything to put in it is ready.
  std::error_code ec;
  std::filesystem::create_directories(o.out, ec);
  if (ec || !std::filesystem::is_directory(o.out, ec))
    throw InputError(o.out, "cannot create the report folder (--out): " + (ec ? ec.message() : std::string("not a folder")));
  write_output((std::filesystem::path(o.out) / "correction.csv").string(), correction_csv(in.correction), o.model.files);
  for (const ReportInput::MachCorrection& mc : in.mach_corrections) {
    char name[48];
    std::snprintf(name, sizeof name, "correction_M%.3g.csv", mc.mach);
    write_output((std::filesystem::path(o.out) / name).string(), correction_csv(mc.correction), o.model.files);
  }
  write_output((std::filesystem::path(o.out) / "index.html").string(), report_html(in), o.model.files);
  note(o.model, "report written to " + (std::filesystem::path(o.out) / "index.html").string());
}

}  // namespace

void add_report_command(CLI::App& app) {
  auto opts = std::make_shared<ReportOptions>();
  CLI::App* cmd = app.add_subcommand(
      "report",
      "Write a self-contained HTML design report (DIR/index.html, DIR/correction.csv and\n"
      "DIR/correction_M<M>.csv per Mach above 1): health, area\n"
      "curves, D/q and C_D against Mach, Sears–Haack comparison, area jumps, least-drag correction.");
  add_model_options(cmd, opts->model);
  add_end_options(cmd, opts->ends);
  cmd->add_option("--out", opts->out, "Folder for the report (created if missing)")->required();
  cmd->add_option("--mach", opts->machs, "Mach numbers above 1 (comma-separated); M = 1 is always included")->delimiter(',')->allow_extra_args(false)->capture_default_str();
  cmd->add_option("--ref-area", opts->reference_area, "Reference area for C_D, m² (0: no C_D)")->check(CLI::NonNegativeNumber);
  cmd->add_option("--fix", opts->fix, "Target: keep the area at station X (m), or fix it: X:AREA (m²); repeatable");
  cmd->add_option("--max-area", opts->max_area, "Target: largest area allowed, m² (> 0)");
  cmd->add_option("--base-area", opts->base, "Target base area: model (the model's), closed, free, or m²")->capture_default_str();
  cmd->add_option("--tol", opts->rel_tol, "Relative error target of each D/q")->check(CLI::Range(1e-5, 0.2))->capture_default_str();
  cmd->add_option("--stations", opts->stations, "Stations per area curve")->check(CLI::Range(40, 400))->capture_default_str();
  cmd->callback([opts] { run_report(*opts); });
}

}  // namespace machcut::cli
