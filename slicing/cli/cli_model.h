// Loading the model for any command: options → ModelSetup → prepare_model, with progress,
// notes and warnings on stderr.
#pragma once

#include "cli_common.h"
#include "machcut/intake/model.h"

namespace machcut::cli {

// The ModelSetup for `options`. Throws InputError naming the option for a bad --units,
// --flow or --up (or flow and up along the same axis).
ModelSetup model_setup(const ModelOptions& options);

// Imports and prepares the model (model.h) with a progress bar, prints its notes (unless quiet)
// and warnings on stderr; returns it even when not usable (for `inspect`). Throws InputError.
machcut::PreparedModel prepare_with_progress(const ModelOptions& options);

// Imports and prepares the model (model.h) with a progress bar, prints its notes (unless
// quiet) and warnings on stderr. Throws InputError for unreadable files or bad options, and
// UnusableModel (cli_commands.h) with the reason when the model cannot be analysed.
machcut::PreparedModel load_model(const ModelOptions& options);

}  // namespace machcut::cli
