// HTML design report — see report.h.
#include "machcut/output/report.h"

#include "machcut/common/limits.h"

#include <cmath>
#include <cstdio>
#include <regex>
#include <sstream>

#include "machcut/output/plot.h"

namespace machcut {
namespace {

constexpr std::uint32_t kPalette[] = {0x1b6f8a, 0xd0661c, 0x6b8e23, 0x8e4585, 0x4a4a4a};

std::string num(double v, int sig = 4) {
  if (!std::isfinite(v)) return "–";
  char buf[48];
  std::snprintf(buf, sizeof buf, "%.*g", sig, v);
  return buf;
}

std::string mach_label(double m) { return "M = " + num(m, 3); }

std::string figure(const Plot& p, int& counter, const std::string& caption) {
  const std::string id = "fig" + std::to_string(++counter) + "-";
  return "<figure>" + inline_svg(plot_svg(p, 820, 380), id) + "<figcaption>" + html_escape(caption) +
         "</figcaption></figure>\n";
}

const char* kStyle = R"(<style>
body{font-family:sans-serif;max-width:900px;margin:24px auto;padding:0 16px;color:#222;line-height:1.45}
h1{font-size:26px;margin-bottom:4px} h2{font-size:20px;border-bottom:2px solid #1b6f8a;padding-bottom:3px;margin-top:34px}
.caution{background:#fff4e0;border-left:5px solid #d0661c;padding:10px 14px;margin:14px 0}
table{border-collapse:collapse;margin:10px 0} td,th{border:1px solid #c8d0d6;padding:4px 10px;text-align:right}
th{background:#eef3f6} td.l,th.l{text-align:left} figure{margin:14px 0} figure svg{max-width:100%;height:auto} figcaption{font-size:13px;color:#555}
.muted{color:#666;font-size:13px}
</style>)";

std::string caution() {
  return std::string("<div class=\"caution\"><b>") + html_escape(kCaution) +
         "</b> Linear theory does not hold where the surface faces the flow more steeply than the "
         "Mach cone (blunt noses, flat faces) or near M = 1 (machcut's method document, "
         "docs/method.md §9).</div>\n";
}

std::string health_section(const ReportInput& in) {
  std::string s = "<h2>Model</h2>\n<ul>\n";
  for (const std::string& line : in.health) s += "<li>" + html_escape(line) + "</li>\n";
  const CurveMeasures& m = in.measures;
  s += "<li>Length " + num(m.length) + " m from x = " + num(m.x0) + " m; volume " + num(m.volume) +
       " m³; largest normal-cut area " + num(m.max_area) + " m² at x = " + num(m.x_max_area) + " m</li>\n</ul>\n";
  return s;
}

std::string area_section(const ReportInput& in, int& fig) {
  if (in.curves.empty()) return "";
  Plot p{"Area distributions (roll angle 0°)", "station x (m)", "area (m²)", {}, {}, false, true};
  for (std::size_t i = 0; i < in.curves.size(); ++i)
    p.series.push_back({mach_label(in.curves[i].mach), in.curves[i].x, in.curves[i].area, kPalette[i % 5], false, false, 2.0});
  const AreaCurve& c0 = in.curves.front();
  PlotSeries sh{"Sears–Haack, same l and V", {}, {}, 0x888888, true, false, 1.6};
  for (double x : c0.x) { sh.x.push_back(x); sh.y.push_back(sears_haack_area(in.measures.x0, in.measures.length, in.measures.volume, x)); }
  p.series.push_back(sh);
  int k = 0;
  for (const AreaJump& j : in.jumps) if (j.mach == 1.0 && k < 6) p.markers.push_back({j.x, "J" + std::to_string(++k)});
  return "<h2>Area distributions</h2>\n" +
         figure(p, fig, "Projected section areas at M = 1 (normal cuts) and along Mach planes at the chosen Mach numbers; "
                        "dashed: the Sears–Haack body of the same length and volume; J1…: the largest area jumps at M = 1.");
}

std::string drag_section(const ReportInput& in, int& fig) {
  std::string s = "<h2>Wave drag against Mach number</h2>\n<table><tr><th>Mach</th><th>D/q (m²)</th><th>± estimate (m²)</th>";
  if (in.reference_area > 0) s += "<th>C<sub>D</sub></th>";
  s += "<th>÷ Sears–Haack</th><th class=\"l\">note</th></tr>\n";
  Plot p{"Zero-lift wave drag", "Mach number", "D/q (m²)", {}, {}, false, true};
  PlotSeries d{"model D/q", {}, {}, kPalette[0], false, true, 2.0};
  PlotSeries sh{"Sears–Haack, same l and V", {}, {}, 0x888888, true, false, 1.6};
  for (const ReportDragRow& r : in.drag) {
    s += "<tr><td>" + num(r.mach, 3) + "</td><td>" + (r.ok ? num(r.drag_area) : "–") + "</td><td>" + (r.ok ? num(r.error_estimate, 2) : "–") + "</td>";
    if (in.reference_area > 0) s += "<td>" + (r.ok ? num(r.drag_area / in.reference_area) : "–") + "</td>";
    s += "<td>" + (r.ok && in.sears_haack_drag_area > 0 ? num(r.drag_area / in.sears_haack_drag_area, 3) : "–") + "</td><td class=\"l\">" + html_escape(r.note) + "</td></tr>\n";
    if (r.ok) { d.x.push_back(r.mach); d.y.push_back(r.drag_area); }
    sh.x.push_back(r.mach); sh.y.push_back(in.sears_haack_drag_area);
  }
  s += "</table>\n";
  std::string advice;
  for (const ReportDragRow& r : in.drag)
    if (!r.advice.empty()) advice += "<li>M " + num(r.mach, 3) + ": " + html_escape(r.advice) + "</li>\n";
  if (!advice.empty())
    s += "<p>Where the surface faces the flow more steeply than the Mach angle, linear theory does not hold "
         "and the value depends on the facets and the cell size:</p>\n<ul>\n" + advice + "</ul>\n";
  p.series = {d, sh};
  if (d.x.size() >= 2) s += figure(p, fig, "D/q of the model (points) and of the Sears–Haack body of the same length and volume (dashed).");
  if (in.reference_area > 0 && d.x.size() >= 2) {
    Plot c{"Wave-drag coefficient", "Mach number", "C_D (S_ref = " + num(in.reference_area) + " m²)", {}, {}, false, true};
    PlotSeries cd{"C_D", d.x, {}, kPalette[1], false, true, 2.0};
    for (double v : d.y) cd.y.push_back(v / in.reference_area);
    c.series = {cd};
    s += figure(c, fig, "C_D = (D/q)/S_ref.");
  }
  return s;
}

std::string jumps_section(const ReportInput& in) {
  std::string s = "<h2>Area jumps</h2>\n<p>Stations where the area curve steps or its slope kinks, ranked by the drag "
                  "change when that region of the curve is replaced by a smooth local fit (shares overlap and need not add up).</p>\n";
  if (in.jumps.empty()) return s + "<p>None above the detection threshold.</p>\n";
  s += "<table><tr><th class=\"l\">#</th><th>Mach</th><th>x (m)</th><th class=\"l\">kind</th><th>step (m²)</th><th>slope change (m²/m)</th>"
       "<th>share of D/q</th><th class=\"l\">shells</th></tr>\n";
  int k = 0;
  for (const AreaJump& j : in.jumps) {
    std::string shells;
    for (std::uint32_t id : j.shells) shells += (shells.empty() ? "" : ", ") + (id < in.shell_names.size() ? in.shell_names[id] : std::to_string(id));
    const std::string tag = j.mach == 1.0 && k < 6 ? "J" + std::to_string(++k) : "";
    s += "<tr><td class=\"l\">" + tag + "</td><td>" + num(j.mach, 3) + "</td><td>" + num(j.x) + "</td><td class=\"l\">" + j.kind + "</td><td>" + num(j.step, 3) +
         "</td><td>" + num(j.slope_change, 3) + "</td><td>" + num(100 * j.share, 3) + " %</td><td class=\"l\">" + html_escape(shells) + "</td></tr>\n";
  }
  return s + "</table>\n";
}

std::string target_section(const ReportInput& in, int& fig) {
  const Correction& c = in.correction;
  std::string s = "<h2>Least-drag target and redesign correction</h2>\n<p>The area distribution of least wave drag "
                  "(Eminton 1956; Eminton &amp; Lord 1956) under these constraints:</p>\n<ul>\n";
  for (const std::string& line : in.constraints) s += "<li>" + html_escape(line) + "</li>\n";
  s += "</ul>\n<p>Target D/q = <b>" + num(in.target.drag_area) + " m²</b> (slender-body, closed-form); Sears–Haack of the same length and volume: " +
       num(in.sears_haack_drag_area) + " m².";
  if (!in.target.max_area_met) s += " <b>The maximum area could not be met everywhere.</b>";
  if (in.target.min_area < -1e-6 * in.measures.max_area) s += " <b>The target goes negative somewhere: the constraints fight each other.</b>";
  s += "</p>\n";
  if (c.x.empty()) return s;
  Plot a{"Current and target area (M = 1)", "station x (m)", "area (m²)", {}, {}, false, true};
  a.series = {{"current", c.x, c.area, kPalette[0], false, false, 2.0}, {"least-drag target", c.x, c.target, kPalette[1], true, false, 2.0}};
  s += figure(a, fig, "Normal-cut area of the model and the least-drag target.");
  Plot d{"Correction: area to add (+) or take out (−)", "station x (m)", "Δ area (m²)", {}, {}, true, true};
  d.series = {{"Δ area", c.x, c.delta_area, kPalette[3], false, false, 2.0}};
  s += figure(d, fig, "Target minus current area (the \"coke-bottle\" correction); also in correction.csv beside this page.");
  Plot r{"Equivalent-radius change", "station x (m)", "Δ r (m)", {}, {}, true, true};
  r.series = {{"Δ r = √(S_target/π) − √(S/π)", c.x, c.delta_radius, kPalette[2], false, false, 2.0}};
  s += figure(r, fig, "For a fuselage of near-circular section: the radius change that gives the corrected area.");
  for (const ReportInput::MachCorrection& mc : in.mach_corrections) {
    const Correction& k = mc.correction;
    if (k.x.empty()) continue;
    char mach[32];
    std::snprintf(mach, sizeof mach, "%.3g", mc.mach);
    s += "<h3>At M = " + std::string(mach) + "</h3>\n<p>The same constraints on the roll-averaged Mach-plane area "
         "curve (the equivalent body at this Mach; Jones 1956): target D/q = <b>" + num(mc.target.drag_area) +
         " m²</b>. The supersonic design is shaped here, not at M = 1.</p>\n";
    Plot ma{"Current and target roll-averaged area (M = " + std::string(mach) + ")", "station X (m)", "area (m²)", {}, {}, false, true};
    ma.series = {{"current (roll average)", k.x, k.area, kPalette[0], false, false, 2.0},
                 {"least-drag target", k.x, k.target, kPalette[1], true, false, 2.0},
                 {"Δ area", k.x, k.delta_area, kPalette[3], false, false, 1.6}};
    s += figure(ma, fig, "Roll-averaged Mach-plane area, its least-drag target and the difference; also in "
                         "correction_M" + std::string(mach) + ".csv beside this page.");
  }
  return s;
}

}  // namespace

std::string html_escape(const std::string& t) {
  std::string out;
  out.reserve(t.size());
  for (char ch : t) {
    switch (ch) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      default: out += ch;
    }
  }
  return out;
}

std::string inline_svg(const std::string& svg, const std::string& prefix) {
  std::string s = svg;
  const auto start = s.find("<svg");
  if (start != std::string::npos) s.erase(0, start);
  s = std::regex_replace(s, std::regex("id=\""), "id=\"" + prefix);
  s = std::regex_replace(s, std::regex("href=\"#"), "href=\"#" + prefix);
  s = std::regex_replace(s, std::regex("url\\(#"), "url(#" + prefix);
  return s;
}

std::string report_html(const ReportInput& in) {
  int fig = 0;
  std::string h = "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<title>" + html_escape("machcut report — " + in.title) +
                  "</title>\n" + kStyle + "\n</head>\n<body>\n<h1>Area-rule design report</h1>\n<p class=\"muted\">" + html_escape(in.title) +
                  " · " + html_escape(in.version) + "</p>\n";
  h += caution();
  h += health_section(in);
  h += area_section(in, fig);
  h += drag_section(in, fig);
  h += jumps_section(in);
  h += target_section(in, fig);
  h += "<h2>Caution</h2>\n" + caution() + "</body>\n</html>\n";
  return h;
}

}  // namespace machcut
