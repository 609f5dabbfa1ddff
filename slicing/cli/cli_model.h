// Opening the study for any command: options → StudyOptions → Study (study/study.h), with
// progress, notes and warnings on stderr.
#pragma once

#include <memory>

#include "cli_common.h"
#include "machcut/study/study.h"

namespace machcut::cli {

// The options as the core takes them (study_setup checks them).
StudyOptions study_options(const ModelOptions& model, const EndOptions* ends = nullptr);

// Prepares the model with a progress bar, prints its notes (unless quiet), its warnings and
// the end treatment's notes on stderr. Throws InputError for unreadable files or bad options;
// UnusableModel with the reason when `require_usable` and the model cannot be analysed
// (`inspect` passes false and reports it itself).
std::unique_ptr<Study> open_study(const ModelOptions& model, const EndOptions* ends = nullptr,
                                  bool require_usable = true);

}  // namespace machcut::cli
