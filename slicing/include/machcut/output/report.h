// The design report: one self-contained HTML page (inline SVG plots, no scripts, no network)
// assembled from results the caller has computed. Reads no files, computes no physics.
#pragma once

#include <string>
#include <vector>

#include "machcut/sections/area_curve.h"
#include "machcut/design/jumps.h"
#include "machcut/design/optimum.h"

namespace machcut {

struct ReportDragRow {
  double mach = 1.0;
  double drag_area = 0.0;      // D/q, m²
  double error_estimate = 0.0; // m²
  bool ok = true;
  std::string note;            // e.g. "not converged", a problem
  std::string advice;          // where the model leaves linear theory (drag/validity.h); may be empty
};

struct ReportInput {
  std::string title;                     // e.g. the model's file names
  std::vector<std::string> health;       // one line each (shells, closed, volume, …)
  std::vector<std::string> shell_names;  // for the jumps table
  std::vector<AreaCurve> curves;         // M = 1 first, then the chosen Mach numbers
  std::vector<ReportDragRow> drag;       // by Mach
  double reference_area = 0.0;           // S_ref for C_D, m² (0: C_D not shown)
  CurveMeasures measures;                // of the M = 1 curve
  double sears_haack_drag_area = 0.0;    // 128 V²/(π l⁴) for the model's l and V, m²
  std::vector<std::string> constraints;  // the target's constraints, one line each
  LeastDragBody target;
  Correction correction;                 // at the M = 1 stations
  // The correction at each chosen Mach above 1, on the roll-averaged Mach-plane area curve
  // (the design Mach's equivalent body), with its least-drag target.
  struct MachCorrection {
    double mach = 1.0;
    LeastDragBody target;
    Correction correction;
  };
  std::vector<MachCorrection> mach_corrections;
  std::vector<AreaJump> jumps;           // M = 1 and chosen Mach, largest share first
  std::string version;                   // e.g. "machcut 0.1.0"
};

// The complete HTML document (UTF-8). Every plot is an inline <svg> with ids made unique.
std::string report_html(const ReportInput& input);

// Text with &, <, >, " escaped for HTML.
std::string html_escape(const std::string& text);

// An SVG document made fit for inlining: XML declaration removed, every id (and reference to
// it) prefixed with `prefix` so that several plots can share one page.
std::string inline_svg(const std::string& svg, const std::string& prefix);

}  // namespace machcut
