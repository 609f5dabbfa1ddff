#include "cli_design.h"

#include <algorithm>
#include <cmath>

#include "machcut/common/errors.h"
#include "machcut/output/writers.h"
#include "machcut/sections/section.h"

namespace machcut::cli {

std::vector<double> checked_machs(std::vector<double> machs, const std::string& option) {
  for (double m : machs) {
    if (!std::isfinite(m)) throw InputError(option, "not a finite number");
    if (m < 1.0) throw InputError(option, "Mach " + format_number(m) + " is below 1 (the area rule needs M >= 1)");
    if (m > 20.0) throw InputError(option, "Mach above 20 is outside slender-body theory");
  }
  std::sort(machs.begin(), machs.end());
  machs.erase(std::unique(machs.begin(), machs.end()), machs.end());
  return machs;
}

AreaCurve design_curve(const PreparedModel& model, double mach, int stations) {
  const SectionEngine engine(model.analysis);
  const MachPlanes planes{mach, 0.0};
  AreaCurve c = engine.curve(planes, make_stations(engine.range(planes), stations, Spacing::uniform));
  c.united = model.united;
  SectionEngine(model.mesh).areas(planes, c.x, &c.per_shell);
  return c;
}

std::vector<AreaJump> model_jumps(const std::vector<AreaCurve>& curves) {
  std::vector<AreaJump> all;
  for (const AreaCurve& c : curves) {
    const auto j = find_jumps(c, eminton_lord_drag);
    all.insert(all.end(), j.begin(), j.end());
  }
  std::stable_sort(all.begin(), all.end(), [](const AreaJump& a, const AreaJump& b) { return a.share > b.share; });
  if (all.size() > 15) all.resize(15);  // the largest shares over all Mach numbers
  return all;
}

nlohmann::json jumps_json(const std::vector<AreaJump>& jumps, const std::vector<std::string>& names) {
  nlohmann::json arr = nlohmann::json::array();
  for (const AreaJump& j : jumps) {
    nlohmann::json shells = nlohmann::json::array();
    for (std::uint32_t s : j.shells) shells.push_back(s < names.size() ? names[s] : std::to_string(s));
    arr.push_back({{"mach", j.mach}, {"x", j.x}, {"kind", j.kind}, {"step_area", j.step},
                   {"slope_change", j.slope_change}, {"smoothed_from_x", j.x_from}, {"smoothed_to_x", j.x_to},
                   {"drag_area_change", j.drag_change}, {"share", j.share}, {"shells", shells}});
  }
  return arr;
}

std::vector<MachDrag> drag_sweep(const PreparedModel& model, const std::vector<double>& machs,
                                 double rel_tol, const EndOptions& ends,
                                 const ModelOptions& model_options) {
  const SectionEngine engine(model.analysis);
  EndTreatment treatment = end_treatment(ends, model, model_options);
  Progress progress("wave drag", model_options.quiet);
  std::vector<MachDrag> out;
  std::size_t i = 0;
  WaveDragOptions o;
  o.rel_tol = rel_tol;
  o.progress = [&](double f) { progress.update((static_cast<double>(i) + f) / static_cast<double>(machs.size())); };
  const WaveDragModel wd(engine, std::move(treatment.given), o, std::move(treatment.tubes));
  for (i = 0; i < machs.size(); ++i) out.push_back(wd.at_mach(machs[i]));
  progress.done();
  return out;
}

}  // namespace machcut::cli
