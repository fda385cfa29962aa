// Private to curves/: the three kinds of curve (prepay, default, severity) and the checks and text
// parsing that the command-line forms and the JSON assumptions file share; the exact percent
// reading the yield-curve file uses as well.
#pragma once

#include <string>
#include <string_view>

#include "curves/curves.h"

namespace poolbid::detail {

constexpr int kMaxRampMonths = 600;  // 50 years: longer than any mortgage term
constexpr int kMaxLagMonths = 360;   // 30 years from default to liquidation

// What a curve measures decides its prefixes, its limits and the forms an error message offers.
enum class CurveKind : std::uint8_t { prepay, default_rate, severity };

struct KindInfo {
  std::string_view rate_prefix;      // "cpr", "cdr", "" (severity is a bare percent)
  std::string_view standard_prefix;  // "psa", "sda", "" (severity has no standard curve)
  std::string_view rate_name;        // "CPR", "CDR", "severity"
  std::string_view forms;            // the accepted forms, for error messages
  double standard_peak;              // the 100% standard curve's highest rate (decimal)
};
const KindInfo& kind_info(CurveKind kind);

// Where a value came from: the option ("--prepay") or file, and the JSON key ("" for an option).
struct Place {
  std::string_view source;
  std::string_view key;
};

// The error for `value` at `place`; what() = "<source>[ key <key>][, value]'<value>': <message>".
AssumptionError assumption_error(Place place, std::string_view value, std::string_view message);

// A number as the user wrote it: its value and its decimal text ("6.5", "1e1"; a valid number).
struct Percent {
  double value;
  std::string_view digits;
};

// The double nearest to the decimal `digits` x 10^-2, read in one rounding: "7" reads as "7e-2",
// "1.5e1" as "1.5e-1", "4.31" as "0.0431" reads (not 4.31 / 100, which can round twice). `digits`
// is a number std::from_chars accepts whole ("1e+300" too); the sign is kept: "-0.0" reads as -0.
double hundredth(std::string_view digits);

// A percent (8 = 8%) checked for this kind and returned as a decimal: finite, not negative, at
// most 100. The decimal is hundredth(digits), -0 read as 0, so any double has a percent text that
// reads back to it exactly. `shown` is the text quoted in an error.
double checked_percent(CurveKind kind, Percent percent, Place place, std::string_view shown);
// A standard-curve multiple in percent (150 = 150 PSA) as a decimal multiple (1.5), checked so
// that the curve's peak stays at or below 100%.
double checked_multiple(CurveKind kind, Percent percent, Place place, std::string_view shown);

// The compact text form of a curve of this kind (see curves.h), at `place`.
SpeedCurve parse_curve(CurveKind kind, std::string_view text, Place place);

// The shortest percent text that reads back to `decimal` exactly through hundredth (0.07 -> "7",
// 0.011 -> "1.1", 1/3 -> "33.33333333333333"): the decimal's shortest round-trip digits with the
// point moved two places.
std::string shortest_percent_text(double decimal);

// The clock a curve reads unless told otherwise: loan age for PSA and SDA, else projection month.
CurveClock default_clock(CurveShape shape);

}  // namespace poolbid::detail
