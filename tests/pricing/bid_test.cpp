// Tests of price_pool: the par identity through the bid, the three targets agreeing, an ARM and its
// fixed twin, loan values summing to the bid, the credit cost, risk against identities, threads.
#include <gtest/gtest.h>

#include <chrono>
#include <cmath>
#include <cstring>
#include <string>
#include <vector>

#include "pricing/pricing.h"
#include "tests/support/loans.h"

namespace poolbid {
namespace {

using testing_support::make_loans;
using testing_support::TestLoan;
using std::chrono::day;
using std::chrono::month;
using std::chrono::year;

constexpr Date kCutoff{year{2026}, month{12}, day{1}};

BidRequest yield_request(double bey, Assumptions a = {}, int delay = 17,
                         Date settle = Date{year{2026}, month{12}, day{17}}) {
  BidRequest r;
  r.target = BidTarget::yield;
  r.value = bey;
  r.settlement = Settlement{kCutoff, settle, delay};
  r.assumptions = std::move(a);
  return r;
}

// A small pool of fixed-rate level-pay loans at different ages, rates and balances.
std::vector<TestLoan> level_pay_loans() {
  std::vector<TestLoan> loans;
  for (int i = 0; i < 12; ++i) {
    TestLoan t{.id = "L" + std::to_string(i), .upb = 100'000.0 + 25'000.0 * i,
               .rate = 0.055 + 0.0025 * (i % 5)};
    t.age = 3 * i;
    t.remaining = 360 - t.age;
    t.servicing = 0.0025;
    loans.push_back(t);
  }
  return loans;
}

// One note rate less one servicing fee on every loan: the par identity needs the pool's net rate
// to be every loan's net rate.
std::vector<TestLoan> same_coupon_loans() {
  std::vector<TestLoan> loans = level_pay_loans();
  for (TestLoan& t : loans) t.rate = 0.0625;
  return loans;
}

// A 5/1-style ARM on SOFR30A: margin 2.75%, 2% periodic cap, first reset at loan month 61, then
// yearly.
TestLoan& make_arm(TestLoan& t) {
  t.amortization = Amortization::arm;
  t.arm_index = "SOFR30A";
  t.arm_margin = 0.0275;
  t.arm_periodic_cap = 0.02;
  t.arm_first_reset = 61;
  t.arm_reset_period = 12;
  return t;
}

Assumptions with_defaults() {
  Assumptions a;
  a.prepay = standard_curve(CurveShape::psa, 1.5);
  a.default_rate = standard_curve(CurveShape::sda, 2.0);
  a.severity = constant_curve(0.45);
  a.lag_months = 12;
  return a;
}

TEST(Bid, ParIdentityThroughTheBid) {
  // identity (DESIGN.md section 5): level-pay loans, no losses, settlement on the cut-off, delay
  // 0, cash-flow yield = net rate -> price 100 at any prepayment speed.
  const LoanArrays loans = make_loans(same_coupon_loans());
  const YieldCurve curve = flat_yield_curve(0.04, kCutoff);
  for (const double cpr : {0.0, 0.08, 0.30}) {
    Assumptions a;
    a.prepay = constant_curve(cpr);
    const BidRequest request = yield_request(bey_from_cfy(0.06), a, 0, kCutoff);
    const BidResult r = price_pool(loans, curve, request);
    EXPECT_NEAR(r.clean_price, 100.0, 1e-9) << "CPR " << cpr;
    EXPECT_DOUBLE_EQ(r.accrued, 0.0);
    EXPECT_NEAR(r.loss_adjusted.cfy, 0.06, 1e-12);
    EXPECT_NEAR(r.no_loss.cfy, 0.06, 1e-12);  // no defaults: the two views are one
  }
}

TEST(Bid, TheThreeTargetsAgree) {
  // identity: price from yield, then yield from that price, then the price at that Z-spread.
  const LoanArrays loans = make_loans(level_pay_loans());
  const YieldCurve curve = flat_yield_curve(0.042, kCutoff);
  const BidResult by_yield = price_pool(loans, curve, yield_request(0.0725, with_defaults()));

  BidRequest by_price_request = yield_request(0, with_defaults());
  by_price_request.target = BidTarget::price;
  by_price_request.value = by_yield.clean_price;
  const BidResult by_price = price_pool(loans, curve, by_price_request);
  EXPECT_NEAR(by_price.loss_adjusted.bey, 0.0725, 1e-10);
  EXPECT_NEAR(by_price.dirty_value, by_yield.dirty_value, 1e-6);

  BidRequest by_spread_request = by_price_request;
  by_spread_request.target = BidTarget::spread;
  by_spread_request.value = by_yield.loss_adjusted.z_spread;
  const BidResult by_spread = price_pool(loans, curve, by_spread_request);
  EXPECT_NEAR(by_spread.clean_price, by_yield.clean_price, 1e-9);
  EXPECT_NEAR(by_spread.loss_adjusted.bey, 0.0725, 1e-10);
}

TEST(Bid, FloatingArmUnderAFlatCurveIsItsFixedTwin) {
  // identity: on a flat curve with no caps, an ARM whose index + margin equals its note rate at
  // every reset pays what a fixed-rate loan at that rate pays.
  const YieldCurve curve = flat_yield_curve(0.04, kCutoff);
  TestLoan arm{.id = "ARM", .upb = 300'000, .rate = 0.065};
  arm.age = 58;
  arm.remaining = 302;
  arm.amortization = Amortization::arm;
  arm.arm_index = "SOFR30A";
  // First reset at projection month 4 (March), then every 12 months: always a 31-day month, so
  // the 1-month Actual/360 forward of a flat curve is the same at every reset.
  arm.arm_first_reset = 62;
  arm.arm_reset_period = 12;
  const Date reset_start = collection_start(kCutoff, 4);
  arm.arm_margin = 0.065 - forward_rate(curve, reset_start, 1);
  TestLoan twin = arm;
  twin.id = "FIXED";
  twin.amortization = Amortization::fixed;

  Assumptions a;
  a.prepay = constant_curve(0.10);
  const BidResult floating = price_pool(make_loans({arm}), curve, yield_request(0.07, a));
  const BidResult fixed = price_pool(make_loans({twin}), curve, yield_request(0.07, a));
  EXPECT_EQ(floating.arm_loans, 1u);
  EXPECT_EQ(fixed.arm_loans, 0u);
  EXPECT_NEAR(floating.clean_price, fixed.clean_price, 1e-9);
  EXPECT_NEAR(floating.loss_adjusted.z_spread, fixed.loss_adjusted.z_spread, 1e-11);
  EXPECT_NEAR(floating.loss_adjusted.wal_years, fixed.loss_adjusted.wal_years, 1e-11);

  // The same ARM on a curve 100 bp higher resets to a higher coupon: worth more at one yield,
  // and its effective duration is shorter than the fixed twin's (its coupon moves with the curve).
  const YieldCurve higher = flat_yield_curve(0.05, kCutoff);
  const BidResult floating_high = price_pool(make_loans({arm}), higher, yield_request(0.07, a));
  const BidResult fixed_high = price_pool(make_loans({twin}), higher, yield_request(0.07, a));
  EXPECT_GT(floating_high.clean_price, fixed_high.clean_price + 0.5);
  EXPECT_LT(floating.effective_duration, fixed.effective_duration);
}

TEST(Bid, LoanValuesSumToTheDirtyValue) {
  // identity: present value is linear, so the loans valued at the pool's yield sum to the pool.
  const LoanArrays loans = make_loans(level_pay_loans());
  const YieldCurve curve = flat_yield_curve(0.042, kCutoff);
  for (const BidTarget target : {BidTarget::yield, BidTarget::price}) {
    BidRequest request = yield_request(0.0725, with_defaults());
    request.target = target;
    if (target == BidTarget::price) request.value = 97.5;
    request.loan_values = true;
    const BidResult r = price_pool(loans, curve, request);
    ASSERT_EQ(r.flows.loans.present_value.size(), loans.size());
    double sum = 0;
    for (double v : r.flows.loans.present_value) sum += v;
    EXPECT_NEAR(sum / r.dirty_value, 1.0, 1e-12);
  }
}

TEST(Bid, CreditCostIsTheSpreadTheLossesTakeAway) {
  const LoanArrays loans = make_loans(level_pay_loans());
  const YieldCurve curve = flat_yield_curve(0.042, kCutoff);
  const BidResult lossy = price_pool(loans, curve, yield_request(0.0725, with_defaults()));
  EXPECT_GT(lossy.expected_loss, 0);
  EXPECT_NEAR(lossy.expected_loss_pct, lossy.expected_loss / lossy.cutoff_balance * 100, 1e-12);
  EXPECT_GT(lossy.no_loss.z_spread, lossy.loss_adjusted.z_spread);
  EXPECT_NEAR(lossy.credit_cost_bp,
              (lossy.no_loss.z_spread - lossy.loss_adjusted.z_spread) * 1e4, 1e-9);
  EXPECT_GT(lossy.no_loss.bey, lossy.loss_adjusted.bey);

  Assumptions clean = with_defaults();
  clean.default_rate = constant_curve(0);
  const BidResult none = price_pool(loans, curve, yield_request(0.0725, clean));
  EXPECT_EQ(none.credit_cost_bp, 0.0);
  EXPECT_EQ(none.expected_loss, 0.0);
  EXPECT_EQ(none.no_loss.bey, none.loss_adjusted.bey);
}

TEST(Bid, EffectiveDurationOfFixedFlowsIsTheirSpreadDuration) {
  // identity: when the flows do not read the curve, moving the continuous zero rates by d moves
  // every discount factor by exp(-d T), so dP/dd = -sum T PV_T and d2P/dd2 = sum T^2 PV_T.
  const LoanArrays loans = make_loans(level_pay_loans());
  const YieldCurve curve = flat_yield_curve(0.042, kCutoff);
  BidRequest request = yield_request(0.0725, with_defaults());
  request.shock_bp = 1;
  const BidResult r = price_pool(loans, curve, request);
  const PaymentGrid grid = payment_grid(curve, request.settlement, r.flows.pool.months);
  double pv = 0, first = 0, second = 0;
  for (int t = 0; t < r.flows.pool.months; ++t) {
    const double T = grid.years_365[t];
    const double v = r.flows.pool.cash_flow[t] * grid.discount[t] *
                     std::exp(-r.loss_adjusted.z_spread * T);
    pv += v;
    first += T * v;
    second += T * T * v;
  }
  EXPECT_NEAR(r.effective_duration, first / pv, 1e-5);
  EXPECT_NEAR(r.effective_convexity, second / pv, 1e-3);
  EXPECT_NEAR(r.dv01, first * 1e-4, 1e-4 * first * 1e-4);
}

TEST(Bid, MixedPoolRiskEqualsFullReprojection) {
  // identity: price_pool re-projects only the ARMs on the moved curves; projecting the whole pool
  // on each moved curve gives the same effective duration and convexity.
  std::vector<TestLoan> mixed = level_pay_loans();
  for (int i = 0; i < 4; ++i) {
    TestLoan t{.id = "A" + std::to_string(i), .upb = 200'000.0 + 10'000.0 * i, .rate = 0.06};
    t.age = 50 + i;
    t.remaining = 360 - t.age;
    t.arm_lifetime_cap = 0.11;
    mixed.push_back(make_arm(t));
  }
  const LoanArrays loans = make_loans(mixed);
  const YieldCurve curve = flat_yield_curve(0.042, kCutoff);
  const BidRequest request = yield_request(0.0725, with_defaults());
  const BidResult r = price_pool(loans, curve, request);
  EXPECT_EQ(r.arm_loans, 4u);

  const int horizon = projection_horizon(loans, request.assumptions);
  auto pv_on = [&](const YieldCurve& c) {
    const CouponPaths coupons = arm_coupon_paths(loans, c, kCutoff, horizon);
    ProjectionOptions options;
    options.coupons = &coupons;
    const Projection p = project_pool(loans, request.assumptions, options);
    return pv_at_spread(p.pool.cash_flow, payment_grid(c, request.settlement, horizon),
                        r.loss_adjusted.z_spread);
  };
  const double base = pv_on(curve);
  const double up = pv_on(shift_curve(curve, 25));
  const double down = pv_on(shift_curve(curve, -25));
  EXPECT_NEAR(r.effective_duration, (down - up) / (2 * base * 0.0025), 1e-9);
  EXPECT_NEAR(r.effective_convexity, (up + down - 2 * base) / (base * 0.0025 * 0.0025), 1e-5);
  EXPECT_NEAR(r.dv01, (down - up) / 50, 1e-6 * r.dv01);

  // Key-rate durations likewise, each tenor's triangle alone.
  ASSERT_EQ(r.key_rate_durations.size(), request.key_rate_years.size());
  for (std::size_t k = 0; k < request.key_rate_years.size(); ++k) {
    CurveShift bump{0, request.key_rate_years, std::vector<double>(4, 0.0)};
    bump.key_bp[k] = 25;
    const double key_up = pv_on(shift_curve(curve, bump));
    bump.key_bp[k] = -25;
    const double key_down = pv_on(shift_curve(curve, bump));
    EXPECT_NEAR(r.key_rate_durations[k].duration, (key_down - key_up) / (2 * base * 0.0025), 1e-9)
        << request.key_rate_years[k];
  }
}

TEST(Bid, AccruedInterestAndCleanPriceByHand) {
  // hand-computed: accrued = sum of balance x (note rate - servicing) x 16 / 360 for settlement
  // on 2026-12-17 (30/360: 16 days after the 2026-12-01 cut-off); clean = dirty - accrued.
  const std::vector<TestLoan> pool = level_pay_loans();
  double balance = 0, accrued = 0;
  for (const TestLoan& t : pool) {
    balance += t.upb;
    accrued += t.upb * (t.rate - t.servicing) * 16 / 360;
  }
  const BidResult r = price_pool(make_loans(pool), flat_yield_curve(0.042, kCutoff),
                                 yield_request(0.0725, with_defaults()));
  EXPECT_NEAR(r.accrued, accrued, 1e-6);
  EXPECT_NEAR(r.cutoff_balance, balance, 1e-6);
  EXPECT_NEAR(r.clean_price, r.dirty_price - accrued / balance * 100, 1e-10);
  EXPECT_NEAR(r.clean_value, r.dirty_value - accrued, 1e-6);
  EXPECT_GT(r.accrued, 0);
}

TEST(Bid, KeyRateDurationsAddUpToTheEffectiveDuration) {
  // identity: the key-rate triangles sum to one at every tenor, so the key-rate shifts together
  // are the parallel shift; to first order the durations add up.
  const LoanArrays loans = make_loans(level_pay_loans());
  const YieldCurve curve = flat_yield_curve(0.042, kCutoff);
  BidRequest request = yield_request(0.0725, with_defaults());
  request.shock_bp = 1;
  const BidResult r = price_pool(loans, curve, request);
  ASSERT_EQ(r.key_rate_durations.size(), 4u);
  double sum = 0;
  for (const auto& k : r.key_rate_durations) {
    EXPECT_GT(k.duration, 0) << k.years;
    sum += k.duration;
  }
  EXPECT_NEAR(sum, r.effective_duration, 1e-6);
  // Level-pay loans of mostly 30 years: more of the value sits near 5 and 10 years than at 30.
  EXPECT_GT(r.key_rate_durations[1].duration, r.key_rate_durations[3].duration);

  request.key_rate_years = {};
  EXPECT_TRUE(price_pool(loans, curve, request).key_rate_durations.empty());
}

TEST(Bid, ResultsDoNotDependOnThreads) {
  std::vector<TestLoan> many;
  for (int i = 0; i < 9'000; ++i) {
    TestLoan t{.id = "T" + std::to_string(i), .upb = 50'000.0 + 37.0 * i,
               .rate = 0.05 + 0.00125 * (i % 40)};
    t.age = i % 120;
    t.remaining = 360 - t.age;
    if (i % 7 == 0) make_arm(t);
    many.push_back(t);
  }
  const LoanArrays loans = make_loans(many);
  const YieldCurve curve = flat_yield_curve(0.042, kCutoff);
  BidRequest request = yield_request(0.0725, with_defaults());
  request.loan_values = true;
  request.threads = 1;
  const BidResult one = price_pool(loans, curve, request);
  request.threads = 2;
  const BidResult two = price_pool(loans, curve, request);
  request.threads = 3;
  const BidResult three = price_pool(loans, curve, request);
  for (const BidResult* r : {&two, &three}) {
    EXPECT_EQ(std::memcmp(&r->loss_adjusted, &one.loss_adjusted, sizeof(PoolView)), 0);
    EXPECT_EQ(std::memcmp(&r->no_loss, &one.no_loss, sizeof(PoolView)), 0);
    EXPECT_EQ(r->clean_price, one.clean_price);
    EXPECT_EQ(r->effective_duration, one.effective_duration);
    EXPECT_EQ(r->effective_convexity, one.effective_convexity);
    EXPECT_EQ(r->flows.loans.present_value, one.flows.loans.present_value);
  }
  EXPECT_EQ(one.arm_loans, 9'000u / 7 + 1);
}

TEST(Bid, SaysSoWhenNothingSolves) {
  const YieldCurve curve = flat_yield_curve(0.042, kCutoff);
  EXPECT_THROW(price_pool(make_loans({}), curve, yield_request(0.07)), PricingError);

  // A clean price of 1,000% of UPB for loans paying off within two months: no yield above -99%
  // a year discounts their cash up to that.
  TestLoan short_loan{.id = "S", .upb = 100'000, .rate = 0.06};
  short_loan.age = 358;
  short_loan.remaining = 2;
  BidRequest request = yield_request(0);
  request.target = BidTarget::price;
  request.value = 1000;
  try {
    price_pool(make_loans({short_loan}), curve, request);
    FAIL() << "expected PricingError";
  } catch (const PricingError& e) {
    EXPECT_NE(std::string(e.what()).find("no cash-flow yield"), std::string::npos) << e.what();
  }
}

TEST(Bid, SettlementBeforeTheCutoffIsRefused) {
  const YieldCurve curve = flat_yield_curve(0.042, Date{year{2026}, month{11}, day{1}});
  EXPECT_THROW(price_pool(make_loans(level_pay_loans()), curve,
                          yield_request(0.07, {}, 17, Date{year{2026}, month{11}, day{20}})),
               std::invalid_argument);
}

}  // namespace
}  // namespace poolbid
