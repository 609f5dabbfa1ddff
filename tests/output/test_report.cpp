// Tests of the plots (slicing/output/plot.cpp) and the HTML report (slicing/output/report.cpp).
#include <catch2/catch.hpp>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <regex>
#include <set>
#include <sstream>

#include "machcut/common/limits.h"
#include "machcut/output/plot.h"
#include "machcut/output/report.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;

namespace {
// A minimal well-formedness check of HTML with inline SVG: every non-void element closes in
// order (HTML5 void elements, W3C HTML Living Standard; XML self-closing tags allowed).
bool tags_balanced(const std::string& html, std::string* problem) {
  static const std::set<std::string> kVoid{"meta", "br", "img", "hr", "input", "link"};
  std::vector<std::string> stack;
  const std::regex tag(R"(<(/?)([A-Za-z][A-Za-z0-9:-]*)[^>]*?(/?)>)");
  const std::string body = std::regex_replace(html, std::regex(R"(<!DOCTYPE[^>]*>|<!--[\s\S]*?-->)"), "");
  for (auto it = std::sregex_iterator(body.begin(), body.end(), tag); it != std::sregex_iterator(); ++it) {
    const std::string name = (*it)[2], closing = (*it)[1], self = (*it)[3];
    if (!self.empty() || kVoid.count(name)) continue;
    if (closing.empty()) { stack.push_back(name); continue; }
    if (stack.empty() || stack.back() != name) { *problem = "unexpected </" + name + ">"; return false; }
    stack.pop_back();
  }
  if (!stack.empty()) { *problem = "unclosed <" + stack.back() + ">"; return false; }
  return true;
}

int count(const std::string& s, const std::string& what) {
  int n = 0;
  for (auto p = s.find(what); p != std::string::npos; p = s.find(what, p + 1)) ++n;
  return n;
}


// Sears–Haack (Sears 1947) with a step: a stand-in model curve for the report.
ReportInput sample_input() {
  ReportInput in;
  in.title = "sample.stl";
  in.version = "machcut test";
  in.health = {"1 shell(s), closed"};
  AreaCurve c;
  for (int i = 0; i <= 200; ++i) {
    const double xi = i / 200.0;
    c.x.push_back(10 * xi);
    c.area.push_back(std::pow(4 * xi * (1 - xi), 1.5) + (xi > 0.6 && xi < 0.9 ? 0.1 : 0.0));
  }
  in.curves = {c};
  in.drag = {{1.0, 0.2, 0.001, true, "", ""}, {1.5, 0.18, 0.001, true, "", ""}, {2.0, 0.16, 0.002, true, "", ""}};
  in.reference_area = 2.0;
  in.measures = measure_curve(c);
  in.sears_haack_drag_area = sears_haack_drag_area(10, in.measures.volume);
  in.jumps = find_jumps(c, eminton_lord_drag);
  LeastDragProblem p;
  p.length = 10;
  p.volume = in.measures.volume;
  p.base_area = 0.0;
  in.target = least_drag_body(p);
  in.constraints = {"same length and volume"};
  in.correction = correction_to(c, in.target);
  return in;
}
}  // namespace

TEST_CASE("nice ticks are 1-2-5 multiples covering the range", "[plot]") {
  // Common practice for axis ticks: the smallest step of 1, 2, 5 × 10ⁿ not below range/target;
  // 9.3/8 = 1.16 → step 2: 0, 2, 4, 6, 8.
  const auto t = nice_ticks(0.0, 9.3, 8);
  REQUIRE(t.size() == 5);
  CHECK(t.front() == 0.0);
  CHECK(std::abs(t[4] - 8.0) < 1e-12);
  const auto u = nice_ticks(-0.013, 0.021, 6);
  CHECK(std::abs((u[1] - u[0]) - 0.01) < 1e-12);  // 0.034/6 = 0.0057 → 0.01
  CHECK(u.front() >= -0.013);
}

TEST_CASE("plots render to SVG and PNG", "[plot]") {
  Plot p{"t", "station x (m)", "area (m²)", {{"a", {0, 1, 2}, {0, 1, 0}, 0x1b6f8a, false, false, 2.0}}, {{1.0, "J1"}}, false, true};
  const std::string svg = plot_svg(p);
  CHECK(svg.find("<svg") != std::string::npos);
  CHECK(svg.find("</svg>") != std::string::npos);
  const std::string png = plot_png(p, 400, 300);
  REQUIRE(png.size() > 8);
  CHECK(png.substr(1, 3) == "PNG");  // PNG signature (PNG specification, W3C 2003)
  Plot empty;
  CHECK(plot_svg(empty).find("<svg") != std::string::npos);
}

TEST_CASE("the report's HTML parses and contains its plots", "[report]") {
  const std::string html = report_html(sample_input());
  std::string problem;
  CHECK(tags_balanced(html, &problem));
  INFO(problem);
  CHECK(html.rfind("<!DOCTYPE html>", 0) == 0);
  CHECK(count(html, "<svg") == 6);  // areas, D/q, C_D, target, Δ area, Δ r
  CHECK(count(html, "<svg") == count(html, "</svg>"));
  CHECK(html.find(html_escape(kCaution)) != std::string::npos);  // the one caution text (common/limits.h)
  CHECK(html.find("Eminton") != std::string::npos);
  CHECK(html.find("src=\"http") == std::string::npos);  // nothing fetched from the network
  // Plot ids are unique on the page (several Cairo SVGs share one document).
  std::set<std::string> ids;
  const std::regex id(R"re( id="([^"]+)")re");
  bool unique = true;
  for (auto it = std::sregex_iterator(html.begin(), html.end(), id); it != std::sregex_iterator(); ++it)
    unique = ids.insert((*it)[1]).second && unique;
  CHECK(unique);
}

TEST_CASE("html_escape escapes markup", "[report]") {
  CHECK(html_escape("a<b>&\"c\"") == "a&lt;b&gt;&amp;&quot;c&quot;");
}

TEST_CASE("machcut report writes index.html and correction.csv", "[report][cli]") {
  std::vector<double> xs, rs;
  for (int i = 0; i <= 60; ++i) {
    const double xi = i / 60.0;
    xs.push_back(8 * xi);
    rs.push_back(0.5 * std::pow(4 * xi * (1 - xi), 0.75));  // Sears–Haack radius (Sears 1947)
  }
  const std::string stl = write_stl_ascii(make_body_of_revolution(xs, rs, 48), "report_body.stl");
  const std::string dir = temp_path("report_out");
  std::filesystem::remove_all(dir);
  const RunResult r = run_cli("report " + stl + " --out " + dir + " --mach 1.5 --ref-area 1 --fix 4 -q");
  INFO(r.err);
  REQUIRE(r.exit_code == 0);
  const std::string html = read_file(dir + "/index.html");
  std::string problem;
  CHECK(tags_balanced(html, &problem));
  INFO(problem);
  CHECK(count(html, "<svg") >= 4);
  CHECK(read_file(dir + "/correction.csv").rfind("x_m,area_m2,target_area_m2", 0) == 0);
  // Source: Sears (1947) — the body is Sears–Haack, so its target correction is small.
}

TEST_CASE("machcut report rejects a bad --fix", "[report][cli][errors]") {
  const std::string stl = write_stl_ascii(make_box({0, -1, -1}, {4, 1, 1}), "report_box.stl");
  const RunResult r = run_cli("report " + stl + " --out " + temp_path("report_bad") + " --fix abc -q");
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("--fix") != std::string::npos);
}
