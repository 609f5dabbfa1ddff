// Where the viewer's model comes from: files through the core (prepare_model), or an invented
// generated body for demonstrations, tests and benchmarks.
#pragma once

#include <cstddef>
#include <functional>
#include <string>
#include <vector>

#include "app_state.h"
#include "machcut/common/mesh.h"

namespace machcut::view {

struct LoadedModel {
  Mesh display;     // shells as in the files (what is drawn)
  Mesh analysis;    // what areas are computed on (overlapping closed shells united, or = display)
  bool united = false;
  std::vector<std::string> notes;
  std::vector<std::string> warnings;
};

using StageProgress = std::function<void(const std::string& stage, double fraction)>;

// Reads `files` with the controls' units, axes and union setting through the core. Throws
// InputError naming the file for unreadable input, and InputError with the model's reason when
// it reads but cannot be analysed.
LoadedModel load_files(const std::vector<std::string>& files, const Controls& controls,
                       const StageProgress& progress);

// An invented test configuration of about `triangles` triangles (>= 1000): a fuselage of
// revolution with a flat base and two disjoint under-wing pods. Not a real aircraft.
LoadedModel generated_model(std::size_t triangles);

// The closed tubes that close the model's ends for wave drag, as `machcut drag` does by
// default (ends.h): constant-area wakes behind the flat aft faces of the analysis mesh, and
// capture tubes behind the flat inlet faces of the shells named in `captures` ("FILE" or
// "FILE#k"). Appends a note per treatment. Throws InputError naming --capture for a name that
// matches no shell or a shell without a flat inlet face.
Mesh end_tubes(const LoadedModel& model, const std::vector<std::string>& captures,
               std::vector<std::string>& notes);

}  // namespace machcut::view
