#include "machcut/drag/atmosphere.h"

#include <cassert>
#include <cmath>

namespace machcut {

namespace {

constexpr double kR = 287.0531;   // J/(kg·K), R*/M₀ of the 1976 standard
constexpr double kG0 = 9.80665;   // m/s²
constexpr double kGamma = 1.4;

// Layer bases: geopotential altitude (m) and lapse rate (K/m) up to the next base.
struct Layer {
  double base;
  double lapse;
};
constexpr Layer kLayers[] = {{0.0, -0.0065},    {11000.0, 0.0},    {20000.0, 0.001},
                             {32000.0, 0.0028}, {47000.0, 0.0},    {51000.0, -0.0028},
                             {71000.0, -0.002}, {84852.0, 0.0}};

// T and p at altitude h within a layer starting at (T0, p0).
void in_layer(const Layer& l, double t0, double p0, double h, double& t, double& p) {
  const double dh = h - l.base;
  if (l.lapse == 0.0) {
    t = t0;
    p = p0 * std::exp(-kG0 * dh / (kR * t0));
  } else {
    t = t0 + l.lapse * dh;
    p = p0 * std::pow(t / t0, -kG0 / (kR * l.lapse));
  }
}

}  // namespace

bool atmosphere_in_range(double h) { return h >= 0.0 && h <= kAtmosphereTop; }

AtmosphereState standard_atmosphere(double h) {
  assert(atmosphere_in_range(h));
  double t = 288.15, p = 101325.0;  // sea-level values of the standard
  for (int i = 0; i < 7; ++i) {
    const double top = kLayers[i + 1].base;
    double tn = 0.0, pn = 0.0;
    in_layer(kLayers[i], t, p, std::fmin(h, top), tn, pn);
    t = tn;
    p = pn;
    if (h <= top) break;
  }
  AtmosphereState s;
  s.temperature = t;
  s.pressure = p;
  s.density = p / (kR * t);
  s.speed_of_sound = std::sqrt(kGamma * kR * t);
  return s;
}

double dynamic_pressure(double pressure, double mach) { return 0.5 * kGamma * pressure * mach * mach; }

}  // namespace machcut
