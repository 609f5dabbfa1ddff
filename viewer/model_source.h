// Where the viewer's model comes from: files through the core's study, or an invented
// generated body for demonstrations, tests and benchmarks.
#pragma once

#include <cstddef>
#include <functional>
#include <memory>
#include <string>
#include <vector>

#include "app_state.h"
#include "machcut/common/mesh.h"
#include "machcut/intake/model.h"
#include "machcut/study/study.h"

namespace machcut::view {

using StageProgress = std::function<void(const std::string& stage, double fraction)>;

// The study of `files` with the controls' units, axes, union setting and captures, through
// the core (study.h: the same options and defaults as the CLI, the prepared-model cache
// included). Throws InputError naming the file for unreadable input or a bad option. A model
// that reads but cannot be analysed comes back all the same (model().usable false, reason
// set), so that its mesh and health can be shown.
std::shared_ptr<const Study> open_study(const std::vector<std::string>& files, const Controls& controls,
                                        const StageProgress& progress);

// An invented test configuration of about `triangles` triangles (>= 1000): a fuselage of
// revolution with a flat base and two disjoint under-wing pods. Not a real aircraft.
PreparedModel generated_model(std::size_t triangles);

}  // namespace machcut::view
