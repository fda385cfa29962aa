// Test helper for curves/: field-by-field equality of two SpeedCurves, with a readable failure.
#pragma once

#include <gtest/gtest.h>

#include <fmt/format.h>
#include <fmt/ranges.h>

#include "curves/curves.h"

namespace poolbid::testing_curves {

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
