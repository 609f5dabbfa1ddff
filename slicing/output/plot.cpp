// Cairo line plots — see plot.h.
#include "machcut/output/plot.h"

#include <cairo-svg.h>
#include <cairo.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>

namespace machcut {
namespace {

struct Range { double lo = 0.0, hi = 1.0; };

// Plot area inside the margins, px.
struct Frame { double left, top, right, bottom; };

void set_rgb(cairo_t* cr, std::uint32_t rgb, double alpha = 1.0) {
  cairo_set_source_rgba(cr, ((rgb >> 16) & 0xff) / 255.0, ((rgb >> 8) & 0xff) / 255.0, (rgb & 0xff) / 255.0, alpha);
}

std::string tick_label(double v, double step) {
  char buf[32];
  if (std::abs(v) < step * 1e-9) v = 0.0;
  const double mag = std::max(std::abs(v), step);
  if (mag >= 1e5 || mag < 1e-3) std::snprintf(buf, sizeof buf, "%.3g", v);
  else {
    const int decimals = std::max(0, static_cast<int>(std::ceil(-std::log10(step) - 1e-9)));
    std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
  }
  return buf;
}

bool data_range(const Plot& p, Range& xr, Range& yr) {
  double x0 = std::numeric_limits<double>::infinity(), x1 = -x0, y0 = x0, y1 = -x0;
  for (const PlotSeries& s : p.series)
    for (std::size_t i = 0; i < std::min(s.x.size(), s.y.size()); ++i) {
      if (!std::isfinite(s.x[i]) || !std::isfinite(s.y[i])) continue;
      x0 = std::min(x0, s.x[i]); x1 = std::max(x1, s.x[i]);
      y0 = std::min(y0, s.y[i]); y1 = std::max(y1, s.y[i]);
    }
  if (!(x1 >= x0)) return false;
  if (p.y_from_zero) { y0 = std::min(y0, 0.0); y1 = std::max(y1, 0.0); }
  if (x1 - x0 <= 0.0) { x0 -= 0.5; x1 += 0.5; }
  if (y1 - y0 <= 0.0) { const double d = std::max(std::abs(y0) * 0.1, 1e-12); y0 -= d; y1 += d; }
  const double pad = 0.05 * (y1 - y0);
  xr = {x0, x1};
  yr = {y0 - (p.y_from_zero && y0 == 0.0 ? 0.0 : pad), y1 + pad};
  return true;
}

void text_at(cairo_t* cr, const std::string& s, double x, double y, double ax, double ay) {
  cairo_text_extents_t e;
  cairo_text_extents(cr, s.c_str(), &e);
  cairo_move_to(cr, x - ax * e.width - e.x_bearing, y - ay * e.height - e.y_bearing);
  cairo_show_text(cr, s.c_str());
}

void draw_axes(cairo_t* cr, const Plot& p, const Frame& f, const Range& xr, const Range& yr) {
  auto px = [&](double x) { return f.left + (x - xr.lo) / (xr.hi - xr.lo) * (f.right - f.left); };
  auto py = [&](double y) { return f.bottom - (y - yr.lo) / (yr.hi - yr.lo) * (f.bottom - f.top); };
  cairo_set_font_size(cr, 12);
  const auto xt = nice_ticks(xr.lo, xr.hi, 8), yt = nice_ticks(yr.lo, yr.hi, 6);
  const double xs = xt.size() > 1 ? xt[1] - xt[0] : 1.0, ys = yt.size() > 1 ? yt[1] - yt[0] : 1.0;
  cairo_set_line_width(cr, 1.0);
  for (double t : xt) {
    if (t < xr.lo - 1e-12 * xs || t > xr.hi + 1e-12 * xs) continue;
    set_rgb(cr, 0xdde3e8); cairo_move_to(cr, std::round(px(t)) + 0.5, f.top); cairo_line_to(cr, std::round(px(t)) + 0.5, f.bottom); cairo_stroke(cr);
    set_rgb(cr, 0x333333); text_at(cr, tick_label(t, xs), px(t), f.bottom + 6, 0.5, 0.0);
  }
  for (double t : yt) {
    if (t < yr.lo - 1e-12 * ys || t > yr.hi + 1e-12 * ys) continue;
    set_rgb(cr, 0xdde3e8); cairo_move_to(cr, f.left, std::round(py(t)) + 0.5); cairo_line_to(cr, f.right, std::round(py(t)) + 0.5); cairo_stroke(cr);
    set_rgb(cr, 0x333333); text_at(cr, tick_label(t, ys), f.left - 6, py(t), 1.0, 0.5);
  }
  if (p.zero_line && yr.lo < 0 && yr.hi > 0) {
    set_rgb(cr, 0x555555); cairo_set_line_width(cr, 1.2);
    cairo_move_to(cr, f.left, py(0)); cairo_line_to(cr, f.right, py(0)); cairo_stroke(cr);
  }
  set_rgb(cr, 0x333333); cairo_set_line_width(cr, 1.0);
  cairo_rectangle(cr, f.left + 0.5, f.top + 0.5, f.right - f.left, f.bottom - f.top); cairo_stroke(cr);
  cairo_set_font_size(cr, 13);
  text_at(cr, p.x_label, 0.5 * (f.left + f.right), f.bottom + 26, 0.5, 0.0);
  cairo_save(cr);
  cairo_translate(cr, 16, 0.5 * (f.top + f.bottom));
  cairo_rotate(cr, -M_PI / 2);
  text_at(cr, p.y_label, 0, 0, 0.5, 0.5);
  cairo_restore(cr);
  cairo_select_font_face(cr, "sans-serif", CAIRO_FONT_SLANT_NORMAL, CAIRO_FONT_WEIGHT_BOLD);
  cairo_set_font_size(cr, 14);
  text_at(cr, p.title, f.left, 10, 0.0, 0.0);
  cairo_select_font_face(cr, "sans-serif", CAIRO_FONT_SLANT_NORMAL, CAIRO_FONT_WEIGHT_NORMAL);
}

void draw_series(cairo_t* cr, const Plot& p, const Frame& f, const Range& xr, const Range& yr) {
  auto px = [&](double x) { return f.left + (x - xr.lo) / (xr.hi - xr.lo) * (f.right - f.left); };
  auto py = [&](double y) { return f.bottom - (y - yr.lo) / (yr.hi - yr.lo) * (f.bottom - f.top); };
  cairo_save(cr);
  cairo_rectangle(cr, f.left, f.top, f.right - f.left, f.bottom - f.top);
  cairo_clip(cr);
  cairo_set_font_size(cr, 11);
  for (const PlotMarker& m : p.markers) {
    set_rgb(cr, 0xb03a2e, 0.7); cairo_set_line_width(cr, 1.0);
    const double dash[] = {2.0, 3.0};
    cairo_set_dash(cr, dash, 2, 0);
    cairo_move_to(cr, px(m.x), f.top); cairo_line_to(cr, px(m.x), f.bottom); cairo_stroke(cr);
    cairo_set_dash(cr, nullptr, 0, 0);
    set_rgb(cr, 0xb03a2e); text_at(cr, m.label, px(m.x) + 3, f.top + 4, 0.0, 0.0);
  }
  for (const PlotSeries& s : p.series) {
    set_rgb(cr, s.rgb);
    cairo_set_line_width(cr, s.width);
    const double dash[] = {7.0, 4.0};
    cairo_set_dash(cr, dash, s.dashed ? 2 : 0, 0);
    bool pen = false;
    for (std::size_t i = 0; i < std::min(s.x.size(), s.y.size()); ++i) {
      if (!std::isfinite(s.x[i]) || !std::isfinite(s.y[i])) { pen = false; continue; }
      if (pen) cairo_line_to(cr, px(s.x[i]), py(s.y[i])); else cairo_move_to(cr, px(s.x[i]), py(s.y[i]));
      pen = true;
    }
    cairo_stroke(cr);
    cairo_set_dash(cr, nullptr, 0, 0);
    if (s.points)
      for (std::size_t i = 0; i < std::min(s.x.size(), s.y.size()); ++i)
        if (std::isfinite(s.x[i]) && std::isfinite(s.y[i])) { cairo_arc(cr, px(s.x[i]), py(s.y[i]), 3.0, 0, 2 * M_PI); cairo_fill(cr); }
  }
  cairo_restore(cr);
}

void draw_legend(cairo_t* cr, const Plot& p, const Frame& f) {
  cairo_set_font_size(cr, 12);
  double x = f.right;
  for (auto it = p.series.rbegin(); it != p.series.rend(); ++it) {
    if (it->label.empty()) continue;
    cairo_text_extents_t e;
    cairo_text_extents(cr, it->label.c_str(), &e);
    x -= e.x_advance;
    set_rgb(cr, 0x222222); text_at(cr, it->label, x, 40, 0.0, 0.5);
    x -= 30;
    set_rgb(cr, it->rgb); cairo_set_line_width(cr, it->width + 1);
    const double dash[] = {6.0, 3.0};
    cairo_set_dash(cr, dash, it->dashed ? 2 : 0, 0);
    cairo_move_to(cr, x, 40); cairo_line_to(cr, x + 24, 40); cairo_stroke(cr);
    cairo_set_dash(cr, nullptr, 0, 0);
    x -= 16;
  }
}

void draw(cairo_t* cr, const Plot& p, int width, int height) {
  set_rgb(cr, 0xffffff); cairo_paint(cr);
  cairo_select_font_face(cr, "sans-serif", CAIRO_FONT_SLANT_NORMAL, CAIRO_FONT_WEIGHT_NORMAL);
  const Frame f{78.0, 56.0, width - 18.0, height - 52.0};
  Range xr, yr;
  const bool any = data_range(p, xr, yr);
  draw_axes(cr, p, f, xr, yr);
  if (!any) { set_rgb(cr, 0x777777); text_at(cr, "no data", 0.5 * (f.left + f.right), 0.5 * (f.top + f.bottom), 0.5, 0.5); return; }
  draw_series(cr, p, f, xr, yr);
  draw_legend(cr, p, f);
}

cairo_status_t append(void* closure, const unsigned char* data, unsigned int length) {
  static_cast<std::string*>(closure)->append(reinterpret_cast<const char*>(data), length);
  return CAIRO_STATUS_SUCCESS;
}

}  // namespace

std::vector<double> nice_ticks(double lo, double hi, int target) {
  if (!(hi > lo) || !std::isfinite(lo) || !std::isfinite(hi) || target < 1) return {lo};
  const double raw = (hi - lo) / target;
  const double mag = std::pow(10.0, std::floor(std::log10(raw)));
  double step = 10.0 * mag;
  for (double m : {1.0, 2.0, 5.0}) if (m * mag >= raw) { step = m * mag; break; }
  std::vector<double> ticks;
  // A step below the doubles' resolution near lo would repeat one value: stop when t stalls.
  for (double t = std::ceil(lo / step - 1e-9) * step; t <= hi + 1e-9 * step && ticks.size() < 100; t += step) {
    if (!ticks.empty() && !(t > ticks.back())) break;
    ticks.push_back(t);
  }
  return ticks;
}

std::string plot_svg(const Plot& plot, int width, int height) {
  std::string out;
  cairo_surface_t* surface = cairo_svg_surface_create_for_stream(append, &out, width, height);
  cairo_svg_surface_set_document_unit(surface, CAIRO_SVG_UNIT_PX);  // 1 unit = 1 px, not pt
  cairo_t* cr = cairo_create(surface);
  draw(cr, plot, width, height);
  cairo_destroy(cr);
  cairo_surface_finish(surface);
  cairo_surface_destroy(surface);
  return out;
}

std::string plot_png(const Plot& plot, int width, int height) {
  std::string out;
  cairo_surface_t* surface = cairo_image_surface_create(CAIRO_FORMAT_RGB24, width, height);
  cairo_t* cr = cairo_create(surface);
  draw(cr, plot, width, height);
  cairo_destroy(cr);
  cairo_surface_write_to_png_stream(surface, append, &out);
  cairo_surface_destroy(surface);
  return out;
}

}  // namespace machcut
