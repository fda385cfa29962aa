// Tests for the standard curves, rate conversions, curve_value and the monthly tables
// (curves/speed_curves.cpp): published values, the DESIGN.md section 3 formulas, round trips.
#include "curves/curves.h"

#include <gtest/gtest.h>

#include <cmath>

#include "tests/curves/curve_testing.h"

namespace {

using namespace poolbid;
using namespace poolbid::testing_curves;

TEST(Conversions, PublishedSmm) {
  // source: Fabozzi, Bond Markets, Analysis and Strategies (SMM formula)
  EXPECT_NEAR(smm_from_cpr(0.06), 0.0051430, 5e-8);
  // source: Fabozzi, Bond Markets, Analysis and Strategies (PSA benchmark): 100 PSA month 6
  EXPECT_NEAR(smm_from_cpr(psa_cpr(1.0, 6)), 0.0010055, 5e-8);
  // source: Fabozzi, Bond Markets, Analysis and Strategies (PSA benchmark): 200 PSA month 30
  EXPECT_NEAR(smm_from_cpr(psa_cpr(2.0, 30)), 0.0105962, 5e-8);
}

TEST(Conversions, PublishedSdaMdr) {
  // source: the published SDA definition (Bond Market Association standard default assumption)
  EXPECT_NEAR(mdr_from_cdr(sda_cdr(1.0, 1)), 1.6668e-5, 5e-10);
  // source: the published SDA definition (Bond Market Association standard default assumption)
  EXPECT_NEAR(mdr_from_cdr(sda_cdr(1.0, 15)), 2.5034e-4, 5e-9);
}

TEST(Conversions, RoundTrips) {
  for (const double annual : {0.0, 1e-9, 0.0002, 0.003, 0.06, 0.12, 0.5, 0.99, 1.0}) {
    // identity: CPR = 1 - (1 - SMM)^12 undoes SMM = 1 - (1 - CPR)^(1/12); the same for CDR/MDR
    EXPECT_NEAR(cpr_from_smm(smm_from_cpr(annual)), annual, 1e-15) << annual;
    EXPECT_NEAR(cdr_from_mdr(mdr_from_cdr(annual)), annual, 1e-15) << annual;
    // identity: the closed form
    EXPECT_NEAR(smm_from_cpr(annual), 1 - std::pow(1 - annual, 1.0 / 12), 1e-15) << annual;
  }
  for (const double monthly : {0.0, 1e-7, 0.001, 0.01, 0.2}) {
    EXPECT_NEAR(smm_from_cpr(cpr_from_smm(monthly)), monthly, 1e-15) << monthly;  // identity
    EXPECT_NEAR(mdr_from_cdr(cdr_from_mdr(monthly)), monthly, 1e-15) << monthly;  // identity
  }
  EXPECT_EQ(smm_from_cpr(1.0), 1.0);  // identity: everything prepays
  // Small rates keep their digits: SMM ~ CPR / 12 to first order.
  EXPECT_NEAR(smm_from_cpr(1e-12) / (1e-12 / 12), 1.0, 1e-9);  // identity: first-order term
}

TEST(StandardCurves, Psa) {
  // source: PSA definition, CPR = 6% x min(1, age / 30) (DESIGN.md section 3)
  EXPECT_DOUBLE_EQ(psa_cpr(1.0, 1), 0.002);
  EXPECT_DOUBLE_EQ(psa_cpr(1.0, 15), 0.03);
  EXPECT_DOUBLE_EQ(psa_cpr(1.0, 30), 0.06);
  EXPECT_DOUBLE_EQ(psa_cpr(1.0, 31), 0.06);
  EXPECT_DOUBLE_EQ(psa_cpr(1.0, 200), 0.06);
  // source: PSA definition, x PSA scales linearly
  EXPECT_DOUBLE_EQ(psa_cpr(1.5, 15), 0.045);
  EXPECT_DOUBLE_EQ(psa_cpr(2.0, 30), 0.12);
  EXPECT_EQ(psa_cpr(1.0, 0), 0.0);
}

TEST(StandardCurves, Sda) {
  // source: SDA definition: 0.02% x age to 30, 0.60% to 60, down 0.0095% a month to 120, then
  // 0.03% (DESIGN.md section 3)
  EXPECT_DOUBLE_EQ(sda_cdr(1.0, 1), 0.0002);
  EXPECT_DOUBLE_EQ(sda_cdr(1.0, 30), 0.006);
  EXPECT_DOUBLE_EQ(sda_cdr(1.0, 31), 0.006);
  EXPECT_DOUBLE_EQ(sda_cdr(1.0, 60), 0.006);
  EXPECT_DOUBLE_EQ(sda_cdr(1.0, 61), 0.006 - 0.000095);
  EXPECT_DOUBLE_EQ(sda_cdr(1.0, 90), 0.006 - 0.000095 * 30);
  EXPECT_DOUBLE_EQ(sda_cdr(1.0, 120), 0.0003);
  EXPECT_DOUBLE_EQ(sda_cdr(1.0, 121), 0.0003);
  EXPECT_DOUBLE_EQ(sda_cdr(1.0, 300), 0.0003);
  // source: SDA definition, x SDA scales linearly
  EXPECT_DOUBLE_EQ(sda_cdr(2.0, 45), 0.012);
  EXPECT_EQ(sda_cdr(1.0, 0), 0.0);
}

TEST(CurveValue, Shapes) {
  const SpeedCurve constant = constant_curve(0.08);
  EXPECT_EQ(curve_value(constant, 1), 0.08);
  EXPECT_EQ(curve_value(constant, 400), 0.08);

  const SpeedCurve vector = vector_curve({0.04, 0.05, 0.06});
  EXPECT_EQ(curve_value(vector, 1), 0.04);
  EXPECT_EQ(curve_value(vector, 2), 0.05);
  EXPECT_EQ(curve_value(vector, 3), 0.06);
  EXPECT_EQ(curve_value(vector, 4), 0.06);  // the last value holds
  EXPECT_EQ(curve_value(vector, 360), 0.06);

  const SpeedCurve ramp = ramp_curve(0.02, 0.08, 4);
  EXPECT_DOUBLE_EQ(curve_value(ramp, 1), 0.02);
  EXPECT_DOUBLE_EQ(curve_value(ramp, 2), 0.04);
  EXPECT_DOUBLE_EQ(curve_value(ramp, 3), 0.06);
  EXPECT_EQ(curve_value(ramp, 4), 0.08);
  EXPECT_EQ(curve_value(ramp, 100), 0.08);

  const SpeedCurve one_month = ramp_curve(0.02, 0.08, 1);
  EXPECT_EQ(curve_value(one_month, 1), 0.08);  // ramp_months = 1: constant ramp_to
  EXPECT_EQ(curve_value(one_month, 9), 0.08);

  const SpeedCurve psa = standard_curve(CurveShape::psa, 1.5);
  EXPECT_DOUBLE_EQ(curve_value(psa, 10), psa_cpr(1.5, 10));
  const SpeedCurve sda = standard_curve(CurveShape::sda, 2.0);
  EXPECT_DOUBLE_EQ(curve_value(sda, 70), sda_cdr(2.0, 70));
}

TEST(CurveValue, MonthZeroAndBelowReadMonthOne) {
  const SpeedCurve vector = vector_curve({0.04, 0.05});
  EXPECT_EQ(curve_value(vector, 0), 0.04);
  EXPECT_EQ(curve_value(vector, -5), 0.04);
  const SpeedCurve psa = standard_curve(CurveShape::psa, 1.0);
  EXPECT_EQ(curve_value(psa, 0), psa_cpr(1.0, 1));
  const SpeedCurve ramp = ramp_curve(0.01, 0.03, 3);
  EXPECT_EQ(curve_value(ramp, 0), 0.01);
}

std::vector<SpeedCurve> sample_curves() {
  return {
      constant_curve(0.08),
      vector_curve({0.01, 0.02, 0.03, 0.05, 0.04}),
      ramp_curve(0.0, 0.03, 36),
      ramp_curve(0.6, 0.4, 24),
      ramp_curve(0.1, 0.2, 1),
      standard_curve(CurveShape::psa, 1.5),
      standard_curve(CurveShape::sda, 2.0),
  };
}

TEST(MonthlyTable, RateTableAgreesWithCurveValue) {
  for (const SpeedCurve& curve : sample_curves()) {
    const MonthlyTable table = monthly_rate_table(curve);
    ASSERT_EQ(table.by_month.size(), static_cast<std::size_t>(table.hold) + 1);
    for (int k = 0; k <= 480; ++k) {
      const double read = table.by_month[std::min(k, table.hold)];
      // identity: the table is SMM / MDR of the curve's annual rate in that month
      EXPECT_DOUBLE_EQ(read, smm_from_cpr(curve_value(curve, k))) << "month " << k;
    }
  }
}

TEST(MonthlyTable, ShareTableAgreesWithCurveValue) {
  for (const SpeedCurve& curve : sample_curves()) {
    const MonthlyTable table = monthly_share_table(curve);
    for (int k = 0; k <= 480; ++k)
      EXPECT_EQ(table.by_month[std::min(k, table.hold)], curve_value(curve, k)) << "month " << k;
  }
}

TEST(MonthlyTable, HoldIsTheLastMonthThatCanChange) {
  const std::vector<SpeedCurve> curves = sample_curves();
  const std::vector<int> holds = {1, 5, 36, 24, 1, 30, 120};
  for (std::size_t i = 0; i < curves.size(); ++i) {
    const MonthlyTable table = monthly_rate_table(curves[i]);
    EXPECT_EQ(table.hold, holds[i]) << i;
    EXPECT_EQ(table.by_month[0], table.by_month[1]) << i;
    // After the hold month the curve no longer changes.
    for (int k = table.hold; k <= table.hold + 50; ++k)
      EXPECT_EQ(curve_value(curves[i], k), curve_value(curves[i], table.hold)) << i << " " << k;
  }
  EXPECT_EQ(monthly_rate_table(curves[0]).by_month.size(), 2u);
  EXPECT_NEAR(monthly_rate_table(curves[5]).by_month[30], smm_from_cpr(0.09), 1e-17);
}

TEST(MonthlyTable, ClockIsCopied) {
  SpeedCurve curve = standard_curve(CurveShape::psa, 1.0, CurveClock::loan_age);
  EXPECT_EQ(monthly_rate_table(curve).clock, CurveClock::loan_age);
  curve.clock = CurveClock::projection_month;
  EXPECT_EQ(monthly_rate_table(curve).clock, CurveClock::projection_month);
  const SpeedCurve severity = constant_curve(0.4, CurveClock::loan_age);
  EXPECT_EQ(monthly_share_table(severity).clock, CurveClock::loan_age);
}

TEST(MonthlyTable, EmptyVectorReadsZero) {
  const SpeedCurve empty = vector_curve({});
  const MonthlyTable table = monthly_rate_table(empty);
  EXPECT_EQ(table.hold, 1);
  EXPECT_EQ(table.by_month, (std::vector<double>{0.0, 0.0}));
}

TEST(Assumptions, Defaults) {
  const Assumptions a;
  EXPECT_EQ(curve_value(a.prepay, 1), 0.0);
  EXPECT_EQ(curve_value(a.default_rate, 1), 0.0);
  EXPECT_EQ(curve_value(a.severity, 1), 0.40);
  EXPECT_EQ(a.lag_months, 12);
  EXPECT_EQ(a.advancing, Advancing::none);
  EXPECT_FALSE(a.delinquent_default);
}

}  // namespace
