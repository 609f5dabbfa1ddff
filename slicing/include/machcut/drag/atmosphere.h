// The U.S. Standard Atmosphere, 1976 (NOAA/NASA/USAF, NOAA-S/T 76-1562), below 84.852 km
// geopotential altitude: seven layers of constant temperature lapse rate, hydrostatic, ideal
// gas with R = 287.0531 J/(kg·K), g₀ = 9.80665 m/s², γ = 1.4.
#pragma once

namespace machcut {

struct AtmosphereState {
  double temperature = 0.0;    // T, K
  double pressure = 0.0;       // p, Pa
  double density = 0.0;       // ρ, kg/m³
  double speed_of_sound = 0.0; // a, m/s
};

// Highest geopotential altitude covered (m).
constexpr double kAtmosphereTop = 84852.0;

// State at geopotential altitude `h` (m), 0 <= h <= kAtmosphereTop (asserted: callers check
// user input first; see atmosphere_in_range).
AtmosphereState standard_atmosphere(double h);
bool atmosphere_in_range(double h);

// Dynamic pressure q = ½ γ p M² (Pa) at pressure p (Pa) and Mach M.
double dynamic_pressure(double pressure, double mach);

}  // namespace machcut
