// How the ends of the area curves are closed for wave drag — shared by drag, compare and
// report so that all three compute the same D/q: constant-area wakes behind flat aft faces
// (bases, nozzle exits) and captured stream tubes of flow-through shells (--capture).
#pragma once

#include <string>
#include <vector>

#include "cli_common.h"
#include "machcut/intake/model.h"
#include "machcut/drag/ends.h"
#include "machcut/drag/wave_drag.h"

namespace machcut::cli {

struct EndOptions {
  std::vector<std::string> captures;  // "NAME" or "NAME=AREA" (m²)
  bool no_wake = false;
};
void add_end_options(CLI::App* cmd, EndOptions& options);

struct EndTreatment {
  std::vector<CaptureTube> given;  // --capture NAME=AREA
  Mesh tubes;                      // wakes and inlet-face capture tubes
};

// Builds the end treatment for `model`; prints a note for each treatment (unless quiet).
// Throws InputError naming --capture for an unknown shell, a bad area or a shell without a
// flat inlet face.
EndTreatment end_treatment(const EndOptions& ends, const PreparedModel& model,
                           const ModelOptions& model_options);

// Parses a finite number; InputError naming `what` otherwise.
double parse_number(const std::string& text, const std::string& what);

}  // namespace machcut::cli
