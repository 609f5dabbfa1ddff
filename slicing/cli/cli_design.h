// What the design commands (jumps, compare, report) share: Mach lists, the area curves the
// jumps are found on, the drag sweep, and JSON of jumps. Calls the core only; no physics here.
#pragma once

#include <nlohmann/json.hpp>

#include <string>
#include <vector>

#include "cli_common.h"
#include "cli_ends.h"
#include "machcut/design/jumps.h"
#include "machcut/intake/model.h"
#include "machcut/output/report.h"
#include "machcut/drag/wave_drag.h"

namespace machcut::cli {

// Checks a list of Mach numbers given with `option` (each finite, 1 <= M <= 20); sorted, unique.
std::vector<double> checked_machs(std::vector<double> machs, const std::string& option);

// The area curve of the analysed model at (mach, roll 0°) on `stations` uniform stations, with
// each input shell's own area in per_shell (from the un-united mesh).
AreaCurve design_curve(const PreparedModel& model, double mach, int stations);

// Jumps on the curves at M = 1 and at each of `machs` (> 1), largest share first.
std::vector<AreaJump> model_jumps(const std::vector<AreaCurve>& curves);

nlohmann::json jumps_json(const std::vector<AreaJump>& jumps, const std::vector<std::string>& shell_names);

// D/q at each Mach number (wave_drag.h), with a progress bar; the ends closed as `ends` says
// (the same treatment as `machcut drag`).
std::vector<MachDrag> drag_sweep(const PreparedModel& model, const std::vector<double>& machs,
                                 double rel_tol, const EndOptions& ends,
                                 const ModelOptions& model_options);

}  // namespace machcut::cli
