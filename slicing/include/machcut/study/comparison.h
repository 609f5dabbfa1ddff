// Two studies side by side (variant A and variant B): D/q of each and its change per Mach,
// the difference of their M = 1 area curves on common stations, and where along the body the
// change of drag comes from (design/compare.h).
#pragma once

#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "machcut/design/compare.h"
#include "machcut/study/study.h"

namespace machcut {

struct CompareRequest {
  std::vector<double> machs{1.0, 1.2, 1.5, 2.0};
  WaveDragOptions drag;   // the same for both variants
  int stations = 201;     // common stations of the area difference
  int zones = 10;         // zones along the body for the split of the drag change
  int zone_rolls = 36;    // roll angles averaged in the split above M = 1
};

struct CompareRow {
  double mach = 1.0;
  MachDrag a, b;                 // each variant's own result (ok or its problem)
  bool ok = false;               // both ok: the change is defined
  double delta = 0.0;            // D/q(B) − D/q(A), m² (when ok)
  double delta_error = 0.0;      // error_estimate(A) + error_estimate(B), m² (when ok)
};

// Where along the body the change of D/q at one Mach number comes from.
struct ZoneSplit {
  double mach = 1.0;
  DragDifference zones;          // zones.ok: computed; they add up to zones.delta_drag_area
  int cells = 0;                 // slope-grid cells of the split (those the drags ended on)
  int rolls = 1;                 // roll angles averaged (1 at M = 1)
  std::string method;            // how the split was made (one line)
  std::optional<double> table_delta;  // the rows' B − A at this Mach, when in the rows and ok
};

struct Comparison {
  std::vector<CompareRow> rows;
  std::vector<double> x, area_a, area_b, delta_area;  // M = 1 normal cuts, m and m²
  std::vector<ZoneSplit> splits;  // M = 1 first (always), then each requested Mach above 1
};

// Compares a and b (both usable; UnusableModel otherwise). `progress` gets the fraction done.
Comparison compare_studies(const Study& a, const Study& b, const CompareRequest& request,
                           const std::function<void(double)>& progress = {});

}  // namespace machcut
