// Tests for shifted yield curves (curves/curve_shift.cpp): parallel shifts of the zero rates,
// key-rate triangles at and between their tenors, the key rates adding up to a parallel shift,
// what the shifted curve records, and its life after the curve it came from.
#include <gtest/gtest.h>

#include <chrono>
#include <cmath>
#include <optional>
#include <string>
#include <vector>

#include "curves/curves.h"

namespace {

using namespace poolbid;

constexpr Date kAsOf{std::chrono::year{2026}, std::chrono::month{12}, std::chrono::day{1}};
const std::string kSwapCurve = POOLBID_SOURCE_DIR "/demo-pools/curve-2026-12-01.json";

// The date `days` calendar days after as_of: curve time days / 365 exactly.
Date days_after(int days) { return Date{std::chrono::sys_days{kAsOf} + std::chrono::days{days}}; }

TEST(ShiftCurve, ParallelMovesEveryZeroRateByTheShift) {
  const YieldCurve curve = load_yield_curve(kSwapCurve);
  const YieldCurve up = shift_curve(curve, 25);
  EXPECT_EQ(up.parallel_shift_bp, 25);
  EXPECT_TRUE(up.key_rate_shifts.empty());
  EXPECT_EQ(up.source, curve.source);
  EXPECT_EQ(up.quotes.size(), curve.quotes.size());
  for (int t = 1; t <= 600; ++t) {
    const Date date = payment_date(kAsOf, t, 17);
    // identity: a continuous zero-rate shift of 25bp
    EXPECT_NEAR(zero_rate(up, date) - zero_rate(curve, date), 0.0025, 1e-12) << t;
    EXPECT_NEAR(discount_factor(up, date),
                discount_factor(curve, date) * std::exp(-0.0025 * curve_time(curve, date)), 1e-15)
        << t;
  }
  const YieldCurve down = shift_curve(curve, -25);
  EXPECT_NEAR(zero_rate(down, days_after(3650)), zero_rate(curve, days_after(3650)) - 0.0025,
              1e-12);
}

TEST(ShiftCurve, ShiftedFlatCurveIsTheHigherFlatCurve) {
  const YieldCurve shifted = shift_curve(flat_yield_curve(0.04, kAsOf), 50);
  const YieldCurve higher = flat_yield_curve(0.045, kAsOf);
  for (int t = 1; t <= 360; t += 7) {
    const Date date = payment_date(kAsOf, t, 0);
    // identity: exp(-0.04 t) exp(-0.005 t) = exp(-0.045 t)
    EXPECT_NEAR(discount_factor(shifted, date), discount_factor(higher, date), 1e-15) << t;
  }
  EXPECT_TRUE(shifted.flat);  // still projects any index name
}

TEST(ShiftCurve, KeyRateTriangles) {
  const YieldCurve curve = load_yield_curve(kSwapCurve);
  const YieldCurve bumped = shift_curve(curve, CurveShift{0, {2, 5, 10, 30}, {10, 20, 30, 40}});
  const auto moved_bp = [&](int days) {
    return (zero_rate(bumped, days_after(days)) - zero_rate(curve, days_after(days))) * 1e4;
  };
  // At each key tenor the bump is that key's (curve time 2 years = 730 days).
  EXPECT_NEAR(moved_bp(730), 10, 1e-8);
  EXPECT_NEAR(moved_bp(1825), 20, 1e-8);
  EXPECT_NEAR(moved_bp(3650), 30, 1e-8);
  EXPECT_NEAR(moved_bp(10950), 40, 1e-8);
  // Between key tenors the two triangles there share the move linearly: 3 years is a third of
  // the way from 2 to 5; 20 years half way from 10 to 30.
  EXPECT_NEAR(moved_bp(1095), 10 + (20 - 10) / 3.0, 1e-8);
  EXPECT_NEAR(moved_bp(7300), 35, 1e-8);
  // Flat before the first key tenor and after the last.
  EXPECT_NEAR(moved_bp(30), 10, 1e-8);
  EXPECT_NEAR(moved_bp(365), 10, 1e-8);
  EXPECT_NEAR(moved_bp(365 * 45), 40, 1e-8);
  ASSERT_EQ(bumped.key_rate_shifts.size(), 4u);
  EXPECT_EQ(bumped.key_rate_shifts[1], (std::pair<double, double>{5, 20}));
  EXPECT_EQ(bumped.parallel_shift_bp, 0);

  // One key alone: a triangle from the neighbouring keys (2 and 10) to its tenor (5).
  const std::vector<double> keys{2, 5, 10, 30};
  const YieldCurve five = shift_curve(curve, CurveShift{0, keys, {0, 10, 0, 0}});
  const auto five_bp = [&](int days) {
    return (zero_rate(five, days_after(days)) - zero_rate(curve, days_after(days))) * 1e4;
  };
  EXPECT_NEAR(five_bp(365), 0, 1e-8);
  EXPECT_NEAR(five_bp(730), 0, 1e-8);
  EXPECT_NEAR(five_bp(1095), 10 / 3.0, 1e-8);
  EXPECT_NEAR(five_bp(1825), 10, 1e-8);
  EXPECT_NEAR(five_bp(2737), 10 * (3650 - 2737) / 1825.0, 1e-8);
  EXPECT_NEAR(five_bp(3650), 0, 1e-8);
  EXPECT_NEAR(five_bp(7300), 0, 1e-8);
}

TEST(ShiftCurve, KeyRatesTogetherAreAParallelShift) {
  const YieldCurve curve = load_yield_curve(kSwapCurve);
  const std::vector<double> keys{0.25, 1, 2, 5, 10, 20, 30};
  const YieldCurve parallel = shift_curve(curve, 15);
  std::vector<YieldCurve> each;
  for (std::size_t k = 0; k < keys.size(); ++k) {
    std::vector<double> bp(keys.size(), 0);
    bp[k] = 15;
    each.push_back(shift_curve(curve, CurveShift{0, keys, bp}));
  }
  const YieldCurve all =
      shift_curve(curve, CurveShift{0, keys, std::vector<double>(keys.size(), 15)});
  for (int t = 1; t <= 480; ++t) {
    const Date date = payment_date(kAsOf, t, 17);
    const double base = zero_rate(curve, date);
    double sum = 0;
    for (const YieldCurve& one : each) sum += zero_rate(one, date) - base;
    // identity: the triangles add up to one at every time (flat ends included)
    EXPECT_NEAR(sum, zero_rate(parallel, date) - base, 1e-12) << t;
    EXPECT_NEAR(zero_rate(all, date), zero_rate(parallel, date), 1e-12) << t;
  }
}

TEST(ShiftCurve, OutlivesTheCurveItCameFrom) {
  std::optional<YieldCurve> curve = load_yield_curve(kSwapCurve);
  const double before = discount_factor(*curve, days_after(3650));
  const YieldCurve shifted = shift_curve(shift_curve(*curve, 10), CurveShift{5, {10}, {7}});
  curve.reset();
  EXPECT_NEAR(discount_factor(shifted, days_after(3650)), before * std::exp(-0.0022 * 10), 1e-15);
  EXPECT_EQ(shifted.parallel_shift_bp, 15);
  ASSERT_EQ(shifted.key_rate_shifts.size(), 1u);
  EXPECT_EQ(shifted.key_rate_shifts[0], (std::pair<double, double>{10, 7}));
  // Shifts add up in the record: the same key tenor again adds to it.
  const YieldCurve again = shift_curve(shifted, CurveShift{0, {2, 10}, {1, 3}});
  ASSERT_EQ(again.key_rate_shifts.size(), 2u);
  EXPECT_EQ(again.key_rate_shifts[0], (std::pair<double, double>{2, 1}));
  EXPECT_EQ(again.key_rate_shifts[1], (std::pair<double, double>{10, 10}));
}

TEST(ShiftCurve, NoShiftKeepsTheCurve) {
  const YieldCurve curve = flat_yield_curve(0.04, kAsOf);
  const YieldCurve same = shift_curve(curve, 0);
  EXPECT_EQ(same.term_structure, curve.term_structure);
  EXPECT_EQ(same.parallel_shift_bp, 0);
}

TEST(ShiftCurve, BadShiftsAreErrors) {
  const YieldCurve curve = flat_yield_curve(0.04, kAsOf);
  EXPECT_THROW(shift_curve(curve, CurveShift{0, {2, 5}, {1}}), std::invalid_argument);
  EXPECT_THROW(shift_curve(curve, CurveShift{0, {5, 2}, {1, 1}}), std::invalid_argument);
  EXPECT_THROW(shift_curve(curve, CurveShift{0, {2, 2}, {1, 1}}), std::invalid_argument);
  EXPECT_THROW(shift_curve(curve, CurveShift{0, {0}, {1}}), std::invalid_argument);
  EXPECT_THROW(shift_curve(curve, std::nan("")), std::invalid_argument);
  EXPECT_THROW(shift_curve(curve, CurveShift{0, {2}, {INFINITY}}), std::invalid_argument);
}

}  // namespace
