// machcut compare: two variants (A -- B): D/q per Mach and its change, the difference of the
// area curves and where along the body the change of drag comes from.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <memory>

#include "cli_commands.h"
#include "cli_design.h"
#include "cli_ends.h"
#include "cli_model.h"
#include "machcut/design/compare.h"
#include "machcut/common/errors.h"
#include "machcut/output/writers.h"
#include "machcut/sections/section.h"
#include "machcut/drag/wave_drag.h"

namespace machcut::cli {
namespace {

struct CompareOptions {
  ModelOptions model;  // model.files: the B files (after `--`)
  std::vector<std::string> files_a;
  std::vector<double> machs{1.0, 1.2, 1.5, 2.0};
  double rel_tol = 0.005;
  int stations = 201;
  int zones = 10;
  std::string json;
  std::string csv;
  EndOptions ends;
};

struct Variant {
  ModelOptions options;
  PreparedModel model;
};

// The zone split of the M = 1 change on the exact slope grid, the ends of both variants closed
// as for their drag; the Eminton–Lord split of the bare area curves (x, sa, sb) when a capture
// is given as an area or a face is left open. `how` says which was used.
DragDifference zone_split(const Variant& a, const Variant& b, const CompareOptions& o,
                          const std::vector<double>& x, const std::vector<double>& sa,
                          const std::vector<double>& sb, std::string& how) {
  auto model_of = [&](const Variant& v, const SectionEngine& engine) {
    ModelOptions quiet = v.options;  // the drag sweep has printed the notes already
    quiet.quiet = true;
    EndTreatment t = end_treatment(o.ends, v.model, quiet);
    return std::make_unique<WaveDragModel>(engine, std::move(t.given), WaveDragOptions{}, std::move(t.tubes));
  };
  const SectionEngine ea(a.model.analysis), eb(b.model.analysis);
  const auto wa = model_of(a, ea), wb = model_of(b, eb);
  DragDifference dd = drag_difference_by_zone(*wa, *wb, o.zones);
  if (dd.ok) {
    how = "exact slope grid, ends closed as for the drag";
    return dd;
  }
  how = "Eminton–Lord fit of the bare area curves on common stations (" + dd.problem + ")";
  return drag_difference_by_zone(x, sa, sb, o.zones);
}

// Areas of both variants at M = 1 on common uniform stations spanning both.
void common_curves(const Variant& a, const Variant& b, int n, std::vector<double>& x,
                   std::vector<double>& sa, std::vector<double>& sb) {
  const SectionEngine ea(a.model.analysis), eb(b.model.analysis);
  const StationRange ra = ea.range({1.0, 0.0}), rb = eb.range({1.0, 0.0});
  x = make_stations({std::min(ra.lo, rb.lo), std::max(ra.hi, rb.hi)}, n, Spacing::uniform);
  sa = ea.areas({1.0, 0.0}, x);
  sb = eb.areas({1.0, 0.0}, x);
}

nlohmann::json results_json(const std::vector<MachDrag>& da, const std::vector<MachDrag>& db) {
  nlohmann::json arr = nlohmann::json::array();
  for (std::size_t i = 0; i < da.size(); ++i) {
    nlohmann::json r{{"mach", da[i].mach}, {"drag_area_a", da[i].drag_area}, {"drag_area_b", db[i].drag_area},
                     {"delta_drag_area", db[i].drag_area - da[i].drag_area},
                     {"error_estimate_a", da[i].error_estimate}, {"error_estimate_b", db[i].error_estimate},
                     {"ok", da[i].ok && db[i].ok}};
    if (!da[i].ok) r["problem_a"] = da[i].problem;
    if (!db[i].ok) r["problem_b"] = db[i].problem;
    arr.push_back(r);
  }
  return arr;
}

void print_summary(const std::vector<MachDrag>& da, const std::vector<MachDrag>& db, const DragDifference& dd,
                   const std::string& how) {
  std::printf("%6s %14s %14s %14s %9s\n", "Mach", "D/q A (m²)", "D/q B (m²)", "B − A (m²)", "change");
  for (std::size_t i = 0; i < da.size(); ++i) {
    const double d = db[i].drag_area - da[i].drag_area;
    if (!da[i].ok || !db[i].ok) {
      std::printf("%6.3g %14s %14s %14s  no finite D/q: %s\n", da[i].mach, "–", "–", "–", (!da[i].ok ? da[i] : db[i]).problem.substr(0, 60).c_str());
      continue;
    }
    std::printf("%6.3g %14.5g %14.5g %14.5g %8.1f%%%s\n", da[i].mach, da[i].drag_area, db[i].drag_area, d,
                da[i].drag_area != 0 ? 100.0 * d / da[i].drag_area : 0.0, "");
  }
  if (dd.ok) {
    std::printf("\nWhere the change comes from (M = 1 normal cuts; %s;\n"
                "the zones add up to %.5g m²):\n", how.c_str(), dd.delta_drag_area);
    std::printf("%20s %14s\n", "zone x (m)", "Δ D/q (m²)");
    const double half = dd.zones.size() > 1 ? 0.5 * (dd.zones[1].x_center - dd.zones[0].x_center) : 0.0;
    auto shown = [](double x) { return std::fabs(x) < 0.005 ? 0.0 : x; };  // no "-0.00"
    for (const ZoneContribution& z : dd.zones)
      std::printf("%8.2f – %8.2f %14.5g\n", shown(dd.zones.size() > 1 ? z.x_center - half : z.x_from),
                  shown(dd.zones.size() > 1 ? z.x_center + half : z.x_to), z.delta_drag_area);
  }
  std::printf("Preliminary estimates (linear theory, zero lift); confirm with validated analysis and test.\n");
}

void run_compare(const CompareOptions& o) {
  const std::vector<double> machs = checked_machs(o.machs, "--mach");
  Variant a{o.model, {}}, b{o.model, {}};
  a.options.files = o.files_a;
  b.options.files = o.model.files;
  a.model = load_model(a.options);
  b.model = load_model(b.options);
  const auto da = drag_sweep(a.model, machs, o.rel_tol, o.ends, a.options);
  const auto db = drag_sweep(b.model, machs, o.rel_tol, o.ends, b.options);
  std::vector<double> x, sa, sb;
  common_curves(a, b, o.stations, x, sa, sb);
  std::string how;
  const DragDifference dd = zone_split(a, b, o, x, sa, sb, how);
  std::vector<std::string> inputs = o.files_a;
  inputs.insert(inputs.end(), o.model.files.begin(), o.model.files.end());
  std::vector<double> delta(x.size());
  for (std::size_t i = 0; i < x.size(); ++i) delta[i] = sb[i] - sa[i];
  if (!o.json.empty()) {
    nlohmann::json zones = nlohmann::json::array();
    for (const ZoneContribution& z : dd.zones)
      zones.push_back({{"x_center", z.x_center}, {"x_from", z.x_from}, {"x_to", z.x_to}, {"delta_drag_area", z.delta_drag_area}});
    nlohmann::json j{{"files_a", a.model.files}, {"files_b", b.model.files}, {"results", results_json(da, db)},
                     {"area_difference", {{"mach", 1.0}, {"x", x}, {"area_a", sa}, {"area_b", sb}, {"delta_area", delta}}},
                     {"zones", {{"mach", 1.0}, {"ok", dd.ok}, {"method", how}, {"delta_drag_area", dd.delta_drag_area}, {"split", zones}}},
                     {"units", {{"x", "m"}, {"area", "m^2"}, {"drag_area", "m^2"}}},
                     {"caution", "Preliminary design estimate; confirm with validated analysis, test and applicable codes."}};
    write_output(o.json, j.dump(2) + "\n", inputs);
  }
  if (!o.csv.empty()) {
    std::string csv = "x_m,area_a_m2,area_b_m2,delta_area_m2\n";
    for (std::size_t i = 0; i < x.size(); ++i)
      csv += format_number(x[i]) + "," + format_number(sa[i]) + "," + format_number(sb[i]) + "," + format_number(delta[i]) + "\n";
    write_output(o.csv, csv, inputs);
  }
  if (o.json != "-" && o.csv != "-") print_summary(da, db, dd, how);
}

void add_compare_options(CLI::App* cmd, CompareOptions& o) {
  add_model_options(cmd, o.model);
  add_end_options(cmd, o.ends);
  cmd->add_option("--mach", o.machs, "Mach numbers (comma-separated, >= 1)")->delimiter(',')->allow_extra_args(false)->capture_default_str();
  cmd->add_option("--tol", o.rel_tol, "Relative error target of each D/q")->check(CLI::Range(1e-5, 0.2))->capture_default_str();
  cmd->add_option("--stations", o.stations, "Common stations of the area difference")->check(CLI::Range(20, 400))->capture_default_str();
  cmd->add_option("--zones", o.zones, "Zones along the body for the split of the drag change")->check(CLI::Range(1, 100))->capture_default_str();
  cmd->add_option("--json", o.json, "Also write the comparison as JSON to FILE ('-' = stdout)");
  cmd->add_option("--csv", o.csv, "Write the area difference (x, A, B, B − A) as CSV to FILE ('-' = stdout)");
}

// The files and everything after them reach the command unparsed (prefix mode: CLI11 would
// otherwise stop option parsing at `--`). Each side of the `--` is parsed by its own parser
// with the same options; B starts from A's values, so options may stand anywhere.
CompareOptions parse_side(const CompareOptions& start, std::vector<std::string> args, const char* side) {
  CompareOptions o = start;
  o.model.files.clear();
  CLI::App app{std::string("machcut compare (variant ") + side + ")"};
  add_compare_options(&app, o);
  std::reverse(args.begin(), args.end());  // CLI11 parses a reversed vector
  try {
    app.parse(args);
  } catch (const CLI::ParseError& e) {
    throw InputError(std::string("compare (variant ") + side + ")", e.what());
  }
  return o;
}

void split_and_run(CLI::App* cmd, const CompareOptions& first) {
  const std::vector<std::string> rest = cmd->remaining();
  const auto sep = std::find(rest.begin(), rest.end(), "--");
  if (sep == rest.end())
    throw InputError("compare", "separate the two variants with --: machcut compare A_FILES… -- B_FILES…");
  const CompareOptions a = parse_side(first, {rest.begin(), sep}, "A");
  CompareOptions b = parse_side(a, {sep + 1, rest.end()}, "B");
  b.files_a = a.model.files;
  run_compare(b);
}

}  // namespace

void add_compare_command(CLI::App& app) {
  auto opts = std::make_shared<CompareOptions>();
  CLI::App* cmd = app.add_subcommand(
      "compare",
      "Compare two variants: machcut compare A_FILES… -- B_FILES… [options]  D/q of each and\n"
      "B − A per Mach, the difference of the M = 1 area curves and where along the body it comes from.");
  add_compare_options(cmd, *opts);
  cmd->remove_option(cmd->get_option("files"));  // taken from the unparsed rest, split at `--`
  cmd->prefix_command();
  cmd->callback([opts, cmd] { split_and_run(cmd, *opts); });
}

}  // namespace machcut::cli
