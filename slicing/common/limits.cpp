#include "machcut/common/limits.h"

#include <algorithm>
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <string>

#include "machcut/common/errors.h"

namespace machcut {

std::string readable_number(double v) {
  if (std::isnan(v)) return "nan";
  if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.6g", v);
  return buf;
}

namespace {

// Why `text` is not a decimal number written in full — [+-] digits [. digits] [e [+-] digits],
// with at least one mantissa digit — or "" when it is one. strtod alone would also take leading
// white space, hexadecimal ("0x1p3") and "nan"/"inf" (ISO C 7.22.1.3).
std::string decimal_syntax_problem(const std::string& text) {
  std::size_t i = 0;
  const auto digits = [&] {
    const std::size_t from = i;
    while (i < text.size() && text[i] >= '0' && text[i] <= '9') ++i;
    return i - from;
  };
  if (text.find_first_of(" \t\n\r\f\v") != std::string::npos) return "white space in it";
  if (i < text.size() && (text[i] == '+' || text[i] == '-')) ++i;
  std::size_t mantissa = digits();
  if (mantissa == 1 && i < text.size() && (text[i] == 'x' || text[i] == 'X') && text[i - 1] == '0')
    return "hexadecimal is not accepted; write it in decimal";
  if (i < text.size() && text[i] == '.') {
    ++i;
    mantissa += digits();
  }
  if (mantissa == 0) return "not written in decimal digits";
  if (i < text.size() && (text[i] == 'e' || text[i] == 'E')) {
    ++i;
    if (i < text.size() && (text[i] == '+' || text[i] == '-')) ++i;
    if (digits() == 0) return "no digits after the exponent mark";
  }
  return i == text.size() ? "" : "characters after the number";
}

}  // namespace

double parse_number(const std::string& text, const std::string& what) {
  // The text quoted on one line: at most 40 characters, control characters shown as '?'.
  std::string shown = text.size() > 40 ? text.substr(0, 40) + "…" : text;
  for (char& c : shown)
    if (static_cast<unsigned char>(c) < 0x20 || c == 0x7f) c = '?';
  if (text.empty()) throw InputError(what, "empty where a number is expected");
  const std::string syntax = decimal_syntax_problem(text);
  if (!syntax.empty()) throw InputError(what, "'" + shown + "' is not a finite number (" + syntax + ")");
  // strtod, not std::stod: stod throws on every ERANGE, also for a subnormal result such as
  // 1e-310, which is a finite double (IEEE 754). ERANGE with 0 is a total underflow (ISO C
  // 7.22.1.3: out of range); overflow gives ±HUGE_VAL, caught as not finite.
  errno = 0;
  char* end = nullptr;
  const double v = std::strtod(text.c_str(), &end);
  const bool underflow = errno == ERANGE && v == 0.0;
  if (end != text.c_str() + text.size() || !std::isfinite(v) || underflow)
    throw InputError(what, "'" + shown + "' is not a finite number (out of the range of a double)");
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
