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
  auto part = [&](double from, double span) {
    return [&progress, from, span](double f) {
      if (progress) progress(from + span * f);
    };
  };
  const DragSweep da = a.drag(machs, q.drag, part(0.0, 0.45));
  const DragSweep db = b.drag(machs, q.drag, part(0.45, 0.45));
  for (std::size_t i = 0; i < machs.size(); ++i) {
    CompareRow r;
    r.mach = machs[i];
    r.a = da.results[i];
    r.b = db.results[i];
    r.ok = r.a.ok && r.b.ok;
    if (r.ok) {
      r.delta = r.b.drag_area - r.a.drag_area;
      r.delta_error = r.a.error_estimate + r.b.error_estimate;
      if (r.mach == 1.0) c.table_delta_m1 = r.delta;
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
  // M = 1 drags ended on, so that the zones add up to the table's change at M = 1.
  const MachDrag m1a = a.drag_at(1.0, q.drag), m1b = b.drag_at(1.0, q.drag);
  c.zone_cells = std::max({m1a.stations, m1b.stations, q.drag.cells});
  c.zones = drag_difference_by_zone(a.drag_model(q.drag), b.drag_model(q.drag), q.zones, c.zone_cells);
  if (c.zones.ok) {
    c.zones_method = "exact slope grid of " + std::to_string(c.zone_cells) + " cells, ends closed as for the drag";
  } else {
    const std::string why = c.zones.problem;
    c.zones = drag_difference_by_zone(c.x, c.area_a, c.area_b, q.zones);
    c.zones_method = "Eminton–Lord fit of the bare area curves on common stations (" + why + ")";
  }
  if (progress) progress(1.0);
  return c;
}

}  // namespace machcut
