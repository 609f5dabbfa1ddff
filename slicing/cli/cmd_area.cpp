// machcut area: the projected cross-sectional area distribution at one Mach number and roll.
#include <nlohmann/json.hpp>

#include <cmath>
#include <sstream>

#include "cli_commands.h"
#include "cli_common.h"
#include "cli_model.h"
#include "machcut/common/errors.h"
#include "machcut/common/limits.h"
#include "machcut/intake/model.h"
#include "machcut/output/writers.h"
#include "machcut/sections/section.h"

namespace machcut::cli {

namespace {

struct AreaOptions {
  ModelOptions model;
  double mach = 1.0;
  double roll_deg = 0.0;
  int stations = 201;
  std::string spacing = "uniform";
  std::vector<std::string> at;  // parsed by parse_number: an empty item is an error, not 0
  std::string csv;
  std::string json;
  bool at_given = false;
};

void check_options(const AreaOptions& o) {
  checked_mach(o.mach, "--mach");
  checked_roll(o.roll_deg, "--roll");
  // Refuse a bad output path before loading and cutting, not after.
  check_outputs({{"--json", o.json}, {"--csv", o.csv}}, o.model.files);
}

// A shell name as a CSV column name: no separators, quotes or line breaks (file names may
// hold them).
std::string csv_name(std::string name) {
  for (char& ch : name)
    if (ch == ',' || ch == '"' || ch == '\n' || ch == '\r') ch = '_';
  return name;
}

std::string to_csv(const AreaResult& r) {
  const AreaCurve& c = r.curve;
  std::ostringstream s;
  s << "x_m,area_m2";
  if (!c.error_bound.empty()) s << ",error_bound_m2";
  for (const std::string& n : r.part_names) s << ",area_" << csv_name(n) << "_m2";
  s << "\n";
  for (std::size_t i = 0; i < c.x.size(); ++i) {
    s << format_number(c.x[i]) << "," << format_number(c.area[i]);
    if (!c.error_bound.empty()) s << "," << format_number(c.error_bound[i]);
    for (const auto& a : c.per_shell) s << "," << format_number(a[i]);
    s << "\n";
  }
  return s.str();
}

nlohmann::json to_json(const AreaResult& r, const PreparedModel& model) {
  const AreaCurve& c = r.curve;
  nlohmann::json j;
  j["files"] = model.files;
  j["mach"] = c.mach;
  j["roll_deg"] = c.roll_deg;
  j["united"] = c.united;
  j["units"] = {{"x", "m"}, {"area", "m^2"}};
  j["area_definition"] = "section projected on a plane normal to the flow (cut area / Mach)";
  j["x"] = c.x;
  j["area"] = c.area;
  if (!c.error_bound.empty()) j["error_bound"] = c.error_bound;
  nlohmann::json shells = nlohmann::json::array();
  for (std::size_t s = 0; s < c.per_shell.size(); ++s)
    shells.push_back({{"name", r.part_names[s]}, {"area", c.per_shell[s]}});
  j["shells"] = shells;
  j["warnings"] = model.warnings;
  j["caution"] = kCaution;
  return j;
}

void run_area(const AreaOptions& o) {
  check_options(o);
  std::vector<double> at;
  for (const std::string& x : o.at) at.push_back(parse_number(x, "--at"));
  if (o.at_given && at.empty()) throw InputError("--at", "no station given");
  const auto study = open_study(o.model);
  AreaRequest q;
  q.mach = o.mach;
  q.roll_deg = o.roll_deg;
  q.stations = o.stations;
  q.spacing = o.spacing == "cosine" ? Spacing::cosine : Spacing::uniform;
  q.at = at;
  Progress progress("area", o.model.quiet);
  const AreaResult r = study->area(q);
  progress.done();

  for (double x : r.outside)
    warn("station " + format_number(x) + " m is outside the model (" + format_number(r.range.lo) +
         " to " + format_number(r.range.hi) + " m at this Mach and roll): area 0");
  if (!r.open_stations.empty()) {
    std::string affected;
    for (std::size_t k = 0; k < r.open_stations.size() && k < 8; ++k)
      affected += (k > 0 ? ", " : "") + format_number(r.open_stations[k]);
    warn("the mesh is open: areas at " + std::to_string(r.open_stations.size()) + " station(s) (x = " +
         affected + (r.open_stations.size() > 8 ? ", …" : "") + " m) may be off by up to the error_bound column");
  }
  const std::vector<std::string> inputs = o.model.files;
  if (!o.json.empty()) write_output(o.json, to_json(r, study->model()).dump(2) + "\n", inputs);
  if (!o.csv.empty() || o.json.empty()) write_output(o.csv.empty() ? "-" : o.csv, to_csv(r), inputs);
}

}  // namespace

void add_area_command(CLI::App& app) {
  auto opts = std::make_shared<AreaOptions>();
  CLI::App* cmd = app.add_subcommand(
      "area",
      "Cross-sectional area distribution: Mach-plane cuts at one Mach number and roll angle\n"
      "(M = 1: normal cuts). Areas are projected on a plane normal to the flow, in m².");
  add_model_options(cmd, opts->model);
  cmd->add_option("--mach", opts->mach, "Free-stream Mach number (>= 1; 1 = normal cuts)")
      ->required();
  cmd->add_option("--roll", opts->roll_deg, "Roll angle of the Mach planes, degrees")
      ->capture_default_str();
  auto* n = cmd->add_option("--stations", opts->stations,
                            "Number of stations spread over the model (both ends included)")
                ->check(CLI::Range(2, 1000000))
                ->capture_default_str();
  cmd->add_option("--spacing", opts->spacing, "Station spacing: uniform or cosine (end-clustered)")
      ->check(CLI::IsMember({"uniform", "cosine"}))
      ->capture_default_str();
  cmd->add_option_function<std::vector<std::string>>("--at", [opts](const std::vector<std::string>& v) {
        opts->at = v;
        opts->at_given = true;
      }, "Explicit stations X1,X2,… in metres (model axes, like the output)")
      ->delimiter(',')
      ->allow_extra_args(false)
      ->excludes(n);
  cmd->add_option("--csv", opts->csv, "Write CSV here ('-' = stdout; default when no --json)");
  cmd->add_option("--json", opts->json, "Write JSON here ('-' = stdout)");
  cmd->callback([opts] { run_area(*opts); });
}

}  // namespace machcut::cli
