// machcut jumps: where the area curve steps or kinks, and each place's share of the wave drag.
#include <cstdio>
#include <iostream>
#include <memory>

#include <nlohmann/json.hpp>

#include "cli_commands.h"
#include "cli_model.h"
#include "machcut/common/limits.h"
#include "machcut/output/writers.h"

namespace machcut::cli {
namespace {

struct JumpsOptions {
  ModelOptions model;
  std::vector<double> machs;
  int stations = 401;
  std::string json;
  EndOptions ends;
};

void print_table(const std::vector<AreaJump>& jumps, const std::vector<std::string>& names) {
  std::printf("%-5s %6s %10s %-5s %11s %13s %8s  %s\n", "rank", "Mach", "x (m)", "kind", "step (m²)", "slope (m²/m)", "share", "shells");
  int rank = 0;
  for (const AreaJump& j : jumps) {
    std::string shells;
    for (std::uint32_t s : j.shells) shells += (shells.empty() ? "" : ", ") + (s < names.size() ? names[s] : std::to_string(s));
    std::printf("%-5d %6.3g %10.4g %-5s %11.4g %13.4g %7.1f%%  %s\n", ++rank, j.mach, j.x, j.kind.c_str(), j.step,
                j.slope_change, 100.0 * j.share, shells.c_str());
  }
  if (jumps.empty()) std::printf("no area jumps above the detection threshold (1%% of the largest area)\n");
  std::printf("Share: change of the roll-averaged D/q (24 roll angles above M 1; ends closed as for the drag) when\n"
              "the region is replaced by a smooth local fit, over that D/q; shares overlap.\n%s\n", kCaution);
}

nlohmann::json jumps_json(const std::vector<AreaJump>& jumps, const std::vector<std::string>& names) {
  nlohmann::json arr = nlohmann::json::array();
  for (const AreaJump& j : jumps) {
    nlohmann::json shells = nlohmann::json::array();
    for (std::uint32_t s : j.shells) shells.push_back(s < names.size() ? names[s] : std::to_string(s));
    arr.push_back({{"mach", j.mach}, {"x", j.x}, {"kind", j.kind}, {"step_area", j.step},
                   {"slope_change", j.slope_change}, {"smoothed_from_x", j.x_from}, {"smoothed_to_x", j.x_to},
                   {"drag_area_change", j.drag_change}, {"share", j.share}, {"shells", shells}});
  }
  return arr;
}

void run_jumps(const JumpsOptions& o) {
  std::vector<double> machs = checked_machs(o.machs, "--mach", true);
  if (machs.empty() || machs.front() != 1.0) machs.insert(machs.begin(), 1.0);
  if (!o.json.empty()) check_output_path(o.json, o.model.files);
  const auto study = open_study(o.model, &o.ends);
  std::vector<AreaJump> jumps;
  {
    Progress bar("jumps", o.model.quiet);
    jumps = study->jumps(machs, o.stations, 15, [&](double f) { bar.update(f); });
  }
  const PreparedModel& model = study->model();
  const auto& names = study->part_names();
  if (!o.json.empty()) {
    nlohmann::json j;
    j["files"] = model.files;
    j["machs"] = machs;
    j["rolls_averaged"] = 24;
    j["ends"] = "closed as for the drag (wakes, --capture)";
    j["units"] = {{"x", "m"}, {"step_area", "m^2"}, {"slope_change", "m^2/m"}, {"drag_area_change", "m^2"}};
    j["jumps"] = jumps_json(jumps, names);
    j["caution"] = kCaution;
    write_output(o.json, j.dump(2) + "\n", o.model.files);
  }
  if (o.json != "-") print_table(jumps, names);
}

}  // namespace

void add_jumps_command(CLI::App& app) {
  auto opts = std::make_shared<JumpsOptions>();
  CLI::App* cmd = app.add_subcommand(
      "jumps",
      "Stations where the area curve steps or its slope kinks (canopy, wing root, nacelle lips,\n"
      "tail junctions, blisters), at M = 1 and the given Mach numbers, ranked by share of wave drag.");
  add_model_options(cmd, opts->model);
  add_end_options(cmd, opts->ends);
  cmd->add_option("--mach", opts->machs, "Mach numbers besides M = 1 (Mach-plane cuts, averaged over roll angles)")->delimiter(',')->allow_extra_args(false);
  cmd->add_option("--stations", opts->stations, "Stations per area curve")->check(CLI::Range(40, 5000))->capture_default_str();
  cmd->add_option("--json", opts->json, "Also write the jumps as JSON to FILE ('-' = stdout, table suppressed)");
  cmd->callback([opts] { run_jumps(*opts); });
}

}  // namespace machcut::cli
