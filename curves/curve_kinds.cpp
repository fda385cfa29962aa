// The three kinds of curve (prepay, default, severity): their prefixes and limits, and percents
// read and checked the same way for the command line and the JSON assumptions file.
#include <charconv>
#include <cmath>

#include <fmt/core.h>

#include "curves/curve_forms.h"

namespace poolbid::detail {
namespace {

constexpr std::string_view kPrepayForms =
    "use cpr:RATE, psa:MULTIPLE, a vector cpr:A,B,C or a ramp cpr:FROM..TO/MONTHS";
constexpr std::string_view kDefaultForms =
    "use cdr:RATE, sda:MULTIPLE, a vector cdr:A,B,C or a ramp cdr:FROM..TO/MONTHS";
constexpr std::string_view kSeverityForms =
    "use PERCENT (of the defaulted balance), a vector A,B,C or a ramp FROM..TO/MONTHS";

// The highest rate a standard curve reaches at this multiple (PSA from age 30, SDA ages 30-60).
double standard_peak(CurveKind kind, double multiple) {
  return kind == CurveKind::prepay ? psa_cpr(multiple, 30) : sda_cdr(multiple, 30);
}

}  // namespace

double hundredth(std::string_view digits) {
  const auto e = digits.find_first_of("eE");
  int exponent = 0;
  if (e != std::string_view::npos) {
    std::string_view power = digits.substr(e + 1);
    if (!power.empty() && power.front() == '+') power.remove_prefix(1);
    std::from_chars(power.data(), power.data() + power.size(), exponent);
  }
  const std::string scaled = fmt::format("{}e{}", digits.substr(0, e), exponent - 2);
  double v = 0;
  std::from_chars(scaled.data(), scaled.data() + scaled.size(), v);
  return v;
}

const KindInfo& kind_info(CurveKind kind) {
  // Peaks of the 100% curves: PSA 6% CPR, SDA 0.60% CDR (DESIGN.md section 3).
  static constexpr KindInfo kPrepay{"cpr", "psa", "CPR", kPrepayForms, 0.06};
  static constexpr KindInfo kDefault{"cdr", "sda", "CDR", kDefaultForms, 0.006};
  static constexpr KindInfo kSeverity{"", "", "severity", kSeverityForms, 0.0};
  switch (kind) {
    case CurveKind::prepay:
      return kPrepay;
    case CurveKind::default_rate:
      return kDefault;
    case CurveKind::severity:
      break;
  }
  return kSeverity;
}

CurveClock default_clock(CurveShape shape) {
  return shape == CurveShape::psa || shape == CurveShape::sda ? CurveClock::loan_age
                                                              : CurveClock::projection_month;
}

double checked_percent(CurveKind kind, Percent percent, Place place, std::string_view shown) {
  const KindInfo& info = kind_info(kind);
  const std::string_view unit =
      kind == CurveKind::severity ? "percent of the defaulted balance" : "annual percent";
  auto fail = [&](std::string_view problem) {
    throw assumption_error(place, shown,
                           fmt::format("{} {}; {} is {} from 0 to 100", info.rate_name, problem,
                                       info.rate_name, unit));
  };
  if (!std::isfinite(percent.value)) fail("is not a finite number");
  if (percent.value < 0) fail(fmt::format("{}% is negative", percent.digits));
  if (percent.value > 100) fail(fmt::format("{}% is above 100%", percent.digits));
  return hundredth(percent.digits) + 0.0;  // -0 reads as 0
}

double checked_multiple(CurveKind kind, Percent percent, Place place, std::string_view shown) {
  const KindInfo& info = kind_info(kind);
  auto fail = [&](std::string_view problem) {
    throw assumption_error(place, shown, fmt::format("{}; {}", problem, info.forms));
  };
  const std::string_view prefix = info.standard_prefix;
  if (!std::isfinite(percent.value))
    fail(fmt::format("{} multiple is not a finite number", prefix));
  if (percent.value < 0) fail(fmt::format("{}:{} is negative", prefix, percent.digits));
  const double multiple = hundredth(percent.digits) + 0.0;  // -0 reads as 0
  const double peak = standard_peak(kind, multiple);
  if (peak > 1.0)
    fail(fmt::format("{}:{} peaks at {:.6g}% {}, above 100% ({}:{} at most)", prefix,
                     percent.digits, peak * 100, info.rate_name, prefix,
                     std::floor(100.0 / info.standard_peak)));
  return multiple;
}

}  // namespace poolbid::detail
