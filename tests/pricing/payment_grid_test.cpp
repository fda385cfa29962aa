// Tests payment_grid on curves/ yield curves: dates, day counts and discount factors against a
// grid built by hand with QuantLib, the QuantLib CashFlows reference through the grid, the par
// identity with settlement on the cut-off, and bad settlements.
#include <gtest/gtest.h>

#include <ql/cashflows/cashflows.hpp>
#include <ql/interestrate.hpp>

#include <cmath>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include "pricing/pricing.h"
#include "tests/pricing/grid_support.h"

namespace poolbid {
namespace {

using namespace testing_support;
namespace ql = QuantLib;

const Date kCutoff = ymd(2026, 12, 1);
const Date kSettle = ymd(2026, 12, 16);

TEST(PaymentGrid, FirstMonthOnAFlatCurve) {
  const YieldCurve curve = flat_yield_curve(0.045, kCutoff);
  const PaymentGrid g = payment_grid(curve, Settlement{kCutoff, kSettle, 17}, 360);
  ASSERT_EQ(g.months, 360);
  ASSERT_EQ(g.pay_date.size(), 360u);
  ASSERT_EQ(g.years_30_360.size(), 360u);
  ASSERT_EQ(g.years_365.size(), 360u);
  ASSERT_EQ(g.discount.size(), 360u);
  EXPECT_EQ(g.pay_date[0], ymd(2027, 1, 18));    // hand-computed: month 1 pays Jan 1 + 17 days
  EXPECT_EQ(g.pay_date[359], ymd(2056, 12, 18));
  EXPECT_DOUBLE_EQ(g.years_30_360[0], 32.0 / 360);  // hand-computed: 12-16 -> 01-18, 30/360
  EXPECT_DOUBLE_EQ(g.years_365[0], 33.0 / 365);     // hand-computed: 15 + 18 days
  // identity: on a flat continuous curve DF(pay) / DF(settle) = exp(-r (T_pay - T_settle))
  EXPECT_NEAR(g.discount[0], std::exp(-0.045 * 33.0 / 365), 1e-14);
  for (int t = 1; t <= 360; ++t)
    EXPECT_NEAR(g.discount[t - 1], std::exp(-0.045 * g.years_365[t - 1]), 1e-13) << t;
}

TEST(PaymentGrid, CurveDatedBeforeSettlement) {
  const YieldCurve curve = flat_yield_curve(0.05, ymd(2026, 11, 13));
  const PaymentGrid g = payment_grid(curve, Settlement{kCutoff, kSettle, 24}, 12);
  EXPECT_EQ(g.pay_date[0], ymd(2027, 1, 25));
  // identity: discounting runs from settlement, not from the curve's date
  for (int t = 1; t <= 12; ++t)
    EXPECT_NEAR(g.discount[t - 1], std::exp(-0.05 * g.years_365[t - 1]), 1e-14) << t;
}

TEST(PaymentGrid, MatchesAGridBuiltWithQuantLib) {
  const auto ql_curve = ql_zero_curve(kCutoff);
  const YieldCurve curve = wrap_curve(ql_curve, kCutoff);
  for (int delay : {0, 14, 17, 24, 30}) {
    for (Date settle : {kCutoff, kSettle, ymd(2026, 12, 31), ymd(2027, 1, 10)}) {
      if (!(settle < payment_date(kCutoff, 1, delay))) continue;  // refused: see BadSettlement
      SCOPED_TRACE(::testing::Message() << "delay " << delay << ", settle day "
                                        << static_cast<unsigned>(settle.day()));
      const PaymentGrid g = payment_grid(curve, Settlement{kCutoff, settle, delay}, 480);
      const PaymentGrid h = hand_grid(kCutoff, settle, delay, 480, ql_curve.get());
      ASSERT_EQ(g.months, h.months);
      EXPECT_EQ(g.pay_date, h.pay_date);
      EXPECT_EQ(g.years_30_360, h.years_30_360);
      EXPECT_EQ(g.years_365, h.years_365);
      for (int t = 1; t <= 480; ++t)
        EXPECT_NEAR(g.discount[t - 1] / h.discount[t - 1], 1.0, 1e-13) << t;
    }
  }
}

TEST(PaymentGrid, NoMonths) {
  const PaymentGrid g =
      payment_grid(flat_yield_curve(0.04, kCutoff), Settlement{kCutoff, kSettle, 17}, 0);
  EXPECT_EQ(g.months, 0);
  EXPECT_TRUE(g.pay_date.empty());
  EXPECT_TRUE(g.discount.empty());
}

// The QuantLib CashFlows reference again, with the grid from payment_grid on curves/ curves.
TEST(PaymentGrid, QuantLibReferenceThroughTheGrid) {
  const PoolFlows pool = pool_flows(one_new_loan(), standard_curve(CurveShape::psa, 1.5));
  const auto ql_zero = ql_zero_curve(kCutoff);
  const std::vector<std::pair<YieldCurve, ql::ext::shared_ptr<ql::YieldTermStructure>>> curves = {
      {flat_yield_curve(0.045, kCutoff), ql_flat_curve(kCutoff, 0.045)},
      {wrap_curve(ql_zero, kCutoff), ql_zero}};
  const ql::Date settle = to_ql(kSettle);
  const ql::Thirty360 thirty_360(ql::Thirty360::BondBasis);
  for (const auto& [curve, ql_curve] : curves) {
    SCOPED_TRACE(curve.source);
    const PaymentGrid g = payment_grid(curve, Settlement{kCutoff, kSettle, 17}, pool.months);
    const ql::Leg leg = leg_of(pool.cash_flow, g);
    for (double price : {92.0, 100.0, 104.0}) {
      const double pv = price / 100 * pool.cutoff_balance;
      const std::optional<Rate> y = yield_for_pv(pool.cash_flow, g, pv);
      const std::optional<double> z = spread_for_pv(pool.cash_flow, g, pv);
      ASSERT_TRUE(y && z) << price;
      // source: QuantLib as a reference library (CashFlows::yield, npv, duration, zSpread)
      EXPECT_NEAR(*y, ql::CashFlows::yield(leg, pv, thirty_360, ql::Compounded, ql::Monthly, false,
                                           settle, settle, 1e-13), 1e-8);
      const ql::InterestRate rate(*y, thirty_360, ql::Compounded, ql::Monthly);
      EXPECT_NEAR(pv_at_yield(pool.cash_flow, g, *y) /
                      ql::CashFlows::npv(leg, rate, false, settle, settle), 1.0, 1e-8);
      EXPECT_NEAR(modified_duration(pool.cash_flow, g, *y),
                  ql::CashFlows::duration(leg, rate, ql::Duration::Modified, false, settle, settle),
                  1e-8);
      EXPECT_NEAR(*z, ql::CashFlows::zSpread(leg, pv, ql_curve, ql::Actual365Fixed(),
                                             ql::Continuous, ql::Annual, false, settle, settle,
                                             1e-13), 1e-8);
      EXPECT_NEAR(pv_at_spread(pool.cash_flow, g, *z) /
                      ql::CashFlows::npv(leg, ql_curve, *z, ql::Actual365Fixed(), ql::Continuous,
                                         ql::Annual, false, settle, settle), 1.0, 1e-8);
    }
  }
}

TEST(PaymentGrid, ParIdentityWithSettlementOnTheCutoff) {
  const LoanArrays loans = one_new_loan();
  const YieldCurve curve = flat_yield_curve(0.04, kCutoff);
  const PaymentGrid g = payment_grid(curve, Settlement{kCutoff, kCutoff, 0}, 360);
  for (int t = 1; t <= 360; ++t) EXPECT_DOUBLE_EQ(g.years_30_360[t - 1], t / 12.0) << t;
  const Rate net = 0.065 - 0.0025;
  for (const SpeedCurve& speed : {constant_curve(0.0), constant_curve(0.08), constant_curve(0.30),
                                  standard_curve(CurveShape::psa, 1.5)}) {
    SCOPED_TRACE(prepay_text(speed));
    const PoolFlows pool = pool_flows(loans, speed);
    // identity: level-pay, no losses, settlement on the cut-off, delay 0, y = net rate -> par
    // (DESIGN.md section 5)
    EXPECT_NEAR(100 * pv_at_yield(pool.cash_flow, g, net) / pool.cutoff_balance, 100.0, 1e-10);
    // identity: accrued interest is zero with settlement on the cut-off
    EXPECT_EQ(accrued_interest(pool.cutoff_balance, net, kCutoff, kCutoff), 0.0);
  }
}

// The message names both dates.
void expect_invalid(const YieldCurve& curve, const Settlement& s, int months,
                    const std::vector<std::string>& words) {
  try {
    payment_grid(curve, s, months);
    ADD_FAILURE() << "no exception";
  } catch (const std::invalid_argument& e) {
    for (const std::string& w : words)
      EXPECT_NE(std::string(e.what()).find(w), std::string::npos) << e.what() << " lacks " << w;
  }
}

TEST(PaymentGrid, BadSettlement) {
  const YieldCurve curve = flat_yield_curve(0.04, kCutoff);
  expect_invalid(curve, Settlement{kCutoff, ymd(2026, 11, 30), 17}, 12,
                 {"2026-11-30", "2026-12-01", "cut-off"});
  const YieldCurve later = flat_yield_curve(0.04, ymd(2026, 12, 20));
  expect_invalid(later, Settlement{kCutoff, kSettle, 17}, 12,
                 {"2026-12-16", "2026-12-20", "curve"});
  expect_invalid(curve, Settlement{ymd(2026, 12, 2), kSettle, 17}, 12,
                 {"2026-12-02", "first day"});
  expect_invalid(curve, Settlement{kCutoff, kSettle, -1}, 12, {"delay", "-1"});
  expect_invalid(curve, Settlement{kCutoff, kSettle, 17}, -1, {"-1"});
  // Settling on or after the first payment date: the buyer would miss cash the balances assume.
  expect_invalid(curve, Settlement{kCutoff, ymd(2027, 1, 18), 17}, 12,
                 {"2027-01-18", "first payment"});
  expect_invalid(curve, Settlement{kCutoff, ymd(2027, 1, 10), 0}, 12,
                 {"2027-01-10", "2027-01-01", "first payment"});
}

}  // namespace
}  // namespace poolbid
