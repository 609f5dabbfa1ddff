// machcut inspect: the health report of a model (what was found, what was repaired).
#include <nlohmann/json.hpp>

#include <cstdio>
#include <memory>
#include <sstream>

#include "cli_commands.h"
#include "cli_common.h"
#include "cli_model.h"
#include "machcut/common/limits.h"
#include "machcut/intake/model.h"
#include "machcut/output/writers.h"

namespace machcut::cli {

namespace {

struct InspectOptions {
  ModelOptions model;
  std::string json;
};

nlohmann::json point(const Vec3& p) { return {p.x, p.y, p.z}; }

nlohmann::json points(const std::vector<Vec3>& ps) {
  nlohmann::json a = nlohmann::json::array();
  for (const Vec3& p : ps) a.push_back(point(p));
  return a;
}

nlohmann::json shell_json(const ShellHealth& s) {
  return {{"name", s.name},
          {"triangles", s.triangles},
          {"volume", s.volume},
          {"closed", s.closed},
          {"oriented", s.oriented},
          {"boundary_edges", s.boundary_edges},
          {"nonmanifold_edges", s.nonmanifold_edges},
          {"degenerate_triangles", s.degenerate_triangles},
          {"flipped_faces", s.flipped_faces},
          {"inverted", s.inverted}};
}

nlohmann::json pairs_json(const std::vector<ShellPair>& pairs, const PreparedModel& m,
                          const char* a, const char* b) {
  nlohmann::json arr = nlohmann::json::array();
  for (const ShellPair& p : pairs)
    arr.push_back({{a, m.health.shells[p.a].name}, {b, m.health.shells[p.b].name}});
  return arr;
}

nlohmann::json to_json(const PreparedModel& m) {
  const HealthReport& h = m.health;
  nlohmann::json j;
  j["files"] = m.files;
  j["usable"] = m.usable;
  j["reason"] = m.reason;
  j["triangles"] = h.triangles;
  j["vertices"] = h.vertices;
  nlohmann::json shells = nlohmann::json::array();
  for (const ShellHealth& s : h.shells) shells.push_back(shell_json(s));
  j["shells"] = shells;
  j["closed"] = h.closed;
  j["boundary_edges"] = h.boundary_edges;
  j["boundary_samples"] = points(h.boundary_samples);
  j["nonmanifold_edges"] = h.nonmanifold_edges;
  j["nonmanifold_samples"] = points(h.nonmanifold_samples);
  j["degenerate_triangles"] = h.degenerate_triangles;
  j["bounds"] = {{"min", point(h.bounds.lo)}, {"max", point(h.bounds.hi)}};
  j["length"] = h.length;
  j["wetted_area"] = h.wetted_area;
  j["volume"] = h.volume;
  j["volume_is_union"] = h.volume_is_union;
  j["overlaps_checked"] = h.overlaps_checked;
  j["intersecting"] = pairs_json(h.intersecting, m, "a", "b");
  j["contained"] = pairs_json(h.contained, m, "inner", "outer");
  nlohmann::json self = nlohmann::json::array();
  for (std::uint32_t s : h.self_intersecting) self.push_back(h.shells[s].name);
  j["self_intersecting"] = self;
  j["united"] = m.united;
  nlohmann::json holes = nlohmann::json::array();
  for (const Hole& hole : m.holes)
    holes.push_back({{"shell", h.shells[hole.shell].name},
                     {"vertices", hole.loop.size()},
                     {"projected_area", hole.projected_area}});
  j["holes"] = holes;
  nlohmann::json wraps = nlohmann::json::array();
  for (const WrappedShell& w : m.wraps)
    wraps.push_back({{"shell", h.shells[w.shell].name}, {"why", w.why}, {"alpha", w.alpha},
                     {"offset", w.offset}, {"volume_before", w.volume_before},
                     {"volume_after", w.volume_after}, {"area_bound", w.area_bound}});
  j["wrapped"] = wraps;
  nlohmann::json left = nlohmann::json::array();
  for (const LeftOut& l : m.left_out)
    left.push_back({{"shell", l.name}, {"why", l.why}, {"triangles", l.triangles}});
  j["left_out"] = left;
  j["notes"] = m.notes;
  j["warnings"] = m.warnings;
  j["units"] = {{"length", "m"}, {"area", "m^2"}, {"volume", "m^3"}};
  j["caution"] = kCaution;
  return j;
}

// Six significant digits for reading (the JSON keeps full precision).
std::string num(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.6g", v);
  return buf;
}

std::string box_text(const Box3& b) {
  if (is_empty(b)) return "empty";
  return "x " + num(b.lo.x) + " to " + num(b.hi.x) + ", y " + num(b.lo.y) + " to " +
         num(b.hi.y) + ", z " + num(b.lo.z) + " to " + num(b.hi.z) + " m";
}

void shells_text(const HealthReport& h, std::ostringstream& s) {
  char line[256];
  std::snprintf(line, sizeof line, "  %-28s %10s %14s %6s %8s %8s %6s %7s %8s\n", "shell",
                "triangles", "volume m³", "closed", "boundary", "non-man.", "degen.", "flipped",
                "inverted");
  s << line;
  for (const ShellHealth& sh : h.shells) {
    std::snprintf(line, sizeof line, "  %-28s %10zu %14.6g %6s %8zu %8zu %6zu %7zu %8s\n",
                  sh.name.c_str(), sh.triangles, sh.volume, sh.closed ? "yes" : "no",
                  sh.boundary_edges, sh.nonmanifold_edges, sh.degenerate_triangles,
                  sh.flipped_faces, sh.inverted ? "fixed" : "no");
    s << line;
  }
}

void overlaps_text(const PreparedModel& m, std::ostringstream& s) {
  const HealthReport& h = m.health;
  for (const ShellPair& p : h.intersecting)
    s << "  " << h.shells[p.a].name << " and " << h.shells[p.b].name << " intersect\n";
  for (const ShellPair& p : h.contained)
    s << "  " << h.shells[p.a].name << " lies inside " << h.shells[p.b].name << "\n";
  for (std::uint32_t i : h.self_intersecting)
    s << "  " << h.shells[i].name << " intersects itself\n";
  if (h.intersecting.empty() && h.contained.empty()) s << "  none\n";
}

std::string to_text(const PreparedModel& m) {
  const HealthReport& h = m.health;
  std::ostringstream s;
  s << "machcut inspect — model health (SI units; the analyses that follow are preliminary\n"
       "design estimates, to be confirmed by validated analysis and test)\n";
  s << "triangles " << h.triangles << ", vertices " << h.vertices << ", shells "
    << h.shells.size() << "\n";
  s << "bounds " << box_text(h.bounds) << "; length along the flow " << num(h.length) << " m\n";
  s << "wetted area " << num(h.wetted_area) << " m², volume " << num(h.volume) << " m³ ("
    << (h.volume_is_union ? "union" : "sum: overlaps counted twice") << ")\n";
  s << "closed " << (h.closed ? "yes" : "no") << "; boundary edges " << h.boundary_edges;
  for (const Vec3& p : h.boundary_samples)
    s << (&p == &h.boundary_samples.front() ? " e.g. at " : ", ") << "(" << num(p.x) << ", "
      << num(p.y) << ", " << num(p.z) << ")";
  s << "\nnon-manifold edges " << h.nonmanifold_edges << ", degenerate triangles "
    << h.degenerate_triangles << "\n";
  shells_text(h, s);
  if (h.overlaps_checked) {
    s << "overlaps:\n";
    overlaps_text(m, s);
  } else {
    s << "overlaps: not checked (the preparation stopped before the overlap check; see "
         "'usable' below)\n";
  }
  double hole_area = 0.0;
  for (const Hole& hole : m.holes) hole_area += hole.projected_area;
  if (!m.holes.empty())
    s << "holes " << m.holes.size() << " closed by fans, projected area " << num(hole_area)
      << " m² (bounds the area error at their stations)\n";
  for (const WrappedShell& w : m.wraps)
    s << "wrapped " << h.shells[w.shell].name << ": " << w.why << "; alpha " << num(w.alpha)
      << " m, offset " << num(w.offset) << " m, volume " << num(w.volume_before) << " → "
      << num(w.volume_after) << " m³, areas change by up to " << num(w.area_bound) << " m²\n";
  for (const LeftOut& l : m.left_out)
    s << "left out " << l.name << " (" << l.triangles << " triangles): " << l.why << "\n";
  s << "united " << (m.united ? "yes" : "no") << "\n";
  s << "usable " << (m.usable ? "yes" : "no: " + m.reason) << "\n";
  return s.str();
}

void run_inspect(const InspectOptions& o) {
  if (!o.json.empty()) check_output_path(o.json, o.model.files);
  const auto study = open_study(o.model, nullptr, false);
  const PreparedModel& model = study->model();
  const std::vector<std::string>& inputs = o.model.files;
  if (!o.json.empty()) write_output(o.json, to_json(model).dump(2) + "\n", inputs);
  if (o.json != "-") write_output("-", to_text(model), inputs);
  if (!model.usable) throw UnusableModel("");  // the reason went first to stderr (open_study)
}

}  // namespace

void add_inspect_command(CLI::App& app) {
  auto opts = std::make_shared<InspectOptions>();
  CLI::App* cmd = app.add_subcommand(
      "inspect",
      "Health report of a model: shells, open and non-manifold edges, degenerate and flipped\n"
      "triangles, inverted shells, overlaps, holes, volume and wetted area (SI units).\n"
      "Exit 0 when the model is usable for the analysis, 1 (with the reason) when not.");
  add_model_options(cmd, opts->model);
  cmd->add_option("--json", opts->json, "Also write the report as JSON to FILE ('-' = stdout)");
  cmd->callback([opts] { run_inspect(*opts); });
}

}  // namespace machcut::cli
