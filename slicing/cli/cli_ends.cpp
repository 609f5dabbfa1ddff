#include "cli_ends.h"

#include <cmath>
#include <set>

#include "machcut/common/errors.h"
#include "machcut/output/writers.h"

namespace machcut::cli {

double parse_number(const std::string& text, const std::string& what) {
  std::size_t used = 0;
  double v = 0.0;
  try {
    v = std::stod(text, &used);
  } catch (const std::exception&) {
    used = 0;
  }
  if (used != text.size() || !std::isfinite(v)) throw InputError(what, "'" + text + "' is not a number");
  return v;
}

void add_end_options(CLI::App* cmd, EndOptions& o) {
  cmd->add_option("--capture", o.captures,
                  "Flow-through shells NAME (a shell FILE#k or all shells of FILE): subtract the "
                  "stream tube captured by their flat inlet faces; NAME=AREA: subtract AREA m² "
                  "from those shells' own areas instead. Repeatable")
      ->allow_extra_args(false);
  cmd->add_flag("--no-wake", o.no_wake,
                "Do not continue flat aft faces (bases, nozzle exits) by constant-area wakes");
}

EndTreatment end_treatment(const EndOptions& o, const PreparedModel& model,
                           const ModelOptions& mo) {
  EndTreatment e;
  const double x_far = far_station(model.analysis);
  std::vector<Mesh> parts;
  if (!o.no_wake) {
    Tubes w = flat_face_tubes(model.analysis, +1, x_far);
    if (w.faces > 0) {
      note(mo, "constant-area wake behind the flat aft faces (bases, nozzle exits): " +
                        format_number(w.face_area) + " m²");
      parts.push_back(std::move(w.mesh));
    }
  }
  std::set<std::uint32_t> taken;  // shells captured so far (ends.h: capture_shells)
  for (const std::string& c : o.captures) {
    const std::size_t eq = c.rfind('=');
    const std::string name = c.substr(0, eq);
    if (eq != std::string::npos) {
      const double area = parse_number(c.substr(eq + 1), "--capture");
      if (!(area > 0.0)) throw InputError("--capture", "capture area must be > 0 m²");
      for (std::uint32_t s : capture_shells(model.mesh, name, taken))
        e.given.push_back({model.mesh.shell_names[s], extract_shell(model.mesh, s), area});
      note(mo, "captured stream tube of " + format_number(area) + " m² subtracted for each shell of " + name);
      continue;
    }
    for (std::uint32_t s : capture_shells(model.mesh, name, taken)) {
      Tubes t = flat_face_tubes(extract_shell(model.mesh, s), -1, x_far);
      if (t.faces == 0)
        throw InputError("--capture", model.mesh.shell_names[s] + " has no flat inlet face "
                                      "(normal to the flow, facing upstream); give NAME=AREA");
      note(mo, "captured stream tube of " + model.mesh.shell_names[s] + ": inlet face " +
                        format_number(t.face_area) + " m² carried downstream and subtracted");
      parts.push_back(std::move(t.mesh));
    }
  }
  if (!parts.empty()) e.tubes = concatenate(parts);
  return e;
}

}  // namespace machcut::cli
