// Tests the measures against QuantLib's CashFlows (npv, yield, duration, zSpread) on the same
// dates and amounts: 360 months of projected loan cash with prepayments, settlement mid-month,
// delay 17, on a flat and a rising QuantLib curve. The grid is built here from QuantLib's dates,
// day counts and curve, so this test does not use curves/.
#include <gtest/gtest.h>

#include <ql/cashflows/cashflows.hpp>
#include <ql/interestrate.hpp>

#include <optional>
#include <vector>

#include "pricing/pricing.h"
#include "tests/pricing/grid_support.h"

namespace poolbid {
namespace {

using namespace testing_support;
namespace ql = QuantLib;

// Cut-off 2026-12-01, settlement 2026-12-16, delay 17 (month 1 pays 2027-01-18).
struct Case {
  Date cutoff = ymd(2026, 12, 1);
  Date settle = ymd(2026, 12, 16);
  int delay = 17;
  PoolFlows pool = pool_flows(one_new_loan(), standard_curve(CurveShape::psa, 1.5));
  ql::ext::shared_ptr<ql::YieldTermStructure> curve;
  PaymentGrid grid;
  ql::Leg leg;

  explicit Case(ql::ext::shared_ptr<ql::YieldTermStructure> c) : curve(std::move(c)) {
    grid = hand_grid(cutoff, settle, delay, pool.months, curve.get());
    leg = leg_of(pool.cash_flow, grid);
  }
  ql::InterestRate yield(double y) const {
    return ql::InterestRate(y, ql::Thirty360(ql::Thirty360::BondBasis), ql::Compounded,
                            ql::Monthly);
  }
};

std::vector<Case> cases() {
  std::vector<Case> out;
  out.emplace_back(ql_flat_curve(ymd(2026, 12, 1), 0.045));
  out.emplace_back(ql_zero_curve(ymd(2026, 12, 1)));
  return out;
}

TEST(QuantLibReference, GridIsWhatWasMeant) {
  const Case s(ql_flat_curve(ymd(2026, 12, 1), 0.045));
  ASSERT_EQ(s.pool.months, 360);
  EXPECT_EQ(s.grid.pay_date[0], ymd(2027, 1, 18));
  EXPECT_EQ(s.grid.pay_date[359], ymd(2056, 12, 18));
  EXPECT_DOUBLE_EQ(s.grid.years_30_360[0], 32.0 / 360);  // hand-computed: 12-16 -> 01-18
  EXPECT_DOUBLE_EQ(s.grid.years_365[0], 33.0 / 365);     // hand-computed: 15 + 18 days
}

TEST(QuantLibReference, PresentValueAtYield) {
  const Case s(ql_flat_curve(ymd(2026, 12, 1), 0.045));
  for (double y : {-0.01, 0.0, 0.03, 0.0625, 0.08, 0.15}) {
    // source: QuantLib as a reference library (CashFlows::npv at an InterestRate)
    const double expected = ql::CashFlows::npv(s.leg, s.yield(y), false, to_ql(s.settle),
                                               to_ql(s.settle));
    EXPECT_NEAR(pv_at_yield(s.pool.cash_flow, s.grid, y) / expected, 1.0, 1e-8) << y;
  }
}

TEST(QuantLibReference, YieldForPresentValue) {
  const Case s(ql_flat_curve(ymd(2026, 12, 1), 0.045));
  for (double price : {85.0, 98.5, 100.0, 103.25, 112.0}) {
    const double pv = price / 100 * s.pool.cutoff_balance;
    // source: QuantLib as a reference library (CashFlows::yield)
    const double expected =
        ql::CashFlows::yield(s.leg, pv, ql::Thirty360(ql::Thirty360::BondBasis), ql::Compounded,
                             ql::Monthly, false, to_ql(s.settle), to_ql(s.settle), 1e-13);
    const std::optional<Rate> y = yield_for_pv(s.pool.cash_flow, s.grid, pv);
    ASSERT_TRUE(y) << price;
    EXPECT_NEAR(*y, expected, 1e-8) << price;
  }
}

TEST(QuantLibReference, ModifiedDuration) {
  const Case s(ql_flat_curve(ymd(2026, 12, 1), 0.045));
  for (double y : {0.0, 0.03, 0.0625, 0.10}) {
    // source: QuantLib as a reference library (CashFlows::duration, Duration::Modified)
    const double expected = ql::CashFlows::duration(s.leg, s.yield(y), ql::Duration::Modified,
                                                    false, to_ql(s.settle), to_ql(s.settle));
    EXPECT_NEAR(modified_duration(s.pool.cash_flow, s.grid, y), expected, 1e-8) << y;
  }
}

TEST(QuantLibReference, PresentValueAtSpread) {
  for (const Case& s : cases()) {
    for (double z : {-0.005, 0.0, 0.0125, 0.03}) {
      // source: QuantLib as a reference library (CashFlows::npv on a Z-spreaded curve)
      const double expected =
          ql::CashFlows::npv(s.leg, s.curve, z, ql::Actual365Fixed(), ql::Continuous, ql::Annual,
                             false, to_ql(s.settle), to_ql(s.settle));
      EXPECT_NEAR(pv_at_spread(s.pool.cash_flow, s.grid, z) / expected, 1.0, 1e-8) << z;
    }
  }
}

TEST(QuantLibReference, SpreadForPresentValue) {
  for (const Case& s : cases()) {
    for (double price : {90.0, 98.5, 100.0, 104.0}) {
      const double pv = price / 100 * s.pool.cutoff_balance;
      // source: QuantLib as a reference library (CashFlows::zSpread)
      const double expected =
          ql::CashFlows::zSpread(s.leg, pv, s.curve, ql::Actual365Fixed(), ql::Continuous,
                                 ql::Annual, false, to_ql(s.settle), to_ql(s.settle), 1e-13);
      const std::optional<double> z = spread_for_pv(s.pool.cash_flow, s.grid, pv);
      ASSERT_TRUE(z) << price;
      EXPECT_NEAR(*z, expected, 1e-8) << price;
    }
  }
}

}  // namespace
}  // namespace poolbid
