// machcut compare: two variants (A -- B): D/q per Mach and its change, the difference of the
// area curves and where along the body the change of drag comes from.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <memory>

#include <nlohmann/json.hpp>

#include "cli_commands.h"
#include "cli_model.h"
#include "machcut/common/errors.h"
#include "machcut/common/limits.h"
#include "machcut/study/comparison.h"
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

nlohmann::json value_or_null(bool ok, double v) { return ok ? nlohmann::json(v) : nlohmann::json(nullptr); }

nlohmann::json results_json(const Comparison& c) {
  nlohmann::json arr = nlohmann::json::array();
  for (const CompareRow& row : c.rows) {
    nlohmann::json r{{"mach", row.mach},
                     {"drag_area_a", value_or_null(row.a.ok, row.a.drag_area)},
                     {"drag_area_b", value_or_null(row.b.ok, row.b.drag_area)},
                     {"delta_drag_area", value_or_null(row.ok, row.delta)},
                     {"error_estimate_a", row.a.error_estimate},
                     {"error_estimate_b", row.b.error_estimate},
                     {"delta_error_estimate", value_or_null(row.ok, row.delta_error)},
                     {"status_a", drag_status(row.a)},
                     {"status_b", drag_status(row.b)},
                     {"ok", row.ok}};
    if (!row.a.ok) r["problem_a"] = row.a.problem;
    if (!row.b.ok) r["problem_b"] = row.b.problem;
    arr.push_back(r);
  }
  return arr;
}

// "1.2345 ± 0.002" or "–" when the variant has no value.
std::string value_text(bool ok, double v, double err) {
  if (!ok) return "–";
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.5g ± %.2g", v, err);
  return buf;
}

void print_summary(const Comparison& c) {
  std::printf("%6s %20s %20s %20s %9s\n", "Mach", "D/q A (m²)", "D/q B (m²)", "B − A (m²)", "change");
  std::vector<std::string> problems;
  for (const CompareRow& r : c.rows) {
    const std::string change = r.ok && r.a.drag_area != 0 ? [&] {
      char b[32];
      std::snprintf(b, sizeof b, "%8.1f%%", 100.0 * r.delta / r.a.drag_area);
      return std::string(b);
    }() : std::string("–");
    std::printf("%6.3g %20s %20s %20s %9s\n", r.mach, value_text(r.a.ok, r.a.drag_area, r.a.error_estimate).c_str(),
                value_text(r.b.ok, r.b.drag_area, r.b.error_estimate).c_str(),
                value_text(r.ok, r.delta, r.delta_error).c_str(), change.c_str());
    if (!r.a.ok) problems.push_back("A at M = " + format_number(r.mach) + ": " + r.a.problem);
    if (!r.b.ok) problems.push_back("B at M = " + format_number(r.mach) + ": " + r.b.problem);
  }
  for (const std::string& p : problems) std::printf("no value for %s\n", p.c_str());
  for (const ZoneSplit& z : c.splits) {
    const DragDifference& dd = z.zones;
    if (!dd.ok) {
      std::printf("\nM = %s: %s\n", format_number(z.mach).c_str(), z.method.c_str());
      continue;
    }
    std::printf("\nWhere the change comes from at M = %s (%s; %s):\n", format_number(z.mach).c_str(),
                z.mach == 1.0 ? "normal cuts" : "Mach-plane cuts", z.method.c_str());
    std::printf("%20s %14s\n", z.mach == 1.0 ? "zone x (m)" : "zone X (m)", "Δ D/q (m²)");
    const double half = dd.zones.size() > 1 ? 0.5 * (dd.zones[1].x_center - dd.zones[0].x_center) : 0.0;
    auto shown = [](double x) { return std::fabs(x) < 0.005 ? 0.0 : x; };  // no "-0.00"
    for (const ZoneContribution& zc : dd.zones)
      std::printf("%8.2f – %8.2f %14.5g\n", shown(dd.zones.size() > 1 ? zc.x_center - half : zc.x_from),
                  shown(dd.zones.size() > 1 ? zc.x_center + half : zc.x_to), zc.delta_drag_area);
    std::printf("%20s %14.5g\n", "sum of the zones", dd.delta_drag_area);
    if (z.table_delta) {
      const CompareRow* row = nullptr;
      for (const CompareRow& r : c.rows)
        if (r.mach == z.mach) row = &r;
      if (row && std::fabs(dd.delta_drag_area - *z.table_delta) > row->delta_error + 0.02 * std::fabs(*z.table_delta))
        std::printf("The zones' sum differs from the table's B − A (%.5g m²) by more than the error estimates\n"
                    "and 2%%: %s\n", *z.table_delta,
                    z.mach == 1.0 ? "the M = 1 drags are not resolved on these cells (see their status)."
                                  : "the roll average of the split uses evenly spaced rolls, the drag an adaptive rule.");
    }
  }
  std::printf("%s\n", kCaution);
}

void run_compare(const CompareOptions& o) {
  const std::vector<double> machs = checked_machs(o.machs, "--mach");
  ModelOptions options_a = o.model;
  options_a.files = o.files_a;
  std::vector<std::string> inputs = o.files_a;
  inputs.insert(inputs.end(), o.model.files.begin(), o.model.files.end());
  check_outputs({{"--json", o.json}, {"--csv", o.csv}}, inputs);
  const auto a = open_study(options_a, &o.ends);
  const auto b = open_study(o.model, &o.ends);
  CompareRequest q;
  q.machs = machs;
  q.drag.rel_tol = o.rel_tol;
  q.stations = o.stations;
  q.zones = o.zones;
  Comparison c;
  {
    Progress bar("compare", o.model.quiet);
    c = compare_studies(*a, *b, q, [&](double f) { bar.update(f); });
  }
  if (!o.json.empty()) {
    auto split_json = [](const ZoneSplit& z) {
      nlohmann::json zones = nlohmann::json::array();
      for (const ZoneContribution& zc : z.zones.zones)
        zones.push_back({{"x_center", zc.x_center}, {"x_from", zc.x_from}, {"x_to", zc.x_to}, {"delta_drag_area", zc.delta_drag_area}});
      return nlohmann::json{{"mach", z.mach}, {"ok", z.zones.ok}, {"method", z.method}, {"cells", z.cells},
                            {"rolls", z.rolls}, {"delta_drag_area", value_or_null(z.zones.ok, z.zones.delta_drag_area)},
                            {"table_delta_drag_area", z.table_delta ? nlohmann::json(*z.table_delta) : nlohmann::json(nullptr)},
                            {"split", zones}};
    };
    nlohmann::json by_mach = nlohmann::json::array();
    for (const ZoneSplit& z : c.splits) by_mach.push_back(split_json(z));
    nlohmann::json j{{"files_a", a->model().files}, {"files_b", b->model().files}, {"results", results_json(c)},
                     {"area_difference", {{"mach", 1.0}, {"x", c.x}, {"area_a", c.area_a}, {"area_b", c.area_b}, {"delta_area", c.delta_area}}},
                     {"zones", split_json(c.splits.front())},
                     {"zones_by_mach", by_mach},
                     {"units", {{"x", "m"}, {"area", "m^2"}, {"drag_area", "m^2"}}},
                     {"caution", kCaution}};
    write_output(o.json, j.dump(2) + "\n", inputs);
  }
  if (!o.csv.empty()) {
    std::string csv = "x_m,area_a_m2,area_b_m2,delta_area_m2\n";
    for (std::size_t i = 0; i < c.x.size(); ++i)
      csv += format_number(c.x[i]) + "," + format_number(c.area_a[i]) + "," + format_number(c.area_b[i]) + "," +
             format_number(c.delta_area[i]) + "\n";
    write_output(o.csv, csv, inputs);
  }
  if (o.json != "-" && o.csv != "-") print_summary(c);
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
