// Text exports of what the viewer shows (CSV / JSON, SI units in the headers). GL-free.
#pragma once

#include <string>
#include <vector>

#include "app_state.h"

namespace machcut::view {

// x_m,area_m2,sears_haack_m2,slope_m2_per_m — one row per station.
std::string curve_csv(const CurveResult& c);
// roll_deg,dq_m2 rows, then mach,dq_m2 rows in a second block separated by a blank line.
std::string drag_csv(const DragResult& d);
// The same as JSON, with the parameters, files and the caution.
std::string drag_json(const DragResult& d, const std::vector<std::string>& files);

}  // namespace machcut::view
