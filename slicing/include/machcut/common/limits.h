// One definition of the limits every front end (CLI, viewer, Python) checks, the caution text
// every output carries, and the parsing of numbers typed by a user.
#pragma once

#include <string>
#include <vector>

namespace machcut {

// The Mach range of the analyses: M = 1 gives normal cuts (transonic area rule); Mach-plane
// cuts need M >= 1; above kMaxMach slender-body theory is not a useful model (hypersonic flow;
// docs/method.md §9). ends.h's far station is built for this range.
inline constexpr double kMinMach = 1.0;
inline constexpr double kMaxMach = 20.0;

// The caution every result carries (README, reports, JSON, viewer).
inline constexpr const char* kCaution =
    "Preliminary design estimate (linear slender-body theory, zero lift, no viscous or base "
    "drag); confirm with validated analysis, test and the applicable codes and licensed practice.";

// A number as people read it: up to 6 significant digits, no exponent for ordinary sizes, an
// exponent (1.5e+308) otherwise; "nan" and "inf" spelled out.
std::string readable_number(double v);

// Parses a finite decimal number written in full ("1.5", "-2e-3", "+.5"); InputError naming
// `what` otherwise (empty text, white space anywhere, hexadecimal, trailing characters, NaN,
// infinity, out of double range).
double parse_number(const std::string& text, const std::string& what);

// Checks one Mach number given with `option`: finite, kMinMach <= M <= kMaxMach. Returns it.
double checked_mach(double mach, const std::string& option);

// Checks a list of Mach numbers (each as checked_mach; the list not empty unless `allow_empty`);
// returns them sorted, duplicates removed.
std::vector<double> checked_machs(std::vector<double> machs, const std::string& option,
                                  bool allow_empty = false);

// Checks a roll angle in degrees: finite and |θ| <= 1e6 (any larger value has lost its
// fraction of a turn to rounding). Returns it.
double checked_roll(double roll_deg, const std::string& option);

}  // namespace machcut
