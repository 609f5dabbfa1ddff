// Helper of the viewer screenshot test: writes a small generated model as OBJ, and checks a
// screenshot PNG (size, not blank, the curve panel's line colour present in its region).
//   viewer_png_check obj OUT.obj
//   viewer_png_check png FILE.png WIDTH HEIGHT
#include <cairo.h>

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <set>
#include <string>

namespace {

// A closed spindle (body of revolution) about x, 10 m long, outward triangles.
int write_obj(const char* path) {
  std::ofstream f(path);
  const int rings = 24, seg = 24;
  const double pi = 3.14159265358979323846;
  f << "# generated spindle for the viewer screenshot test\n";
  f << "v 0 0 0\n";
  for (int i = 1; i < rings; ++i) {
    const double x = 10.0 * i / rings, r = 0.8 * std::sin(pi * i / rings);
    for (int j = 0; j < seg; ++j)
      f << "v " << x << " " << r * std::cos(2 * pi * j / seg) << " " << r * std::sin(2 * pi * j / seg) << "\n";
  }
  f << "v 10 0 0\n";
  auto id = [&](int ring, int j) { return 2 + (ring - 1) * seg + (j % seg); };  // 1-based
  const int tail = 2 + (rings - 1) * seg;
  for (int j = 0; j < seg; ++j) f << "f 1 " << id(1, j + 1) << " " << id(1, j) << "\n";
  for (int i = 1; i + 1 < rings; ++i)
    for (int j = 0; j < seg; ++j) {
      f << "f " << id(i, j) << " " << id(i, j + 1) << " " << id(i + 1, j + 1) << "\n";
      f << "f " << id(i, j) << " " << id(i + 1, j + 1) << " " << id(i + 1, j) << "\n";
    }
  for (int j = 0; j < seg; ++j) f << "f " << tail << " " << id(rings - 1, j) << " " << id(rings - 1, j + 1) << "\n";
  return f.good() ? 0 : 1;
}

int fail(const std::string& why) {
  std::fprintf(stderr, "viewer_png_check: %s\n", why.c_str());
  return 1;
}

int check_png(const char* path, int want_w, int want_h) {
  cairo_surface_t* s = cairo_image_surface_create_from_png(path);
  if (cairo_surface_status(s) != CAIRO_STATUS_SUCCESS) return fail(std::string("cannot read ") + path);
  const int w = cairo_image_surface_get_width(s), h = cairo_image_surface_get_height(s);
  const int stride = cairo_image_surface_get_stride(s);
  const unsigned char* d = cairo_image_surface_get_data(s);
  auto px = [&](int x, int y) {
    const unsigned char* p = d + y * stride + 4 * x;  // B, G, R, A in memory (little endian)
    return (int(p[2]) << 16) | (int(p[1]) << 8) | int(p[0]);
  };
  int rc = 0;
  if (w != want_w || h != want_h) rc = fail("size " + std::to_string(w) + "x" + std::to_string(h));
  std::set<int> colours;
  for (int y = 0; y < h; y += 3)
    for (int x = 0; x < w; x += 3) colours.insert(px(x, y));
  if (colours.size() < 50) rc = fail("nearly blank: " + std::to_string(colours.size()) + " colours");
  // The area curve is drawn in teal (R 72, G 206, B 190) in the upper right quarter.
  int teal = 0;
  for (int y = 0; y < h * 6 / 10; ++y)
    for (int x = w / 2; x < w; ++x) {
      const int c = px(x, y);
      const int r = c >> 16, g = (c >> 8) & 255, b = c & 255;
      if (std::abs(r - 72) < 30 && std::abs(g - 206) < 30 && std::abs(b - 190) < 30) ++teal;
    }
  if (teal < 200) rc = fail("no area curve in the curve panel (" + std::to_string(teal) + " curve pixels)");
  // The Mach plane (amber) in the model view, upper left of the main area.
  int amber = 0;
  for (int y = 0; y < h * 6 / 10; ++y)
    for (int x = w / 4; x < w * 6 / 10; ++x) {
      const int c = px(x, y);
      const int r = c >> 16, g = (c >> 8) & 255, b = c & 255;
      if (r > 180 && g > 100 && g < 200 && b < 110) ++amber;
    }
  if (amber < 50) rc = fail("no Mach plane in the model view (" + std::to_string(amber) + " plane pixels)");
  cairo_surface_destroy(s);
  if (rc == 0) std::printf("viewer_png_check: %s ok (%dx%d, %zu colours, %d curve px, %d plane px)\n", path, w, h, colours.size(), teal, amber);
  return rc;
}

}  // namespace

int main(int argc, char** argv) {
  if (argc == 3 && std::string(argv[1]) == "obj") return write_obj(argv[2]);
  if (argc == 5 && std::string(argv[1]) == "png") return check_png(argv[2], std::atoi(argv[3]), std::atoi(argv[4]));
  std::fprintf(stderr, "usage: viewer_png_check obj OUT.obj | png FILE.png W H\n");
  return 2;
}
