#include "machcut/study/comparison.h"

#include <algorithm>
#include <cmath>

#include "machcut/common/limits.h"

namespace machcut {

Comparison compare_studies(const Study& a, const Study& b, const CompareRequest& q,
                           const std::function<void(double)>& progress) {
  a.require_usable();
  b.require_usable();
  const std::vector<double> machs = checked_machs(q.machs, "--mach");
  Comparison c;
  const DragSweep da = a.drag(machs, q.drag, progress_phase(progress, 0.0, 0.45));
  const DragSweep db = b.drag(machs, q.drag, progress_phase(progress, 0.45, 0.45));
  for (std::size_t i = 0; i < machs.size(); ++i) {
    CompareRow r;
    r.mach = machs[i];
    r.a = da.results[i];
    r.b = db.results[i];
    r.ok = r.a.ok && r.b.ok;
    if (r.ok) {
      r.delta = r.b.drag_area - r.a.drag_area;
      r.delta_error = r.a.error_estimate + r.b.error_estimate;
    }
    c.rows.push_back(std::move(r));
  }
  // The area curves at M = 1 on common uniform stations spanning both variants.
  const StationRange ra = a.engine().range({1.0, 0.0}), rb = b.engine().range({1.0, 0.0});
  c.x = make_stations({std::min(ra.lo, rb.lo), std::max(ra.hi, rb.hi)}, q.stations, Spacing::uniform);
  c.area_a = a.engine().areas({1.0, 0.0}, c.x);
  c.area_b = b.engine().areas({1.0, 0.0}, c.x);
  c.delta_area.resize(c.x.size());
  for (std::size_t i = 0; i < c.x.size(); ++i) c.delta_area[i] = c.area_b[i] - c.area_a[i];
  // The split on the exact slope grid with the ends closed as for the drag, on the cells the
  // drags ended on, at M = 1 and at each Mach above 1 (roll-averaged).
  std::vector<double> split_machs{1.0};
  for (double m : machs)
    if (m > 1.0) split_machs.push_back(m);
  for (std::size_t k = 0; k < split_machs.size(); ++k) {
    if (progress) progress(0.9 + 0.1 * static_cast<double>(k) / static_cast<double>(split_machs.size()));
    ZoneSplit z;
    z.mach = split_machs[k];
    const MachDrag ma = a.drag_at(z.mach, q.drag), mb = b.drag_at(z.mach, q.drag);
    z.cells = std::max({ma.stations, mb.stations, q.drag.cells});
    z.rolls = z.mach > 1.0 ? q.zone_rolls : 1;
    for (const CompareRow& r : c.rows)
      if (r.mach == z.mach && r.ok) z.table_delta = r.delta;
    z.zones = drag_difference_by_zone(a.drag_model(q.drag), b.drag_model(q.drag), q.zones, z.cells, z.mach, z.rolls);
    if (z.zones.ok) {
      z.method = "exact slope grid of " + std::to_string(z.cells) + " cells, ends closed as for the drag" +
                 (z.mach > 1.0 ? ", averaged over " + std::to_string(z.rolls) + " roll angles" : std::string());
    } else if (z.mach == 1.0) {
      const std::string why = z.zones.problem;
      z.zones = drag_difference_by_zone(c.x, c.area_a, c.area_b, q.zones);
      z.method = "Eminton–Lord fit of the bare area curves on common stations (" + why + ")";
    } else {
      z.method = "not split: " + z.zones.problem;
    }
    c.splits.push_back(std::move(z));
  }
  if (progress) progress(1.0);
  return c;
}

}  // namespace machcut
