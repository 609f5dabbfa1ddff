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
};

struct CompareRow {
  double mach = 1.0;
  MachDrag a, b;                 // each variant's own result (ok or its problem)
  bool ok = false;               // both ok: the change is defined
  double delta = 0.0;            // D/q(B) − D/q(A), m² (when ok)
  double delta_error = 0.0;      // error_estimate(A) + error_estimate(B), m² (when ok)
};

struct Comparison {
  std::vector<CompareRow> rows;
  std::vector<double> x, area_a, area_b, delta_area;  // M = 1 normal cuts, m and m²
  DragDifference zones;          // split of the M = 1 change (zones.ok: computed)
  int zone_cells = 0;            // slope-grid cells of the split (those of the M = 1 drags)
  std::string zones_method;      // how the split was made (one line)
  std::optional<double> table_delta_m1;  // the rows' B − A at M = 1, when in the rows and ok
};

// Compares a and b (both usable; UnusableModel otherwise). `progress` gets the fraction done.
Comparison compare_studies(const Study& a, const Study& b, const CompareRequest& request,
                           const std::function<void(double)>& progress = {});

}  // namespace machcut
