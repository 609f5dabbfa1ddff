#include "cli_model.h"

#include <iostream>

#include "cli_commands.h"
#include "machcut/common/errors.h"

namespace machcut::cli {

StudyOptions study_options(const ModelOptions& o, const EndOptions* ends) {
  StudyOptions s;
  s.files = o.files;
  s.units = o.units;
  s.flow = o.flow;
  s.up = o.up;
  s.sum = o.sum;
  s.cache = !o.no_cache;
  s.strict = o.strict;
  s.wrap_alpha = o.wrap_alpha;
  s.wrap_offset = o.wrap_offset;
  s.skip = o.skip;
  s.only = o.only;
  if (ends) {
    s.captures = ends->captures;
    s.no_wake = ends->no_wake;
  }
  return s;
}

std::unique_ptr<Study> open_study(const ModelOptions& o, const EndOptions* ends, bool require_usable) {
  StudySetup setup = study_setup(study_options(o, ends));
  std::unique_ptr<Progress> bar;
  std::string current;
  setup.model.progress = [&](const std::string& stage, double fraction) {
    if (stage != current) {
      if (bar) bar->done();
      bar = std::make_unique<Progress>(stage, o.quiet);
      current = stage;
    }
    bar->update(fraction);
  };
  PreparedModel model = prepare_model(setup.files, setup.model);
  if (bar) bar->done();
  bar.reset();
  // The reason first when the model cannot be used: notes would bury it.
  if (require_usable && !model.usable) throw UnusableModel("model not usable: " + model.reason);
  if (!model.usable) std::cerr << "machcut: model not usable: " << model.reason << "\n";
  for (const std::string& n : model.notes) note(o, n);
  for (const std::string& w : model.warnings) warn(w);
  auto study = std::make_unique<Study>(std::move(model), setup.ends);
  for (const std::string& n : study->end_notes()) note(o, n);
  return study;
}

}  // namespace machcut::cli
