// machcut drag: zero-lift wave drag D/q against Mach by the supersonic area rule.
#include <nlohmann/json.hpp>

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <iostream>
#include <sstream>

#include "cli_commands.h"
#include "cli_common.h"
#include "cli_model.h"
#include "machcut/drag/atmosphere.h"
#include "machcut/design/equivalent_body.h"
#include "machcut/common/errors.h"
#include "machcut/common/limits.h"
#include "machcut/intake/model.h"
#include "machcut/output/writers.h"
#include "machcut/drag/ends.h"
#include "machcut/drag/wave_drag.h"

namespace machcut::cli {

namespace {

struct DragOptions {
  ModelOptions model;
  std::string mach;
  int rolls = 60;
  int stations = 16384;
  int max_stations = 65536;
  double tol = 0.005;
  double ref_area = 0.0;
  double altitude = -1.0;
  double length_floor = 0.0;  // m; 0: the model's default
  double time_budget = 20.0;  // s per Mach number
  EndOptions ends;
  std::string json, csv, body_csv, body_mesh;
  bool no_symmetry = false;
};

// "M" or "M1:M2:STEP" → Mach numbers (each in [1, 20]).
std::vector<double> parse_mach_item(const std::string& text) {
  std::vector<std::string> parts;
  std::stringstream ss(text);
  for (std::string p; std::getline(ss, p, ':');) parts.push_back(p);
  std::vector<double> out;
  if (parts.size() == 1) {
    out.push_back(parse_number(parts[0], "--mach"));
  } else if (parts.size() == 3) {
    const double a = parse_number(parts[0], "--mach"), b = parse_number(parts[1], "--mach");
    const double step = parse_number(parts[2], "--mach");
    if (!(step > 0.0) || b < a) throw InputError("--mach", "use M1:M2:STEP with M1 <= M2 and STEP > 0");
    const double n = std::floor((b - a) / step + 1e-9);
    if (n > 1000) throw InputError("--mach", "more than 1000 Mach numbers");
    for (int k = 0; k <= static_cast<int>(n); ++k) out.push_back(a + k * step);
  } else {
    throw InputError("--mach", "'" + text + "' is neither M nor M1:M2:STEP");
  }
  return out;
}

// A comma-separated list of "M" or "M1:M2:STEP" items → Mach numbers (each in [1, 20]).
std::vector<double> parse_machs(const std::string& text) {
  std::vector<double> out;
  std::stringstream ss(text);
  for (std::string item; std::getline(ss, item, ',');)
    for (double m : parse_mach_item(item)) out.push_back(m);
  if (out.empty()) throw InputError("--mach", "no Mach number given");
  if (out.size() > 1001) throw InputError("--mach", "more than 1000 Mach numbers");
  for (double m : out) checked_mach(m, "--mach");
  return out;
}

void check_options(const DragOptions& o) {
  if (!(o.tol > 0.0 && o.tol < 0.5)) throw InputError("--tol", "use a relative tolerance in (0, 0.5)");
  if (o.max_stations < o.stations)
    throw InputError("--max-cells", "must be at least --cells (" + std::to_string(o.stations) + ")");
  if (o.ref_area < 0.0 || !std::isfinite(o.ref_area)) throw InputError("--ref-area", "must be a positive area in m²");
  if (!(o.length_floor >= 0.0) || !std::isfinite(o.length_floor))
    throw InputError("--length-floor", "give a cell length in m (> 0), not " + readable_number(o.length_floor));
  if (!(o.time_budget > 0.0 && o.time_budget <= 86400.0))
    throw InputError("--time-budget", "give seconds per Mach number in (0, 86400], not " + readable_number(o.time_budget));
  if (o.altitude != -1.0 && !atmosphere_in_range(o.altitude))
    throw InputError("--altitude", "use 0 to 84852 m (geopotential; U.S. Standard Atmosphere 1976)");
  check_outputs({{"--json", o.json}, {"--csv", o.csv}, {"--body-csv", o.body_csv}}, o.model.files);
  if (!o.body_mesh.empty()) {
    const std::string ext = std::filesystem::path(o.body_mesh).extension().string();
    if (ext != ".stl" && ext != ".obj") throw InputError("--body-mesh", "use a .stl or .obj file name");
  }
}

struct Flight {
  bool has_cd = false, has_q = false;
  double ref_area = 0.0;
  AtmosphereState air;
};

// The surface outside linear theory at this Mach (drag/validity.h): empty `features` when the
// model is within it. A share is null when the Mach number has no D/q.
nlohmann::json validity_json(const MachDrag& r) {
  nlohmann::json features = nlohmann::json::array();
  for (const ValidityFeature& f : r.features)
    features.push_back({{"part", f.part},
                        {"x_from", f.x_from},
                        {"x_to", f.x_to},
                        {"frontal_area", f.frontal_area},
                        {"drag_share", std::isfinite(f.drag_share) ? nlohmann::json(f.drag_share) : nlohmann::json(nullptr)},
                        {"growth_per_halving", f.growth},
                        {"steepest_deg", f.steepest_deg},
                        {"faces_upstream", f.faces_upstream},
                        {"triangles", f.triangles.size()}});
  return {{"steep_limit_deg", r.steep_limit_deg}, {"features", features}, {"advice", r.advice}};
}

nlohmann::json result_json(const MachDrag& r, const StudyMeasures& mm, const Flight& f) {
  nlohmann::json j;
  j["mach"] = r.mach;
  j["drag_area"] = r.ok ? nlohmann::json(r.drag_area) : nlohmann::json(nullptr);
  j["error_estimate"] = r.error_estimate;
  j["quadrature_error"] = r.quadrature_error;
  j["station_error"] = r.station_error;
  j["converged"] = r.converged;
  if (r.ok && mm.sears_haack_drag_area > 0) j["sears_haack_ratio"] = r.drag_area / mm.sears_haack_drag_area;
  if (f.has_cd && r.ok) j["cd"] = r.drag_area / f.ref_area;
  if (f.has_q) {
    const double q = dynamic_pressure(f.air.pressure, r.mach);
    j["dynamic_pressure"] = q;
    if (r.ok) j["drag_n"] = q * r.drag_area;
  }
  j["stations"] = r.stations;
  if (r.kink_width > 0.0) j["slope_step_width"] = r.kink_width;
  j["roll_evaluations"] = r.roll_evaluations;
  j["symmetry"] = symmetry_name(r.symmetry);
  j["singular_rolls_deg"] = r.breaks_deg;
  j["aft_treatment"] = r.aft_treatment;
  j["resolution_limited"] = r.resolution_limited;
  j["time_limited"] = r.time_limited;
  j["length_floor"] = r.length_floor;
  j["cell_size"] = r.cell_size;
  j["growth_per_halving"] = r.growth_per_halving;
  j["growth_ratio"] = r.growth_ratio;
  j["validity"] = validity_json(r);
  if (!r.problem.empty()) j["problem"] = r.problem;
  nlohmann::json rolls = nlohmann::json::array();
  for (const RollSample& s : r.rolls)
    rolls.push_back({{"roll_deg", s.roll_deg}, {"drag_area", s.drag_area}, {"length", s.length}});
  j["rolls"] = rolls;
  return j;
}

std::string to_json(const DragSweep& sweep, const Flight& f, const PreparedModel& model, double tol) {
  const StudyMeasures& mm = sweep.measures;
  nlohmann::json j;
  j["files"] = model.files;
  j["volume"] = mm.volume;
  j["length"] = mm.length;
  j["max_area"] = mm.max_area;
  j["base_area"] = mm.base_area;
  j["sears_haack_drag_area"] = mm.sears_haack_drag_area;
  j["tolerance"] = tol;
  if (f.has_cd) j["ref_area"] = f.ref_area;
  if (f.has_q) j["atmosphere"] = {{"temperature", f.air.temperature}, {"pressure", f.air.pressure},
                                  {"density", f.air.density}, {"speed_of_sound", f.air.speed_of_sound}};
  j["method"] = sweep.method;
  j["results"] = nlohmann::json::array();
  for (const MachDrag& r : sweep.results) j["results"].push_back(result_json(r, mm, f));
  j["warnings"] = model.warnings;
  j["caution"] = kCaution;
  return j.dump(2) + "\n";
}

std::string num_or_empty(bool has, double v) { return has ? format_number(v) : ""; }

std::string to_csv(const std::vector<MachDrag>& rs, const StudyMeasures& mm, const Flight& f) {
  std::ostringstream s;
  s << "mach,drag_area_m2,error_estimate_m2,sears_haack_ratio,cd,drag_n,converged,stations,"
       "roll_evaluations,resolution_limited,growth_per_halving_m2,features\n";
  for (const MachDrag& r : rs) {
    const double q = f.has_q ? dynamic_pressure(f.air.pressure, r.mach) : 0.0;
    s << format_number(r.mach) << "," << num_or_empty(r.ok, r.drag_area) << ","
      << format_number(r.error_estimate) << ","
      << num_or_empty(r.ok && mm.sears_haack_drag_area > 0, r.drag_area / mm.sears_haack_drag_area)
      << "," << num_or_empty(r.ok && f.has_cd, r.drag_area / (f.has_cd ? f.ref_area : 1.0)) << ","
      << num_or_empty(r.ok && f.has_q, q * r.drag_area) << "," << (r.converged ? "true" : "false")
      << "," << r.stations << "," << r.roll_evaluations << "," << (r.resolution_limited ? "true" : "false")
      << "," << format_number(r.growth_per_halving) << "," << r.features.size() << "\n";
  }
  return s.str();
}

// Below the table: what limits each value, in the sentences a designer acts on.
void print_validity(const std::vector<MachDrag>& rs) {
  bool header = false;
  for (const MachDrag& r : rs) {
    if (r.advice.empty() && !r.resolution_limited) continue;
    if (!header) std::printf("outside linear theory (faces steeper than the Mach angle):\n");
    header = true;
    std::string line = "  M " + format_number(r.mach) + ": ";
    if (r.ok && r.resolution_limited) {
      char buf[200];
      std::snprintf(buf, sizeof buf, "value at %.3g m cells (floor %.3g m), growing %+.3g m² per halving; ",
                    r.cell_size, r.length_floor, r.growth_per_halving);
      line += buf;
    }
    line += r.advice.empty() ? "no face steeper than the Mach angle was found; the growth comes from "
                               "edges lying in the cutting planes (fine facets resolve it)."
                             : r.advice;
    std::printf("%s\n", line.c_str());
  }
}

// The human-readable table (stdout when no machine output goes there).
void print_table(const std::vector<MachDrag>& rs, const StudyMeasures& mm, const Flight& f) {
  std::printf("volume %.6g m³, length %.6g m, max area %.6g m², base area %.6g m², Sears–Haack D/q %.6g m²\n",
              mm.volume, mm.length, mm.max_area, mm.base_area, mm.sears_haack_drag_area);
  std::printf("%6s %12s %10s %8s%s%s %6s %8s\n", "Mach", "D/q m²", "± m²", "/SH",
              f.has_cd ? "        C_D" : "", f.has_q ? "        D N" : "", "rolls", "cells");
  for (const MachDrag& r : rs) {
    if (!r.ok) {
      std::printf("%6.3f %12s %10.3g   (no result: see below)\n", r.mach, "—", r.error_estimate);
      continue;
    }
    std::printf("%6.3f %12.6g %10.3g %8.4f", r.mach, r.drag_area, r.error_estimate,
                mm.sears_haack_drag_area > 0 ? r.drag_area / mm.sears_haack_drag_area : 0.0);
    if (f.has_cd) std::printf(" %10.5f", r.drag_area / f.ref_area);
    if (f.has_q) std::printf(" %10.4g", dynamic_pressure(f.air.pressure, r.mach) * r.drag_area);
    const std::string status = drag_status(r);
    std::printf(" %6d %8d%s\n", r.roll_evaluations, r.stations, status.empty() ? "" : ("  (" + status + ")").c_str());
  }
  print_validity(rs);
  std::printf("%s\n", kCaution);
}

// The equivalent bodies (M = 1 and each Mach > 1) as CSV and meshes, added to `files`: every
// body is made before anything is written.
void add_bodies(const DragOptions& o, const std::vector<EquivalentBody>& bodies,
                std::vector<OutputFile>& files) {
  if (!o.body_csv.empty()) files.push_back({o.body_csv, equivalent_body_csv(bodies)});
  if (!o.body_mesh.empty()) {
    const std::filesystem::path p(o.body_mesh);
    const std::string ext = p.extension().string();
    for (const EquivalentBody& b : bodies) {
      char tag[32];
      std::snprintf(tag, sizeof tag, "_M%.2f", b.mach);
      const Mesh m = equivalent_body_mesh(b);
      files.push_back({(p.parent_path() / (p.stem().string() + tag + ext)).string(),
                       ext == ".stl" ? mesh_to_stl(m, "equivalent_body")
                                       : mesh_to_obj(m, "equivalent body of revolution (machcut; preliminary design estimate), metres")});
    }
  }
}

void report_problems(const DragSweep& sweep, const ModelOptions& mo) {
  const std::vector<MachDrag>& rs = sweep.results;
  note(mo, std::string("mirror symmetry of the area curves: ") + symmetry_name(sweep.symmetry) +
               (sweep.symmetry == RollSymmetry::none ? "" : " (detected; the roll range is reduced)"));
  if (!sweep.uses_grid)
    note(mo, "a capture given as an area: D(θ) by the Eminton–Lord curve through sampled areas");
  std::string last_aft;
  for (const MachDrag& r : rs) {
    if (r.aft_treatment != last_aft) note(mo, "M = " + format_number(r.mach) + ": aft end: " + r.aft_treatment);
    last_aft = r.aft_treatment;
    if (r.kink_width > 0.0) {
      char width[32];
      std::snprintf(width, sizeof width, "%.3g", r.kink_width);
      note(mo, "M = " + format_number(r.mach) + ": edges lie in the cutting planes; their slope "
               "steps are spread over the facet scale, up to " + width + " m");
    }
    if (!r.problem.empty()) warn("M = " + format_number(r.mach) + ": " + r.problem);
  }
}

void run_drag(const DragOptions& o) {
  check_options(o);
  const std::vector<double> machs = parse_machs(o.mach);
  const auto study = open_study(o.model, &o.ends);
  WaveDragOptions wo;
  wo.rel_tol = o.tol;
  wo.cells = o.stations;
  wo.max_cells = o.max_stations;
  wo.initial_rolls = o.rolls;
  wo.use_symmetry = !o.no_symmetry;
  wo.length_floor = o.length_floor;
  wo.time_budget = o.time_budget;
  Flight f;
  f.has_cd = o.ref_area > 0.0;
  f.ref_area = o.ref_area;
  f.has_q = o.altitude >= 0.0;
  if (f.has_q) f.air = standard_atmosphere(o.altitude);

  DragSweep sweep;
  {
    Progress bar("drag", o.model.quiet);
    sweep = study->drag(machs, wo, [&](double fr) { bar.update(fr); });
  }
  report_problems(sweep, o.model);
  // Every output together or none (a body mesh that cannot be written leaves no other file).
  std::vector<OutputFile> files;
  if (!o.body_csv.empty() || !o.body_mesh.empty()) add_bodies(o, study->equivalent_bodies(machs, wo), files);
  // add_bodies puts the body meshes last, after the body CSV.
  const std::size_t meshes = o.body_mesh.empty() ? 0 : files.size() - (o.body_csv.empty() ? 0 : 1);
  const std::string last_mesh = meshes ? files.back().path : "";
  if (!o.json.empty()) files.push_back({o.json, to_json(sweep, f, study->model(), o.tol)});
  if (!o.csv.empty()) files.push_back({o.csv, to_csv(sweep.results, sweep.measures, f)});
  write_outputs(files, o.model.files);
  if (meshes > 0) note(o.model, "equivalent bodies written to " + last_mesh + (meshes > 1 ? " and the others" : ""));
  if (o.json != "-" && o.csv != "-") print_table(sweep.results, sweep.measures, f);
  // Each Mach stands alone: the values found are written; the ones missing are named.
  std::size_t failed = 0;
  std::string first;
  for (const MachDrag& r : sweep.results)
    if (!r.ok && failed++ == 0) first = "M = " + format_number(r.mach) + ": " + r.problem;
  if (failed == sweep.results.size())
    throw UnusableModel("no wave drag at any Mach number (" + first + ")");
  if (failed > 0)
    throw PartialResult("no wave drag at " + std::to_string(failed) + " of " + std::to_string(sweep.results.size()) +
                        " Mach numbers (the others are written; first: " + first + ")");
}

}  // namespace

void add_drag_command(CLI::App& app) {
  auto o = std::make_shared<DragOptions>();
  CLI::App* cmd = app.add_subcommand(
      "drag",
      "Zero-lift wave drag D/q (m²) against Mach by the supersonic area rule: Mach-plane area\n"
      "curves at adaptively chosen roll angles, von Kármán's integral of each exact curve, roll\n"
      "average, with an error estimate. Preliminary design estimate.");
  add_model_options(cmd, o->model);
  cmd->add_option("--mach", o->mach, "Mach number M, a sweep M1:M2:STEP, or a comma-separated list of both (M >= 1)")->required();
  cmd->add_option("--rolls", o->rolls, "Initial roll angles (refined adaptively as needed)")
      ->check(CLI::Range(15, 100000))->capture_default_str();
  // Cells of the slope grid, not stations of an area curve as in `area` (--stations is the old
  // name, still accepted).
  cmd->add_option("--cells,--stations", o->stations,
                  "Initial slope-grid cells per roll (rounded up to a power of 2; doubled as needed)")
      ->check(CLI::Range(64, 1 << 20))->capture_default_str();
  cmd->add_option("--max-cells,--max-stations", o->max_stations, "Most slope-grid cells per roll in the refinement")
      ->check(CLI::Range(64, 1 << 20))->capture_default_str();
  cmd->add_option("--tol", o->tol, "Target relative error estimate")->capture_default_str();
  cmd->add_option("--length-floor", o->length_floor,
                  "Smallest slope-grid cell (m) the refinement goes to (default: model length / 16384)");
  cmd->add_option("--time-budget", o->time_budget,
                  "Seconds per Mach number after which no finer grid is started")->capture_default_str();
  cmd->add_option("--ref-area", o->ref_area, "Reference area S_ref (m²): adds C_D = (D/q)/S_ref");
  cmd->add_option("--altitude", o->altitude,
                  "Geopotential altitude (m): adds q and drag in N (U.S. Standard Atmosphere 1976)");
  add_end_options(cmd, o->ends);
  cmd->add_flag("--no-symmetry", o->no_symmetry, "Integrate over all roll angles even if the model is symmetric");
  cmd->add_option("--json", o->json, "Write JSON here ('-' = stdout)");
  cmd->add_option("--csv", o->csv, "Write CSV, one row per Mach, here ('-' = stdout)");
  cmd->add_option("--body-csv", o->body_csv, "Write the equivalent bodies r(x) (M = 1 and each Mach) as CSV");
  cmd->add_option("--body-mesh", o->body_mesh,
                  "Write each equivalent body as a closed mesh: NAME.stl|.obj becomes NAME_M1.00.stl, …");
  cmd->callback([o] { run_drag(*o); });
}

}  // namespace machcut::cli
