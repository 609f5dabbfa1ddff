// Tests of the shared limits and number handling (slicing/common/limits.cpp): parse_number,
// checked_mach(s), checked_roll and readable_number, against the C standard's definition of
// the conversions (ISO C 7.22.1.3 strtod, 7.21.6.1 printf %g), the IEEE 754 binary64 limits
// and the Mach range the header states.
#include <catch2/catch.hpp>

#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include "machcut/common/errors.h"
#include "machcut/common/limits.h"

using namespace machcut;
using Catch::Matchers::Contains;
using Catch::Matchers::StartsWith;

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kMax = std::numeric_limits<double>::max();

// The message of the InputError `f` throws ("" when it throws none).
template <class F>
std::string error_of(F&& f) {
  try {
    f();
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}

}  // namespace

// -------------------------------------------------------------------- parse_number --

TEST_CASE("parse_number reads finite numbers written in full, subnormals too", "[limits][parse]") {
  // Source: ISO C 7.22.1.3 (strtod): the double nearest the decimal text, compared with the
  // same literal. IEEE 754 binary64: subnormals are finite, below 2.2250738585072014e-308
  // down to 4.9406564584124654e-324.
  CHECK(parse_number("-2e-3", "--x") == -2e-3);
  CHECK(parse_number("1.7976931348623157e308", "--x") == kMax);
  CHECK(parse_number("1e-310", "--x") == 1e-310);
  CHECK(parse_number("4.9406564584124654e-324", "--x") ==
        std::numeric_limits<double>::denorm_min());
}

TEST_CASE("parse_number refuses what is not one finite number, naming the option",
          "[limits][parse][errors]") {
  // Header contract: InputError naming `what` for empty text, trailing characters, NaN,
  // infinity, out of double range (1e400 above the largest double, 1e-400 below the smallest
  // subnormal, IEEE 754); the message is "SOURCE: problem" (errors.h).
  CHECK(error_of([] { parse_number("", "--mach"); }) == "--mach: empty where a number is expected");
  for (const char* bad : {"1.5x", "1.5 ", "1,5", "abc", "nan", "inf", "-infinity", "1e400",
                          "1e-400", "--1", "1e", "."}) {
    INFO(bad);
    CHECK_THAT(error_of([&] { parse_number(bad, "--span"); }),
               StartsWith("--span: '" + std::string(bad) + "'") && Contains("not a finite number"));
  }
  // Leading white space and hexadecimal, which strtod takes (ISO C 7.22.1.3: it skips
  // isspace characters and reads "0x" hexadecimal floating constants), are refused: the
  // header's contract is a decimal number written in full.
  CHECK(error_of([] { parse_number(" 1.5", "--roll"); }) ==
        "--roll: ' 1.5' is not a finite number (white space in it)");
  // A control character is shown as '?': the message stays on one line.
  CHECK(error_of([] { parse_number("\t2", "--roll"); }) ==
        "--roll: '?2' is not a finite number (white space in it)");
  CHECK(error_of([] { parse_number("1\n2", "--roll"); }) ==
        "--roll: '1?2' is not a finite number (white space in it)");
  for (const char* hex : {"0x10", "0X1p3", "-0x1.8p1", "+0xA"}) {
    INFO(hex);
    CHECK(error_of([&] { parse_number(hex, "--at"); }) ==
          "--at: '" + std::string(hex) + "' is not a finite number (hexadecimal is not accepted; write it in decimal)");
  }
  // What stays accepted: a sign, a missing integer or fraction part, an exponent with a sign
  // (ISO C 6.4.4.2 decimal floating constants), compared with the same literals.
  CHECK(parse_number("+.5", "--x") == 0.5);
  CHECK(parse_number("3.", "--x") == 3.0);
  CHECK(parse_number("-1E+2", "--x") == -100.0);
  CHECK(parse_number("007", "--x") == 7.0);
  // A 1000-character non-number is quoted by its first 40 characters, on one short line.
  const std::string junk = "x" + std::string(999, '9');
  const std::string msg = error_of([&] { parse_number(junk, "--mach"); });
  CHECK_THAT(msg, StartsWith("--mach: '" + junk.substr(0, 40)));
  CHECK(msg.size() < 120);
}

// -------------------------------------------------------------------- checked_mach --

TEST_CASE("checked_mach: the range [1, 20] inclusive", "[limits][mach]") {
  // Header: kMinMach = 1 (normal cuts, transonic area rule), kMaxMach = 20 (slender-body
  // theory, docs/method.md §9); the value is returned unchanged, one ulp outside either end
  // is refused (IEEE 754 nextafter).
  CHECK(checked_mach(1.0, "--mach") == 1.0);
  CHECK(checked_mach(20.0, "--mach") == 20.0);
  CHECK_THROWS_AS(checked_mach(std::nextafter(1.0, 0.0), "--mach"), InputError);
  CHECK_THROWS_AS(checked_mach(std::nextafter(20.0, 30.0), "--mach"), InputError);
}

TEST_CASE("checked_mach refuses with the option and a short readable value",
          "[limits][mach][errors]") {
  CHECK_THAT(error_of([] { checked_mach(0.8, "--mach"); }),
             StartsWith("--mach: Mach 0.8 ") && Contains("below 1"));
  // 1e308 is shown as printf %g shows it (ISO C 7.21.6.1): "1e+308", not 309 digits.
  const std::string high = error_of([] { checked_mach(1e308, "--machs"); });
  CHECK_THAT(high, StartsWith("--machs: Mach 1e+308 is above 20"));
  CHECK(high.size() < 120);
  for (double bad : {kNaN, kInf, -kInf})
    CHECK_THAT(error_of([&] { checked_mach(bad, "--mach"); }),
               StartsWith("--mach: ") && Contains("not a finite number"));
}

TEST_CASE("checked_machs sorts and removes duplicates; empty only when allowed", "[limits][mach]") {
  // Header contract: sorted, duplicates removed, each as checked_mach.
  CHECK(checked_machs({2.0, 1.2, 2.0, 1.0, 1.2}, "--mach") == std::vector<double>{1.0, 1.2, 2.0});
  CHECK(checked_machs({}, "--mach", true).empty());
  CHECK_THAT(error_of([] { checked_machs({}, "--mach"); }), StartsWith("--mach: no Mach number"));
  // One bad value anywhere in the list refuses the whole list.
  CHECK_THROWS_AS(checked_machs({1.2, 1.5, 25.0}, "--mach"), InputError);
}

// -------------------------------------------------------------------- checked_roll --

TEST_CASE("checked_roll: finite and within ±1e6 degrees", "[limits][roll]") {
  // Header contract: |θ| <= 1e6 inclusive, the value returned unchanged; checked at both ends
  // and one ulp outside (IEEE 754 nextafter).
  CHECK(checked_roll(1e6, "--roll") == 1e6);
  CHECK(checked_roll(-1e6, "--roll") == -1e6);
  CHECK_THROWS_AS(checked_roll(std::nextafter(1e6, 2e6), "--roll"), InputError);
  const std::string big = error_of([] { checked_roll(-1e300, "--roll"); });
  CHECK_THAT(big, StartsWith("--roll: ") && Contains("-1e+300"));
  CHECK(big.size() < 120);
  for (double bad : {kNaN, kInf}) CHECK_THROWS_AS(checked_roll(bad, "--roll"), InputError);
}

// ----------------------------------------------------------------- readable_number --

TEST_CASE("readable_number: six significant digits, exponent only when needed",
          "[limits][format]") {
  // Source: ISO C 7.21.6.1, %g with precision 6: style e when the exponent is < −4 or >= 6,
  // trailing zeros removed.
  CHECK(readable_number(-1.0) == "-1");
  CHECK(readable_number(123456.0) == "123456");
  CHECK(readable_number(1234567.0) == "1.23457e+06");
  CHECK(readable_number(0.0001) == "0.0001");
  CHECK(readable_number(0.00001) == "1e-05");
  CHECK(readable_number(1e308) == "1e+308");
}

TEST_CASE("readable_number: NaN and infinities spelled out, extremes stay short",
          "[limits][format]") {
  CHECK(readable_number(-kNaN) == "nan");
  CHECK(readable_number(-kInf) == "-inf");
  // IEEE 754 binary64 extremes: with 6 significant digits and a 3-digit exponent no text is
  // longer than "-1.79769e+308" (13 characters).
  CHECK(readable_number(-kMax) == "-1.79769e+308");
  for (double v :
       {kMax, std::numeric_limits<double>::min(), -std::numeric_limits<double>::denorm_min()}) {
    INFO(v);
    CHECK(readable_number(v).size() <= 13);
  }
}
