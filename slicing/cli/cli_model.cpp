#include "cli_model.h"

#include <memory>

#include "cli_commands.h"
#include "machcut/common/errors.h"

namespace machcut::cli {

namespace {

SignedAxis axis_option(const std::string& name, const std::string& value) {
  const auto a = parse_axis(value);
  if (!a) throw InputError(name, "'" + value + "' is not an axis; use +x, -x, +y, -y, +z or -z");
  return *a;
}

}  // namespace

ModelSetup model_setup(const ModelOptions& o) {
  ModelSetup s;
  const auto unit = parse_length_unit(o.units);
  if (!unit) throw InputError("--units", "'" + o.units + "' is not a unit; use m, mm, cm, in or ft");
  s.import.unit = *unit;
  s.import.axes.flow = axis_option("--flow", o.flow);
  s.import.axes.up = axis_option("--up", o.up);
  if (s.import.axes.flow.axis == s.import.axes.up.axis)
    throw InputError("--up", "'" + o.up + "' is along the same axis as --flow '" + o.flow + "'");
  s.unite = !o.sum;
  return s;
}

machcut::PreparedModel prepare_with_progress(const ModelOptions& o) {
  ModelSetup setup = model_setup(o);
  std::unique_ptr<Progress> bar;
  std::string current;
  setup.progress = [&](const std::string& stage, double fraction) {
    if (stage != current) {
      if (bar) bar->done();
      bar = std::make_unique<Progress>(stage, o.quiet);
      current = stage;
    }
    bar->update(fraction);
  };
  PreparedModel model = prepare_model(o.files, setup);
  if (bar) bar->done();
  for (const std::string& n : model.notes) note(o, n);
  for (const std::string& w : model.warnings) warn(w);
  return model;
}

machcut::PreparedModel load_model(const ModelOptions& o) {
  PreparedModel model = prepare_with_progress(o);
  if (!model.usable) throw UnusableModel("model not usable: " + model.reason);
  return model;
}

}  // namespace machcut::cli
