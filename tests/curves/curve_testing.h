// Test helper for curves/: field-by-field equality of two SpeedCurves, with a readable failure.
#pragma once

#include <gtest/gtest.h>

#include <fmt/format.h>
#include <fmt/ranges.h>

#include "curves/curves.h"

namespace poolbid::testing_curves {

// Curve builders (assigned field by field: designated initializers would leave `values` implicit).
// curves.h has constant_curve(value), read by projection month; this one says the clock.
inline SpeedCurve constant_curve(double value, CurveClock clock) {
  SpeedCurve c;
  c.clock = clock;
  c.value = value;
  return c;
}
inline SpeedCurve vector_curve(std::vector<double> values,
                               CurveClock clock = CurveClock::projection_month) {
  SpeedCurve c;
  c.shape = CurveShape::vector;
  c.clock = clock;
  c.values = std::move(values);
  return c;
}
inline SpeedCurve ramp_curve(double from, double to, int months,
                             CurveClock clock = CurveClock::projection_month) {
  SpeedCurve c;
  c.shape = CurveShape::ramp;
  c.clock = clock;
  c.ramp_from = from;
  c.ramp_to = to;
  c.ramp_months = months;
  return c;
}
inline SpeedCurve standard_curve(CurveShape shape, double multiple,
                                 CurveClock clock = CurveClock::loan_age) {
  SpeedCurve c;
  c.shape = shape;
  c.clock = clock;
  c.value = multiple;
  return c;
}

inline std::string describe(const SpeedCurve& c) {
  return fmt::format("{{shape {} clock {} value {} values [{}] ramp {}..{}/{}}}",
                     static_cast<int>(c.shape), static_cast<int>(c.clock), c.value,
                     fmt::join(c.values, ","), c.ramp_from, c.ramp_to, c.ramp_months);
}

inline ::testing::AssertionResult same_curve(const SpeedCurve& a, const SpeedCurve& b) {
  if (a.shape == b.shape && a.clock == b.clock && a.value == b.value && a.values == b.values &&
      a.ramp_from == b.ramp_from && a.ramp_to == b.ramp_to && a.ramp_months == b.ramp_months)
    return ::testing::AssertionSuccess();
  return ::testing::AssertionFailure() << describe(a) << " != " << describe(b);
}

}  // namespace poolbid::testing_curves
