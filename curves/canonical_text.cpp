// The canonical text form of a curve (cpr:8, psa:150, cdr:0..3/36@age, 45,40,35): the shortest
// numbers that parse back to the same curve, and the clock only where it is not the default.
#include <charconv>
#include <cmath>

#include <fmt/core.h>

#include "curves/curve_forms.h"

namespace poolbid {
namespace detail {

std::string shortest_percent_text(double decimal) {
  if (decimal == 0) return "0";
  if (!std::isfinite(decimal)) return fmt::format("{}", decimal);  // no parser accepts it
  char buffer[64];
  const auto end =
      std::to_chars(buffer, buffer + sizeof buffer, decimal, std::chars_format::scientific).ptr;
  const std::string_view text(buffer, static_cast<std::size_t>(end - buffer));  // -d.ddde-XX
  const auto e = text.find('e');
  int exponent = 0;  // of the first digit, after x 100
  std::string_view power = text.substr(e + 1);
  if (power.front() == '+') power.remove_prefix(1);
  std::from_chars(power.data(), power.data() + power.size(), exponent);
  exponent += 2;
  std::string sign, digits;
  for (const char c : text.substr(0, e)) {
    if (c == '-')
      sign = "-";
    else if (c != '.')
      digits += c;
  }
  const int count = static_cast<int>(digits.size());
  if (exponent < -6 || exponent > 20)
    return fmt::format("{}{}{}{}e{}", sign, digits.front(), count > 1 ? "." : "",
                       std::string_view(digits).substr(1), exponent);
  if (exponent < 0) return fmt::format("{}0.{}{}", sign, std::string(-exponent - 1, '0'), digits);
  if (exponent + 1 >= count) return sign + digits + std::string(exponent + 1 - count, '0');
  return fmt::format("{}{}.{}", sign, std::string_view(digits).substr(0, exponent + 1),
                     std::string_view(digits).substr(exponent + 1));
}

}  // namespace detail

namespace {

using detail::shortest_percent_text;


std::string curve_text(const SpeedCurve& curve, detail::CurveKind kind) {
  const detail::KindInfo& info = detail::kind_info(kind);
  const std::string rate_head =
      info.rate_prefix.empty() ? "" : fmt::format("{}:", info.rate_prefix);
  std::string text;
  switch (curve.shape) {
    case CurveShape::constant:
      text = rate_head + shortest_percent_text(curve.value);
      break;
    case CurveShape::vector:
      text = rate_head;
      for (std::size_t i = 0; i < curve.values.size(); ++i)
        text += (i == 0 ? "" : ",") + shortest_percent_text(curve.values[i]);
      if (curve.values.empty()) text += "0";
      break;
    case CurveShape::ramp:
      text = fmt::format("{}{}..{}/{}", rate_head, shortest_percent_text(curve.ramp_from),
                         shortest_percent_text(curve.ramp_to), curve.ramp_months);
      break;
    case CurveShape::psa:
      text = "psa:" + shortest_percent_text(curve.value);
      break;
    case CurveShape::sda:
      text = "sda:" + shortest_percent_text(curve.value);
      break;
  }
  if (curve.clock != detail::default_clock(curve.shape))
    text += curve.clock == CurveClock::loan_age ? "@age" : "@month";
  return text;
}

}  // namespace

std::string prepay_text(const SpeedCurve& curve) {
  return curve_text(curve, detail::CurveKind::prepay);
}

std::string default_text(const SpeedCurve& curve) {
  return curve_text(curve, detail::CurveKind::default_rate);
}

std::string severity_text(const SpeedCurve& curve) {
  return curve_text(curve, detail::CurveKind::severity);
}

std::string_view to_string(Advancing advancing) {
  return advancing == Advancing::interest ? "interest" : "none";
}

}  // namespace poolbid
