// Benchmark: the 11-Mach wave-drag sweep (M 1.0–2.0, step 0.1) of an invented low-poly aircraft
// (rough_aircraft.h: flat intake faces, box fins, crude facets) at two tessellations of the same
// shape, about 15 000 and 120 000 triangles after the union, with the default options: length
// floor, validity features and their shares included. The baseline, measured in the same run
// on the same meshes, is the classic fixed-count practice: 36 uniform roll angles × 129 cosine
// stations per Mach, Eminton–Lord drag, no error control. After the runs it prints the sweep
// times, their ratio to the baseline, and D/q of the two tessellations at M 1.2, 1.6 and 2 with
// their relative difference, the resolution state and the largest features.
#include <benchmark/benchmark.h>

#include <tbb/parallel_for.h>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <map>
#include <memory>
#include <vector>

#include "machcut/drag/eminton_lord.h"
#include "machcut/drag/ends.h"
#include "machcut/drag/wave_drag.h"
#include "machcut/intake/union.h"
#include "machcut/sections/section.h"
#include "rough_aircraft.h"

namespace {

struct Model {
  machcut::Mesh parts;     // the shells as generated
  machcut::Mesh analysis;  // their union
  machcut::Mesh wakes;     // behind the flat aft faces
  std::unique_ptr<machcut::SectionEngine> engine;
};

const Model& model(double level) {
  static std::map<double, std::unique_ptr<Model>> cache;
  auto& slot = cache[level];
  if (!slot) {
    slot = std::make_unique<Model>();
    slot->parts = machcut::bench::rough_aircraft(level);
    const std::vector<bool> closed(slot->parts.shell_names.size(), true);
    const auto t0 = std::chrono::steady_clock::now();
    machcut::UnionResult u = machcut::unite_overlapping(
        slot->parts, closed, machcut::find_overlaps(slot->parts, closed));
    const double s = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    slot->analysis = std::move(u.mesh);
    slot->wakes =
        machcut::flat_face_tubes(slot->analysis, +1, machcut::far_station(slot->analysis)).mesh;
    slot->engine = std::make_unique<machcut::SectionEngine>(slot->analysis);
    std::printf(
        "rough aircraft, level %.1f: %zu triangles in %zu parts, %zu after the union (%.1f s)\n",
        level, slot->parts.triangles.size(), slot->parts.shell_names.size(),
        slot->analysis.triangles.size(), s);
  }
  return *slot;
}

std::vector<double> sweep() {
  std::vector<double> m;
  for (int k = 0; k <= 10; ++k) m.push_back(1.0 + 0.1 * k);
  return m;
}

double seconds_since(std::chrono::steady_clock::time_point t0) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

std::map<double, double> g_sweep_s, g_baseline_s;            // per level, this run
std::map<double, std::vector<machcut::MachDrag>> g_results;  // per level

void BM_Sweep(benchmark::State& state) {
  const double level = state.range(0) / 10.0;
  const Model& m = model(level);
  std::vector<machcut::MachDrag> results;
  for (auto _ : state) {
    const auto t0 = std::chrono::steady_clock::now();
    const machcut::WaveDragModel wdm(*m.engine, {}, {}, m.wakes, &m.parts);
    results.clear();
    for (double mach : sweep()) results.push_back(wdm.at_mach(mach));
    g_sweep_s[level] = seconds_since(t0);
  }
  int rolls = 0, limited = 0, with_value = 0;
  for (const machcut::MachDrag& d : results) {
    rolls += d.roll_evaluations;
    limited += d.resolution_limited ? 1 : 0;
    with_value += d.ok ? 1 : 0;
  }
  state.counters["triangles"] = static_cast<double>(m.analysis.triangles.size());
  state.counters["roll_evaluations"] = rolls;
  state.counters["machs_with_value"] = with_value;
  state.counters["resolution_limited"] = limited;
  g_results[level] = results;
}

void BM_FixedCountBaseline(benchmark::State& state) {
  const double level = state.range(0) / 10.0;
  const Model& m = model(level);
  std::vector<double> rolls;
  for (int i = 0; i < 36; ++i) rolls.push_back(360.0 * (i + 0.5) / 36);
  for (auto _ : state) {
    const auto t0 = std::chrono::steady_clock::now();
    const machcut::WaveDragModel wdm(*m.engine, {}, {}, m.wakes);
    for (double mach : sweep()) {
      std::vector<double> d(rolls.size());
      tbb::parallel_for(std::size_t{0}, rolls.size(), [&](std::size_t k) {
        const auto x = machcut::make_stations(m.engine->range({mach, rolls[k]}), 129,
                                              machcut::Spacing::cosine);
        d[k] = machcut::eminton_lord_fit(x, wdm.areas(mach, rolls[k], x)).drag_area;
      });
      benchmark::DoNotOptimize(d.data());
    }
    g_baseline_s[level] = seconds_since(t0);
  }
}

void print_summary() {
  for (const auto& [level, s] : g_sweep_s) {
    const double base = g_baseline_s.count(level) ? g_baseline_s[level] : 0.0;
    std::printf(
        "level %.1f: 11-Mach sweep %.2f s = %.2f × the fixed 36-roll × 129-station baseline (%.2f "
        "s)\n",
        level, s, base > 0.0 ? s / base : 0.0, base);
  }
  if (g_results.size() < 2) return;
  const std::vector<machcut::MachDrag>& a = g_results.begin()->second;
  const std::vector<machcut::MachDrag>& b = g_results.rbegin()->second;
  std::printf("   M   D/q coarse (growth/halving)   D/q fine (growth/halving)   difference\n");
  for (std::size_t k = 0; k < a.size() && k < b.size(); ++k) {
    if (!a[k].ok || !b[k].ok) {
      std::printf("%5.2f  no value: %s\n", a[k].mach,
                  (a[k].ok ? b[k] : a[k]).problem.substr(0, 90).c_str());
      continue;
    }
    std::printf("%5.2f  %8.4f (%+.3f%s)   %8.4f (%+.3f%s)   %+5.1f %%\n", a[k].mach, a[k].drag_area,
                a[k].growth_per_halving, a[k].resolution_limited ? ", limited" : "", b[k].drag_area,
                b[k].growth_per_halving, b[k].resolution_limited ? ", limited" : "",
                100.0 * (b[k].drag_area - a[k].drag_area) / a[k].drag_area);
  }
  for (double mach : {1.0, 1.6}) {
    for (const auto& [level, results] : g_results)
      for (const machcut::MachDrag& d : results) {
        if (std::fabs(d.mach - mach) > 1e-9) continue;
        std::printf("level %.1f, M %.1f: %zu features; %s\n", level, mach, d.features.size(),
                    d.advice.c_str());
      }
  }
}

}  // namespace

BENCHMARK(BM_FixedCountBaseline)->Arg(10)->Arg(32)->Unit(benchmark::kMillisecond)->Iterations(1);
BENCHMARK(BM_Sweep)->Arg(10)->Arg(32)->Unit(benchmark::kMillisecond)->Iterations(2);
int main(int argc, char** argv) {
  benchmark::Initialize(&argc, argv);
  benchmark::RunSpecifiedBenchmarks();
  print_summary();
  benchmark::Shutdown();
  return 0;
}
