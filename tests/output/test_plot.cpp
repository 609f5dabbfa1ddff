// Tests of the line plots (slicing/output/plot.cpp): the SVG is well-formed XML with the
// requested size and one stroke per drawn series, the PNG follows the PNG chunk layout and
// decodes (through Cairo's PNG reader) to the requested size with each series' colour where it
// should be; empty, NaN and extreme data draw without failing; the ticks follow the 1-2-5 rule.
#include <catch2/catch.hpp>

#include <cairo.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>
#include <cstring>
#include <limits>
#include <regex>
#include <set>
#include <string>
#include <vector>

#include "machcut/output/plot.h"

using namespace machcut;

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

// ------------------------------------------------------------------------------- SVG --

// Well-formedness in the sense of XML 1.0 (W3C, 5th ed., 2008), the parts a generated
// document can get wrong: one XML declaration first, every start tag closed in order, one
// root element, attribute values quoted, no stray '<' or '&' in text. Returns "" or the
// problem.
std::string xml_problem(const std::string& doc) {
  if (doc.rfind("<?xml ", 0) != 0) return "does not start with an XML declaration";
  const std::size_t decl_end = doc.find("?>");
  if (decl_end == std::string::npos) return "XML declaration not closed";
  std::vector<std::string> stack;
  int roots = 0;
  std::size_t i = decl_end + 2;
  const std::regex attr(R"(\s+[A-Za-z_:][-A-Za-z0-9_:.]*\s*=\s*("[^"<]*"|'[^'<]*'))");
  const std::regex name_re(R"([A-Za-z_:][-A-Za-z0-9_:.]*)");
  while (i < doc.size()) {
    const std::size_t lt = doc.find('<', i);
    const std::string text = doc.substr(i, lt == std::string::npos ? std::string::npos : lt - i);
    for (std::size_t amp = text.find('&'); amp != std::string::npos; amp = text.find('&', amp + 1))
      if (!std::regex_search(text.substr(amp),
                             std::regex(R"(^&(#[0-9]+|#x[0-9a-fA-F]+|[A-Za-z]+);)")))
        return "bare '&' in text";
    if (lt == std::string::npos) break;
    if (stack.empty() && text.find_first_not_of(" \t\r\n") != std::string::npos)
      return "text outside the root element";
    if (doc.compare(lt, 4, "<!--") == 0) {
      const std::size_t e = doc.find("-->", lt);
      if (e == std::string::npos) return "comment not closed";
      i = e + 3;
      continue;
    }
    const std::size_t gt = doc.find('>', lt);
    if (gt == std::string::npos) return "tag not closed";
    std::string tag = doc.substr(lt + 1, gt - lt - 1);
    if (tag.find('<') != std::string::npos) return "'<' inside a tag";
    if (!tag.empty() && tag[0] == '/') {
      const std::string name = tag.substr(1, tag.find_last_not_of(" \t\r\n"));
      if (stack.empty() || stack.back() != name)
        return "</" + name + "> does not close the open element";
      stack.pop_back();
    } else {
      const bool self = !tag.empty() && tag.back() == '/';
      if (self) tag.pop_back();
      std::smatch m;
      if (!std::regex_search(tag, m, name_re) || m.position(0) != 0) return "bad tag <" + tag + ">";
      const std::string name = m.str(0);
      const std::string rest = std::regex_replace(tag.substr(name.size()), attr, "");
      if (rest.find_first_not_of(" \t\r\n") != std::string::npos)
        return "unquoted or malformed attribute in <" + name + ">";
      if (stack.empty()) ++roots;
      if (!self) stack.push_back(name);
    }
    i = gt + 1;
  }
  if (!stack.empty()) return "<" + stack.back() + "> not closed";
  if (roots != 1) return std::to_string(roots) + " root elements";
  return "";
}

// The value of attribute `name` on the first <svg> start tag ("" when missing).
std::string svg_attribute(const std::string& doc, const std::string& name) {
  std::smatch m;
  const std::string head =
      doc.substr(doc.find("<svg"), doc.find('>', doc.find("<svg")) - doc.find("<svg"));
  if (std::regex_search(head, m, std::regex("\\s" + name + "=\"([^\"]*)\""))) return m.str(1);
  return "";
}

// The stroke colours of the lines in the SVG (paths with fill:none), as 0xRRGGBB, one entry
// per path. SVG 1.1 (W3C, 2011) styles them with CSS colours; rgb(r%, g%, b%) is CSS2's
// percentage form, 100% = 255. `dashed_only`: only the paths with a stroke-dasharray.
std::vector<std::uint32_t> stroke_colours(const std::string& doc, bool dashed_only = false) {
  std::vector<std::uint32_t> out;
  const std::regex path(R"re(<path style="([^"]*)")re");
  const std::regex rgb(R"(stroke:rgb\(([0-9.]+)%,([0-9.]+)%,([0-9.]+)%\))");
  for (auto it = std::sregex_iterator(doc.begin(), doc.end(), path); it != std::sregex_iterator();
       ++it) {
    const std::string style = (*it)[1];
    std::smatch c;
    if (style.find("fill:none") == std::string::npos || !std::regex_search(style, c, rgb)) continue;
    if (dashed_only && style.find("stroke-dasharray") == std::string::npos) continue;
    std::uint32_t v = 0;
    for (int k = 1; k <= 3; ++k)
      v = v << 8 | static_cast<std::uint32_t>(std::lround(std::stod(c.str(k)) * 2.55));
    out.push_back(v);
  }
  return out;
}

std::size_t count_of(const std::vector<std::uint32_t>& v, std::uint32_t x) {
  return static_cast<std::size_t>(std::count(v.begin(), v.end(), x));
}

// Every path's data holds only SVG path commands and numbers (SVG 1.1 §8.3): a NaN or an
// infinity written by printf as "nan"/"inf" would break it.
bool path_data_numeric(const std::string& doc) {
  const std::regex d(R"re(\sd="([^"]*)")re");
  const std::regex ok(R"(^[MmLlHhVvCcSsQqTtAaZz0-9eE.+\-, ]*$)");
  for (auto it = std::sregex_iterator(doc.begin(), doc.end(), d); it != std::sregex_iterator();
       ++it)
    if (!std::regex_match((*it)[1].str(), ok)) return false;
  return true;
}

// ------------------------------------------------------------------------------- PNG --

std::uint32_t be32(const std::string& s, std::size_t at) {
  return static_cast<std::uint32_t>(static_cast<unsigned char>(s[at])) << 24 |
         static_cast<std::uint32_t>(static_cast<unsigned char>(s[at + 1])) << 16 |
         static_cast<std::uint32_t>(static_cast<unsigned char>(s[at + 2])) << 8 |
         static_cast<std::uint32_t>(static_cast<unsigned char>(s[at + 3]));
}

// CRC-32 of the PNG specification (W3C/ISO 15948, 2003, annex D: polynomial 0xEDB88320,
// reflected, initial and final XOR 0xFFFFFFFF), written from that description.
std::uint32_t png_crc(const std::string& bytes) {
  std::uint32_t c = 0xFFFFFFFFu;
  for (unsigned char b : bytes) {
    c ^= b;
    for (int k = 0; k < 8; ++k) c = (c & 1) ? 0xEDB88320u ^ (c >> 1) : c >> 1;
  }
  return c ^ 0xFFFFFFFFu;
}

struct PngLayout {
  std::string problem;  // "" when the chunk layout is valid
  std::uint32_t width = 0, height = 0;
  std::vector<std::string> chunks;  // chunk types in order
};

// The PNG datastream (PNG specification, 2003, §5): the 8-byte signature 137 80 78 71 13 10
// 26 10, then chunks of length (4 bytes, big-endian), type (4), data, CRC (4, over type and
// data); IHDR first (13 bytes: width, height, ...), IEND last and empty.
PngLayout png_layout(const std::string& png) {
  PngLayout out;
  static const std::string kSignature = "\x89PNG\r\n\x1a\n";
  if (png.compare(0, 8, kSignature) != 0) return {"no PNG signature", 0, 0, {}};
  std::size_t at = 8;
  while (at + 12 <= png.size()) {
    const std::uint32_t len = be32(png, at);
    if (at + 12 + len > png.size()) return {"chunk runs past the end", 0, 0, out.chunks};
    const std::string type = png.substr(at + 4, 4);
    if (png_crc(png.substr(at + 4, 4 + len)) != be32(png, at + 8 + len))
      return {"CRC mismatch in " + type, 0, 0, out.chunks};
    if (type == "IHDR") {
      if (len != 13) return {"IHDR is not 13 bytes", 0, 0, out.chunks};
      out.width = be32(png, at + 8);
      out.height = be32(png, at + 12);
    }
    out.chunks.push_back(type);
    at += 12 + len;
  }
  if (at != png.size())
    out.problem = "bytes after the last chunk";
  else if (out.chunks.empty() || out.chunks.front() != "IHDR")
    out.problem = "IHDR is not first";
  else if (out.chunks.back() != "IEND")
    out.problem = "IEND is not last";
  else if (std::find(out.chunks.begin(), out.chunks.end(), "IDAT") == out.chunks.end())
    out.problem = "no IDAT";
  return out;
}

// PNG bytes decoded by Cairo's PNG reader (libpng) into 0xRRGGBB pixels, row by row.
struct Image {
  int width = 0, height = 0;
  std::vector<std::uint32_t> rgb;
  std::uint32_t at(int x, int y) const { return rgb[static_cast<std::size_t>(y * width + x)]; }
};

struct ReadState {
  const std::string* bytes;
  std::size_t pos;
};

cairo_status_t read_bytes(void* closure, unsigned char* data, unsigned int length) {
  auto* s = static_cast<ReadState*>(closure);
  if (s->pos + length > s->bytes->size()) return CAIRO_STATUS_READ_ERROR;
  std::memcpy(data, s->bytes->data() + s->pos, length);
  s->pos += length;
  return CAIRO_STATUS_SUCCESS;
}

Image decode_png(const std::string& png) {
  ReadState state{&png, 0};
  cairo_surface_t* s = cairo_image_surface_create_from_png_stream(read_bytes, &state);
  Image img;
  if (cairo_surface_status(s) == CAIRO_STATUS_SUCCESS) {
    cairo_surface_flush(s);
    img.width = cairo_image_surface_get_width(s);
    img.height = cairo_image_surface_get_height(s);
    const int stride = cairo_image_surface_get_stride(s);
    const unsigned char* data = cairo_image_surface_get_data(s);
    for (int y = 0; y < img.height; ++y)
      for (int x = 0; x < img.width; ++x) {
        std::uint32_t p;
        std::memcpy(&p, data + y * stride + 4 * x, 4);  // native-endian 0x(AA)RRGGBB
        img.rgb.push_back(p & 0xFFFFFFu);
      }
  }
  cairo_surface_destroy(s);
  return img;
}

std::size_t pixels_of(const Image& img, std::uint32_t rgb) {
  return static_cast<std::size_t>(std::count(img.rgb.begin(), img.rgb.end(), rgb));
}

// Runs of adjacent image columns that hold at least one pixel of colour `rgb`.
int column_runs(const Image& img, std::uint32_t rgb) {
  int runs = 0;
  bool in = false;
  for (int x = 0; x < img.width; ++x) {
    bool any = false;
    for (int y = 0; y < img.height && !any; ++y) any = img.at(x, y) == rgb;
    if (any && !in) ++runs;
    in = any;
  }
  return runs;
}

std::vector<double> linspace(double a, double b, int n) {
  std::vector<double> v;
  for (int i = 0; i < n; ++i) v.push_back(a + (b - a) * i / (n - 1));
  return v;
}

PlotSeries series(std::string label, std::vector<double> x, std::vector<double> y,
                  std::uint32_t rgb, double width = 2.0) {
  PlotSeries s;
  s.label = std::move(label);
  s.x = std::move(x);
  s.y = std::move(y);
  s.rgb = rgb;
  s.width = width;
  return s;
}

// Colours used by no fixed element of the plot (those are greys, white and the marker red).
constexpr std::uint32_t kRed = 0xE01010, kGreen = 0x10A040, kBlue = 0x2040E0;

}  // namespace

// --------------------------------------------------------------------------------- SVG --

TEST_CASE("SVG: well-formed, of the requested size, one stroke per series and marker",
          "[plot][svg]") {
  Plot p;
  p.title = "area & drag <test>";  // characters XML would have to escape (Cairo draws glyphs)
  p.x_label = "station x (m)";
  p.y_label = "area (m²)";
  p.series = {series("model", {0, 1, 2, 3}, {0, 1.5, 1.0, 0}, kRed),
              series("target", {0, 1, 2, 3}, {0, 1.2, 1.2, 0}, kGreen),
              series("", {0, 3}, {0.2, 0.2}, kBlue)};  // no label: not in the legend
  p.series[1].dashed = true;
  p.markers = {{1.0, "J1"}, {2.5, "J2"}};
  const std::string svg = plot_svg(p, 640, 300);
  INFO(svg.substr(0, 400));
  CHECK(xml_problem(svg) == "");
  // SVG 1.1: the root is <svg> in the SVG namespace; Cairo's px unit gives width="640px".
  CHECK(svg.find("<svg") != std::string::npos);
  CHECK(svg_attribute(svg, "xmlns") == "http://www.w3.org/2000/svg");
  CHECK(svg_attribute(svg, "width") == "640px");
  CHECK(svg_attribute(svg, "height") == "300px");
  CHECK(svg_attribute(svg, "viewBox") == "0 0 640 300");
  CHECK(path_data_numeric(svg));
  // Each labelled series: its line and its legend swatch; the unlabelled one: its line only.
  const std::vector<std::uint32_t> strokes = stroke_colours(svg);
  CHECK(count_of(strokes, kRed) == 2);
  CHECK(count_of(strokes, kGreen) == 2);
  CHECK(count_of(strokes, kBlue) == 1);
  // The markers: one dashed vertical line each in the marker colour 0xb03a2e (plot.cpp).
  CHECK(count_of(strokes, 0xB03A2E) == 2);
  // The dashed series is dashed in the plot and in the legend (SVG stroke-dasharray), the
  // others are not.
  const std::vector<std::uint32_t> dashed = stroke_colours(svg, true);
  CHECK(count_of(dashed, kGreen) == 2);
  CHECK(count_of(dashed, kRed) == 0);
  CHECK(count_of(dashed, kBlue) == 0);
}

TEST_CASE("the XML check finds what breaks well-formedness", "[plot][svg]") {
  // The checker above, on documents that break XML 1.0 in the ways it looks for.
  const std::string decl = "<?xml version=\"1.0\"?>\n";
  CHECK(xml_problem(decl + "<svg><g/></svg>\n") == "");
  CHECK(xml_problem("<svg></svg>") != "");                    // no declaration
  CHECK(xml_problem(decl + "<svg><g></svg>") != "");          // <g> not closed
  CHECK(xml_problem(decl + "<svg a=1></svg>") != "");         // unquoted attribute
  CHECK(xml_problem(decl + "<svg>a & b</svg>") != "");        // bare ampersand
  CHECK(xml_problem(decl + "<svg></svg><svg></svg>") != "");  // two roots
  CHECK(xml_problem(decl + "<svg>") != "");                   // cut short
  CHECK(!path_data_numeric("<path d=\"M 1 nan L 2 3\"/>"));
}

TEST_CASE("SVG: empty, NaN-only and mismatched data draw a valid document",
          "[plot][svg][degenerate]") {
  std::vector<Plot> plots(5);
  plots[1].series = {series("nan", {kNaN, kNaN}, {1.0, kNaN}, kRed)};
  plots[2].series = {series("inf", {0, 1, kInf}, {-kInf, kInf, 1.0}, kRed)};
  plots[3].series = {series("short y", {0, 1, 2, 3}, {1.0, 2.0}, kRed)};  // sizes differ: 2 points
  plots[4].series = {series("empty", {}, {}, kRed), series("one", {2.0}, {3.0}, kGreen)};
  plots[4].markers = {{kNaN, "nan marker"}};
  for (std::size_t k = 0; k < plots.size(); ++k) {
    INFO("plot " << k);
    const std::string svg = plot_svg(plots[k]);
    CHECK(xml_problem(svg) == "");
    CHECK(svg_attribute(svg, "width") == "760px");  // the default size, plot.h
    CHECK(path_data_numeric(svg));
  }
  // No finite point: no series line at all (the "no data" note instead).
  CHECK(count_of(stroke_colours(plot_svg(plots[0])), kRed) == 0);
  CHECK(count_of(stroke_colours(plot_svg(plots[1])), kRed) == 0);
  CHECK(count_of(stroke_colours(plot_svg(plots[2])), kRed) == 0);
  // Two finite points of mismatched arrays: drawn (line and legend).
  CHECK(count_of(stroke_colours(plot_svg(plots[3])), kRed) == 2);
}

TEST_CASE("SVG and PNG: extreme and constant data draw without failing", "[plot][degenerate]") {
  // Data spanning the whole double range, all equal, a range of one ulp, and tiny values.
  const double big = std::numeric_limits<double>::max();
  const std::vector<std::vector<double>> ys = {
      {-big, big},     {big, big}, {5.0, 5.0}, {0.0, 0.0}, {0.5, std::nextafter(0.5, 1.0)},
      {1e-300, 2e-300}};
  for (const auto& y : ys) {
    INFO("y = " << y[0] << ", " << y[1]);
    Plot p;
    p.series = {series("s", {0.0, 1.0}, y, kRed)};
    p.zero_line = true;
    const std::string svg = plot_svg(p, 300, 200);
    CHECK(xml_problem(svg) == "");
    CHECK(path_data_numeric(svg));
    const PngLayout png = png_layout(plot_png(p, 300, 200));
    CHECK(png.problem == "");
    CHECK(png.width == 300);
  }
}

// --------------------------------------------------------------------------------- PNG --

TEST_CASE("PNG: signature, chunk layout and CRCs, requested size", "[plot][png]") {
  Plot p;
  p.series = {series("a", {0, 1, 2}, {0, 1, 0}, kRed)};
  for (auto [w, h] : {std::array<int, 2>{760, 360}, {400, 300}, {123, 77}}) {
    const std::string png = plot_png(p, w, h);
    const PngLayout l = png_layout(png);
    INFO(w << " x " << h);
    CHECK(l.problem == "");
    CHECK(l.width == static_cast<std::uint32_t>(w));
    CHECK(l.height == static_cast<std::uint32_t>(h));
    const Image img = decode_png(png);
    CHECK(img.width == w);
    CHECK(img.height == h);
  }
  const std::string png = plot_png(p);  // default size
  CHECK(png_layout(png).width == 760);
  CHECK(png_layout(png).height == 360);
  // The layout check itself: a flipped bit in the image data fails its chunk's CRC, a cut
  // file loses its IEND.
  std::string flipped = png;
  flipped[png.size() / 2] = static_cast<char>(flipped[png.size() / 2] ^ 0x10);
  CHECK(png_layout(flipped).problem != "");
  CHECK(png_layout(png.substr(0, png.size() - 12)).problem == "IEND is not last");
}

TEST_CASE("PNG: every series is drawn in its colour, no data draws none", "[plot][png]") {
  // Lines 6 px wide have pixels fully covered, which hold the series colour exactly (an opaque
  // source over a fully covered pixel, Porter & Duff 1984 "over" operator).
  Plot p;
  p.series = {series("", linspace(0, 10, 11), std::vector<double>(11, 1.0), kRed, 6.0),
              series("", linspace(0, 10, 11), linspace(0, 2, 11), kGreen, 6.0)};
  const Image img = decode_png(plot_png(p));
  REQUIRE(img.width == 760);
  CHECK(pixels_of(img, kRed) > 100);
  CHECK(pixels_of(img, kGreen) > 100);
  CHECK(pixels_of(img, kBlue) == 0);
  // White background (plot.cpp paints 0xffffff) with something drawn on it.
  CHECK(img.at(0, 0) == 0xFFFFFF);
  CHECK(pixels_of(img, 0xFFFFFF) < img.rgb.size());
  Plot none;
  none.series = {series("", {kNaN, 1.0}, {1.0, kNaN}, kRed, 6.0)};
  const Image blank = decode_png(plot_png(none));
  CHECK(pixels_of(blank, kRed) == 0);
  CHECK(pixels_of(blank, 0xFFFFFF) < blank.rgb.size());  // axes and the "no data" note
}

TEST_CASE("PNG: a NaN point breaks the line", "[plot][png]") {
  // plot.h: non-finite points break the line. A horizontal line over x = 0..20 with y[10] NaN
  // leaves a gap from x = 9 to 11 (a tenth of the width): two runs of coloured columns.
  std::vector<double> x = linspace(0, 20, 21), y(21, 1.0);
  Plot whole;
  whole.series = {series("", x, y, kBlue, 6.0)};
  CHECK(column_runs(decode_png(plot_png(whole)), kBlue) == 1);
  y[10] = kNaN;
  Plot broken;
  broken.series = {series("", x, y, kBlue, 6.0)};
  CHECK(column_runs(decode_png(plot_png(broken)), kBlue) == 2);
  y[15] = kInf;  // an infinity breaks it too
  Plot twice;
  twice.series = {series("", x, y, kBlue, 6.0)};
  CHECK(column_runs(decode_png(plot_png(twice)), kBlue) == 3);
}

// ------------------------------------------------------------------------------ ticks --

namespace {

// Checks the header's rule for nice_ticks(lo, hi, target) (common practice for axis labels,
// cf. Heckbert, "Nice numbers for graph labels", Graphics Gems, 1990 (from memory)): the step
// is 1, 2 or 5 × 10ⁿ, the smallest such not below (hi − lo)/target; the ticks are the
// consecutive multiples of the step inside [lo, hi]. Tolerances: 1e-9 of a step for the
// accumulated sums.
void check_nice(double lo, double hi, int target) {
  INFO("[" << lo << ", " << hi << "] / " << target);
  const std::vector<double> t = nice_ticks(lo, hi, target);
  REQUIRE(t.size() >= 2);
  const double step = t[1] - t[0];
  const double e = std::floor(std::log10(step) + 1e-9);
  const double mantissa = step / std::pow(10.0, e);
  CHECK((std::fabs(mantissa - 1) < 1e-9 || std::fabs(mantissa - 2) < 1e-9 ||
         std::fabs(mantissa - 5) < 1e-9));
  const double raw = (hi - lo) / target;
  CHECK(step >= raw * (1 - 1e-9));
  const double smaller = std::fabs(mantissa - 1) < 1e-9
                             ? 0.5 * step
                             : (std::fabs(mantissa - 2) < 1e-9 ? 0.5 * step : 0.4 * step);
  CHECK(smaller < raw * (1 + 1e-9));  // the next smaller nice step would give too many
  for (std::size_t i = 0; i < t.size(); ++i) {
    CHECK(std::fabs(t[i] / step - std::round(t[i] / step)) < 1e-9);  // a multiple of the step
    if (i > 0) CHECK(std::fabs(t[i] - t[i - 1] - step) < 1e-9 * step);
  }
  CHECK(t.front() >= lo - 1e-9 * step);
  CHECK(t.front() - step < lo);
  CHECK(t.back() <= hi + 1e-9 * step);
  CHECK(t.back() + step > hi);
  CHECK(static_cast<int>(t.size()) - 1 <= target);
}

}  // namespace

TEST_CASE("nice ticks: 1-2-5 steps, multiples of the step inside the range", "[plot][ticks]") {
  check_nice(0.0, 10.0, 5);  // step 2 exactly at range/target
  check_nice(0.0, 1.0, 10);  // step 0.1
  check_nice(0.0, 9.3, 8);
  check_nice(-0.013, 0.021, 6);
  check_nice(-350.0, -20.0, 6);   // all negative
  check_nice(1.0e6, 7.5e6, 8);    // large
  check_nice(2.0e-9, 9.0e-9, 6);  // small
  check_nice(0.99, 1.01, 4);      // narrow, away from zero
  check_nice(-1.0, 1.0, 2);       // step 1: −1, 0, 1
  // One interval asked over [−1, 1]: step 2, whose only multiple inside is 0.
  CHECK(nice_ticks(-1.0, 1.0, 1) == std::vector<double>{0.0});
  // Worked example: [0, 9.3] over 8 → 9.3/8 = 1.16 → step 2: 0, 2, 4, 6, 8.
  const std::vector<double> t = nice_ticks(0.0, 9.3, 8);
  REQUIRE(t.size() == 5);
  CHECK(t.front() == 0.0);
  CHECK(std::fabs(t.back() - 8.0) < 1e-12);
}

TEST_CASE("nice ticks of an empty, reversed or non-finite range: the low end alone",
          "[plot][ticks][degenerate]") {
  CHECK(nice_ticks(3.0, 3.0, 5) == std::vector<double>{3.0});
  CHECK(nice_ticks(4.0, 1.0, 5) == std::vector<double>{4.0});
  CHECK(nice_ticks(0.0, 1.0, 0) == std::vector<double>{0.0});
  CHECK(nice_ticks(0.0, kInf, 5) == std::vector<double>{0.0});
  CHECK(nice_ticks(-kInf, 1.0, 5).size() == 1);
  CHECK(nice_ticks(kNaN, 1.0, 5).size() == 1);
  CHECK(nice_ticks(0.0, kNaN, 5) == std::vector<double>{0.0});
}

TEST_CASE("nice ticks of a range of one ulp stay distinct and increasing",
          "[plot][ticks][degenerate]") {
  // A range too narrow for the doubles near it: the ticks may be few, but no two equal and no
  // more than target + 1 (header: "about target intervals").
  for (double lo : {0.5, 1.0, 1000.0, -3.0}) {
    const double hi = std::nextafter(lo, kInf);
    const std::vector<double> t = nice_ticks(lo, hi, 6);
    INFO(lo << ": " << t.size() << " ticks");
    CHECK(!t.empty());
    CHECK(t.size() <= 7);
    for (std::size_t i = 1; i < t.size(); ++i) CHECK(t[i] > t[i - 1]);
  }
}
