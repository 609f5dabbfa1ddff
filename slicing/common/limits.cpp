#include "machcut/common/limits.h"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "machcut/common/errors.h"

namespace machcut {

std::string readable_number(double v) {
  if (std::isnan(v)) return "nan";
  if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.6g", v);
  return buf;
}

double parse_number(const std::string& text, const std::string& what) {
  std::size_t used = 0;
  double v = 0.0;
  try {
    v = std::stod(text, &used);
  } catch (const std::exception&) {
    used = 0;
  }
  const std::string shown = text.size() > 40 ? text.substr(0, 40) + "…" : text;
  if (text.empty()) throw InputError(what, "empty where a number is expected");
  if (used != text.size() || !std::isfinite(v)) throw InputError(what, "'" + shown + "' is not a finite number");
  return v;
}

double checked_mach(double m, const std::string& option) {
  if (!std::isfinite(m)) throw InputError(option, "the Mach number is not a finite number");
  if (m < kMinMach)
    throw InputError(option, "Mach " + readable_number(m) +
                                 " is below 1; the area rule needs M >= 1 (M = 1 gives normal cuts)");
  if (m > kMaxMach)
    throw InputError(option, "Mach " + readable_number(m) + " is above " + readable_number(kMaxMach) +
                                 ", outside slender-body theory");
  return m;
}

std::vector<double> checked_machs(std::vector<double> machs, const std::string& option, bool allow_empty) {
  if (machs.empty() && !allow_empty) throw InputError(option, "no Mach number given");
  for (double m : machs) checked_mach(m, option);
  std::sort(machs.begin(), machs.end());
  machs.erase(std::unique(machs.begin(), machs.end()), machs.end());
  return machs;
}

double checked_roll(double roll_deg, const std::string& option) {
  if (!std::isfinite(roll_deg)) throw InputError(option, "the roll angle is not a finite number");
  if (std::fabs(roll_deg) > 1e6)
    throw InputError(option, "roll angle " + readable_number(roll_deg) + "° is not within ±1e6°");
  return roll_deg;
}

}  // namespace machcut
