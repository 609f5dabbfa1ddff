// An area distribution: stations and projected section areas, with the parameters that made it.
#pragma once

#include <string>
#include <vector>

namespace machcut {

struct AreaCurve {
  double mach = 1.0;       // free-stream Mach number used for the cutting planes (>= 1)
  double roll_deg = 0.0;   // roll angle θ of the Mach planes, degrees
  bool united = true;      // overlapping closed shells counted once (false: plain sum)
  std::vector<double> x;     // stations X, m: where the plane crosses the line y = z = 0
  std::vector<double> area;  // section area projected on a plane normal to the flow, m²
  // Optional per-shell areas: per_shell[s][i] is shell s's own area at station i (m²).
  std::vector<std::vector<double>> per_shell;
  std::vector<double> error_bound;  // m², per station; empty when the mesh is closed
};

}  // namespace machcut
