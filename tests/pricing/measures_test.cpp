// Tests the measures on hand-built payment grids (no curve code): published BEY and Z-spread
// values, the par identity on projected loans, the price-yield curve and its round trips, the
// no-solution cases, modified duration, WAL and accrued interest.
#include <gtest/gtest.h>

#include <cmath>
#include <limits>
#include <optional>
#include <stdexcept>
#include <vector>

#include "pricing/pricing.h"
#include "tests/pricing/grid_support.h"

namespace poolbid {
namespace {

using testing_support::make_loans;
using testing_support::one_new_loan;
using testing_support::pool_flows;
using testing_support::regular_grid;
using testing_support::ymd;

// ---- Bond-equivalent yield ----------------------------------------------------------------------
TEST(Bey, PublishedValues) {
  // source: standard fixed-income texts (e.g. Fabozzi), as quoted in DESIGN.md section 8:
  // a monthly rate of 0.7% is a bond-equivalent yield of 8.548%; 0.325% monthly is 3.93%.
  EXPECT_NEAR(bey_from_cfy(12 * 0.007), 0.08548, 5e-6);   // source: standard fixed-income texts
  EXPECT_NEAR(bey_from_cfy(12 * 0.00325), 0.0393, 5e-5);  // source: standard fixed-income texts
}

TEST(Bey, RoundTrip) {
  for (double cfy = -0.05; cfy <= 0.30; cfy += 0.0025) {
    // identity: cfy_from_bey inverts bey_from_cfy
    EXPECT_NEAR(cfy_from_bey(bey_from_cfy(cfy)), cfy, 1e-14) << cfy;
    EXPECT_NEAR(bey_from_cfy(cfy_from_bey(cfy)), cfy, 1e-14) << cfy;
  }
  EXPECT_EQ(bey_from_cfy(0), 0);
  // identity: semiannual compounding of a monthly rate is at least the monthly rate itself
  EXPECT_GT(bey_from_cfy(0.06), 0.06);
}

// ---- Z-spread -----------------------------------------------------------------------------------
// Continuous spot rates 1% (0.5y), 2% (1y), 3% (1.5y); a 1.5-year 10% semiannual bond per 100.
PaymentGrid textbook_grid() {
  PaymentGrid g;
  g.months = 3;  // three payments; the grid's entries need not be a month apart
  g.years_365 = {0.5, 1.0, 1.5};
  g.years_30_360 = g.years_365;
  g.discount = {std::exp(-0.01 * 0.5), std::exp(-0.02 * 1.0), std::exp(-0.03 * 1.5)};
  return g;
}

TEST(ZSpread, TextbookBond) {
  const PaymentGrid g = textbook_grid();
  const std::vector<double> cash = {5, 5, 105};
  // source: Malz (FRM-style textbook example), as quoted in DESIGN.md section 8: price 105.62 at
  // a Z-spread of 3.00%.
  EXPECT_NEAR(pv_at_spread(cash, g, 0.03), 105.62, 0.005);  // source: Malz
  const std::optional<double> z = spread_for_pv(cash, g, 105.62);
  ASSERT_TRUE(z);
  EXPECT_NEAR(*z, 0.0300, 0.00005);  // source: Malz (3.00%)
  // identity: with no spread the bond is worth its cash on the curve
  EXPECT_NEAR(pv_at_spread(cash, g, 0.0),
              5 * std::exp(-0.005) + 5 * std::exp(-0.02) + 105 * std::exp(-0.045), 1e-12);
}

TEST(ZSpread, RoundTripAndNoSolution) {
  const std::vector<double> cash = {5, 5, 105};
  const PaymentGrid g = textbook_grid();
  for (double z = -0.05; z <= 0.40; z += 0.005) {
    const std::optional<double> back = spread_for_pv(cash, g, pv_at_spread(cash, g, z));
    ASSERT_TRUE(back) << z;
    EXPECT_NEAR(*back, z, 1e-10) << z;  // identity: spread -> pv -> spread
  }
  EXPECT_FALSE(spread_for_pv(cash, g, 0.0));
  EXPECT_FALSE(spread_for_pv(cash, g, -1.0));
  EXPECT_FALSE(spread_for_pv(std::vector<double>{0, 0, 0}, g, 100.0));
  EXPECT_FALSE(spread_for_pv(cash, g, 1.01 * pv_at_spread(cash, g, -0.99)));
  EXPECT_FALSE(spread_for_pv(cash, g, 0.99 * pv_at_spread(cash, g, 1.0)));
}

// ---- The par identity ---------------------------------------------------------------------------
// Settlement on the cut-off, delay 0: month t pays exactly t months after settlement, tau = t/12.
TEST(CashFlowYield, ParIdentityAtAnySpeed) {
  const LoanArrays loans = one_new_loan();
  const Rate net = 0.065 - 0.0025;
  const std::vector<SpeedCurve> speeds = {constant_curve(0.0), constant_curve(0.08),
                                          constant_curve(0.30),
                                          standard_curve(CurveShape::psa, 1.5)};
  for (const SpeedCurve& speed : speeds) {
    SCOPED_TRACE(prepay_text(speed));
    const PoolFlows pool = pool_flows(loans, speed);
    const PaymentGrid g = regular_grid(pool.months, 1.0 / 12);
    const double dirty = 100 * pv_at_yield(pool.cash_flow, g, net) / pool.cutoff_balance;
    // identity: level-pay loans with no losses, discounted at the net rate monthly from the
    // cut-off with no delay, are worth par at any prepayment speed (DESIGN.md section 5)
    EXPECT_NEAR(dirty, 100.0, 1e-10);
    const std::optional<Rate> y = yield_for_pv(pool.cash_flow, g, pool.cutoff_balance);
    ASSERT_TRUE(y);
    EXPECT_NEAR(*y, net, 1e-10);  // identity: the par yield is the net rate
  }
}

TEST(CashFlowYield, ParIdentityForAPoolOfLoans) {
  const LoanArrays loans = make_loans({
      {.id = "A", .upb = 310'000, .rate = 0.0575, .remaining = 300, .age = 60, .servicing = 0.0025},
      {.id = "B", .upb = 95'000, .rate = 0.0575, .remaining = 180, .age = 0, .servicing = 0.0025,
       .original_term = 180},
      {.id = "C", .upb = 640'000, .rate = 0.0600, .remaining = 357, .age = 3, .servicing = 0.0050},
  });  // every loan nets 5.5%
  const PoolFlows pool = pool_flows(loans, standard_curve(CurveShape::psa, 1.5));
  const PaymentGrid g = regular_grid(pool.months, 1.0 / 12);
  // identity: par at the common net rate (DESIGN.md section 5)
  EXPECT_NEAR(100 * pv_at_yield(pool.cash_flow, g, 0.055) / pool.cutoff_balance, 100.0, 1e-10);
}

// ---- Price and yield ----------------------------------------------------------------------------
// 360 months of projected cash at 8 CPR, paying 32/360 years after settlement and monthly after.
struct Pool360 {
  PoolFlows pool = pool_flows(one_new_loan(), constant_curve(0.08));
  PaymentGrid grid = regular_grid(pool.months, 32.0 / 360, 0.04);
};

TEST(CashFlowYield, PriceFallsAsYieldRises) {
  const Pool360 p;
  double previous = std::numeric_limits<double>::infinity();
  for (double y = -0.02; y <= 0.25 + 1e-12; y += 0.0025) {
    const double pv = pv_at_yield(p.pool.cash_flow, p.grid, y);
    EXPECT_LT(pv, previous) << y;  // identity: positive cash is worth less at a higher yield
    previous = pv;
  }
}

TEST(CashFlowYield, RoundTripAcrossYields) {
  const Pool360 p;
  for (double y = -0.02; y <= 0.25 + 1e-12; y += 0.0025) {
    const double pv = pv_at_yield(p.pool.cash_flow, p.grid, y);
    const std::optional<Rate> back = yield_for_pv(p.pool.cash_flow, p.grid, pv);
    ASSERT_TRUE(back) << y;
    EXPECT_NEAR(*back, y, 1e-10) << y;  // identity: yield -> pv -> yield
    // identity: pv -> yield -> pv, relative
    EXPECT_NEAR(pv_at_yield(p.pool.cash_flow, p.grid, *back) / pv, 1.0, 1e-10) << y;
  }
}

TEST(CashFlowYield, SpreadRoundTripOnTheCurve) {
  const Pool360 p;
  for (double z = -0.02; z <= 0.10 + 1e-12; z += 0.005) {
    const double pv = pv_at_spread(p.pool.cash_flow, p.grid, z);
    const std::optional<double> back = spread_for_pv(p.pool.cash_flow, p.grid, pv);
    ASSERT_TRUE(back) << z;
    EXPECT_NEAR(*back, z, 1e-10) << z;  // identity: spread -> pv -> spread
  }
  // identity: on a flat 4% continuous curve, the Z-spread is the continuous yield less 4%
  const double pv = pv_at_spread(p.pool.cash_flow, p.grid, 0.01);
  double continuous = 0;
  for (std::size_t i = 0; i < p.pool.cash_flow.size(); ++i)
    continuous += p.pool.cash_flow[i] * std::exp(-0.05 * p.grid.years_365[i]);
  EXPECT_NEAR(pv / continuous, 1.0, 1e-13);
}

TEST(CashFlowYield, NoSolution) {
  const Pool360 p;
  const std::vector<double>& cash = p.pool.cash_flow;
  EXPECT_FALSE(yield_for_pv(cash, p.grid, 0.0));
  EXPECT_FALSE(yield_for_pv(cash, p.grid, -5.0));
  EXPECT_FALSE(yield_for_pv(cash, p.grid, std::numeric_limits<double>::quiet_NaN()));
  EXPECT_FALSE(yield_for_pv(std::vector<double>(cash.size(), 0.0), p.grid, 1000.0));
  EXPECT_FALSE(yield_for_pv(std::vector<double>(cash.size(), -1.0), p.grid, 1000.0));
  EXPECT_FALSE(yield_for_pv(std::vector<double>{}, p.grid, 1000.0));
  // worth more than at -99% a year, or less than at +100%: no yield in the searched range
  EXPECT_FALSE(yield_for_pv(cash, p.grid, 1.001 * pv_at_yield(cash, p.grid, -0.99)));
  EXPECT_FALSE(yield_for_pv(cash, p.grid, 0.999 * pv_at_yield(cash, p.grid, 1.0)));
  EXPECT_TRUE(yield_for_pv(cash, p.grid, 0.999 * pv_at_yield(cash, p.grid, -0.99)));
  EXPECT_TRUE(yield_for_pv(cash, p.grid, 1.001 * pv_at_yield(cash, p.grid, 1.0)));
}

TEST(CashFlowYield, CashLongerThanTheGridIsAnError) {
  const PaymentGrid g = regular_grid(3, 1.0 / 12);
  const std::vector<double> cash = {1, 1, 1, 1};
  EXPECT_THROW(pv_at_yield(cash, g, 0.05), std::invalid_argument);
  EXPECT_THROW(pv_at_spread(cash, g, 0.0), std::invalid_argument);
  EXPECT_THROW(yield_for_pv(cash, g, 3.0), std::invalid_argument);
  EXPECT_THROW(spread_for_pv(cash, g, 3.0), std::invalid_argument);
  EXPECT_THROW(modified_duration(cash, g, 0.05), std::invalid_argument);
  // shorter cash reads the first months of the grid
  EXPECT_DOUBLE_EQ(pv_at_yield(std::vector<double>{1}, g, 0.0), 1.0);
}

// ---- Modified duration --------------------------------------------------------------------------
TEST(ModifiedDuration, OneCashFlow) {
  const PaymentGrid g = regular_grid(120, 1.0 / 12);
  std::vector<double> cash(120, 0.0);
  cash[119] = 1000;  // paid in 10 years
  // identity: a single payment at tau has modified duration tau / (1 + y/12), monthly compounding
  EXPECT_NEAR(modified_duration(cash, g, 0.06), 10.0 / 1.005, 1e-12);
  EXPECT_EQ(modified_duration(std::vector<double>(120, 0.0), g, 0.06), 0.0);
}

TEST(ModifiedDuration, MatchesTheSlopeOfPrice) {
  const Pool360 p;
  for (double y : {0.0, 0.03, 0.0625, 0.12}) {
    const double h = 1e-5;
    const double up = pv_at_yield(p.pool.cash_flow, p.grid, y + h);
    const double down = pv_at_yield(p.pool.cash_flow, p.grid, y - h);
    const double pv = pv_at_yield(p.pool.cash_flow, p.grid, y);
    // identity: -(1/P) dP/dy, here by a central difference
    EXPECT_NEAR(modified_duration(p.pool.cash_flow, p.grid, y), -(up - down) / (2 * h) / pv, 1e-7)
        << y;
  }
}

// ---- WAL ----------------------------------------------------------------------------------------
TEST(Wal, HandMadePool) {
  PoolFlows pool;
  pool.months = 3;
  pool.sched_principal = {10, 20, 30};
  pool.prepayment = {5, 0, 5};
  pool.recovery = {0, 10, 0};
  pool.net_interest = {100, 100, 100};  // interest does not count
  // hand-computed: principal 15, 30, 35 in months 1-3; (15 x 1 + 30 x 2 + 35 x 3) / 12 / 80
  EXPECT_DOUBLE_EQ(wal_years(pool), 180.0 / 12.0 / 80.0);
  EXPECT_EQ(wal_years(PoolFlows{}), 0.0);
  PoolFlows no_principal;
  no_principal.months = 2;
  no_principal.sched_principal = no_principal.prepayment = no_principal.recovery = {0, 0};
  EXPECT_EQ(wal_years(no_principal), 0.0);
}

TEST(Wal, BulletIsItsMaturity) {
  PoolFlows pool;
  pool.months = 60;
  pool.sched_principal.assign(60, 0.0);
  pool.prepayment.assign(60, 0.0);
  pool.recovery.assign(60, 0.0);
  pool.sched_principal[59] = 1e6;
  EXPECT_DOUBLE_EQ(wal_years(pool), 5.0);  // identity: one repayment in month 60 = 5 years
}

TEST(Wal, ProjectedLevelPayLoanShortensWithSpeed) {
  const LoanArrays loans = one_new_loan();
  const double slow = wal_years(pool_flows(loans, constant_curve(0.0)));
  const double fast = wal_years(pool_flows(loans, constant_curve(0.30)));
  EXPECT_GT(slow, 15.0);  // a new 30-year 6.5% loan without prepayment: WAL about 19.6 years
  EXPECT_LT(slow, 21.0);
  EXPECT_LT(fast, 4.0);
}

// ---- Accrued interest ---------------------------------------------------------------------------
TEST(AccruedInterest, HandComputed) {
  // hand-computed: 2026-12-01 -> 2026-12-17 is 16 days 30/360; 1,000,000 x 6.25% x 16 / 360
  EXPECT_NEAR(accrued_interest(1'000'000, 0.0625, ymd(2026, 12, 1), ymd(2026, 12, 17)),
              1'000'000 * 0.0625 * 16 / 360.0, 1e-9);
  // hand-computed: 2026-12-01 -> 2027-01-15 is 30 + 14 = 44 days 30/360
  EXPECT_NEAR(accrued_interest(500'000, 0.055, ymd(2026, 12, 1), ymd(2027, 1, 15)),
              500'000 * 0.055 * 44 / 360.0, 1e-9);
  // common practice: 30/360 bond basis counts February as 30 days; 2027-02-01 -> 03-01 is 30
  EXPECT_NEAR(accrued_interest(360'000, 0.05, ymd(2027, 2, 1), ymd(2027, 3, 1)),
              360'000 * 0.05 * 30 / 360.0, 1e-9);
  EXPECT_EQ(accrued_interest(1'000'000, 0.0625, ymd(2026, 12, 1), ymd(2026, 12, 1)), 0.0);
}

TEST(AccruedInterest, SettlementBeforeCutoffIsAnError) {
  try {
    accrued_interest(1'000'000, 0.0625, ymd(2026, 12, 1), ymd(2026, 11, 30));
    FAIL() << "no exception";
  } catch (const std::invalid_argument& e) {
    EXPECT_NE(std::string(e.what()).find("2026-11-30"), std::string::npos) << e.what();
    EXPECT_NE(std::string(e.what()).find("2026-12-01"), std::string::npos) << e.what();
  }
}

}  // namespace
}  // namespace poolbid
