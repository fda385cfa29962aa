// Tests project_pool's loan types and options one at a time: interest-only and balloon loans,
// advancing, lag, delinquent default, zero-rate loans, coupon paths, severity by month of default,
// where the table ends, and bad options and inputs.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include "cashflow/cashflow.h"
#include "tests/cashflow/flows_support.h"

namespace poolbid {
namespace {

using namespace testing_support;

// ---- interest-only and balloon loans
// ----------------------------------------------------------------

TEST(InterestOnly, PaysInterestOnlyThenAmortisesToZero) {
  // 360-month loan, 10 months old, interest-only for the first 120 months from first payment.
  const LoanArrays loans = make_loans({{.id = "IO",
                                        .upb = 300'000,
                                        .rate = 0.06,
                                        .remaining = 350,
                                        .age = 10,
                                        .servicing = 0.0025,
                                        .original_term = 360,
                                        .amortization = Amortization::interest_only,
                                        .io_months = 120}});
  const PoolFlows f = project_pool(loans, Assumptions{}).pool;
  ASSERT_EQ(f.months, 350);
  for (int t = 1; t <= 110; ++t) {  // loan months 11..120
    ASSERT_EQ(f.sched_principal[t - 1], 0.0) << t;
    ASSERT_NEAR(f.gross_interest[t - 1], 1'500.0, 1e-9) << t;  // hand-computed: 300,000 x 6% / 12
    ASSERT_NEAR(f.net_interest[t - 1], 1'437.5, 1e-9) << t;  // hand-computed: 300,000 x 5.75% / 12
    ASSERT_EQ(f.begin_balance[t - 1], 300'000.0) << t;
  }
  // Month 111 (loan month 121): level payment on 300,000 over the 240 months left.
  // identity: the annuity formula, written independently in flows_support.h
  const double level = level_payment(300'000, 0.06, 240);
  EXPECT_NEAR(scheduled_payment(f, 111), level, 1e-8);
  EXPECT_GT(f.sched_principal[110], 0.0);
  // identity: a level payment every month; the last pays the balance left, which carries the
  // rounding of 240 months
  for (int t = 112; t <= 350; ++t) ASSERT_NEAR(scheduled_payment(f, t), level, 1e-6) << t;
  EXPECT_EQ(f.end_balance[349], 0.0);  // identity: amortises to exactly zero
}

TEST(InterestOnly, PastTheInterestOnlyPeriodAmortisesFromMonthOne) {
  const LoanArrays loans = make_loans({{.id = "IO",
                                        .upb = 250'000,
                                        .rate = 0.05,
                                        .remaining = 230,
                                        .age = 130,
                                        .original_term = 360,
                                        .amortization = Amortization::interest_only,
                                        .io_months = 120}});
  const PoolFlows f = project_pool(loans, Assumptions{}).pool;
  ASSERT_EQ(f.months, 230);
  // identity: the annuity formula over the 230 months left
  EXPECT_NEAR(scheduled_payment(f, 1), level_payment(250'000, 0.05, 230), 1e-8);
  EXPECT_EQ(f.end_balance.back(), 0.0);  // identity: amortises to exactly zero
}

TEST(Balloon, PaysTheBalanceAtTheBalloonMonth) {
  // 30-year amortisation, 10 months old, balloon in loan month 84 = projection month 74.
  const LoanArrays loans = make_loans({{.id = "B",
                                        .upb = 200'000,
                                        .rate = 0.07,
                                        .remaining = 350,
                                        .age = 10,
                                        .original_term = 360,
                                        .amortization = Amortization::balloon,
                                        .balloon_month = 84}});
  const PoolFlows f = project_pool(loans, Assumptions{}).pool;
  ASSERT_EQ(f.months, 74);
  // identity: the annuity formula, and the balance amortised independently here
  const double level = level_payment(200'000, 0.07, 350);
  double balance = 200'000;
  for (int t = 1; t <= 73; ++t) {
    ASSERT_NEAR(scheduled_payment(f, t), level, 1e-8) << t;
    balance = balance * (1 + 0.07 / 12) - level;
  }
  EXPECT_NEAR(f.begin_balance[73], balance, 1e-6);
  EXPECT_EQ(f.sched_principal[73], f.begin_balance[73]);  // identity: the balloon: all that is left
  EXPECT_NEAR(f.gross_interest[73], balance * 0.07 / 12, 1e-8);  // identity: balance x rate / 12
  EXPECT_EQ(f.end_balance[73], 0.0);
}

TEST(Balloon, PrepaymentStopsAtTheBalloon) {
  const LoanArrays loans = make_loans({{.id = "B",
                                        .upb = 200'000,
                                        .rate = 0.07,
                                        .remaining = 350,
                                        .age = 10,
                                        .original_term = 360,
                                        .amortization = Amortization::balloon,
                                        .balloon_month = 84}});
  const Assumptions a{.prepay = constant_curve(0.10), .default_rate = constant_curve(0)};
  const PoolFlows f = project_pool(loans, a).pool;
  ASSERT_EQ(f.months, 74);
  EXPECT_EQ(f.prepayment[73], 0.0);
  EXPECT_EQ(f.sched_principal[73], f.begin_balance[73]);
  EXPECT_GT(f.prepayment[72], 0.0);
  EXPECT_EQ(f.end_balance[73], 0.0);
}

// ---- liquidation: advancing, lag, severity
// ---------------------------------------------------------

LoanArrays one_loan(int remaining = 100) {
  return make_loans({{.id = "L",
                      .upb = 500'000,
                      .rate = 0.065,
                      .remaining = remaining,
                      .age = 20,
                      .servicing = 0.0025}});
}

TEST(Advancing, TotalSeverityRecoversNothingAndAdvancesInterest) {
  const Assumptions a{.prepay = constant_curve(0),
                      .default_rate = constant_curve(0.05),
                      .severity = constant_curve(1.0),
                      .lag_months = 12,
                      .advancing = Advancing::interest};
  const PoolFlows f = project_pool(one_loan(), a).pool;
  ASSERT_EQ(f.months, 112);
  for (int t = 1; t <= f.months; ++t) ASSERT_EQ(f.recovery[t - 1], 0.0) << t;
  EXPECT_GT(f.advanced_interest[0], 0.0);
  // DESIGN.md 4.7: month 1 advances net interest on month 1's defaults
  EXPECT_NEAR(f.advanced_interest[0], f.defaults[0] * (0.065 - 0.0025) / 12, 1e-9);
  // identity: net interest includes the advance
  EXPECT_NEAR(f.net_interest[0],
              (f.begin_balance[0] - f.defaults[0]) * 0.0625 / 12 + f.advanced_interest[0], 1e-8);
  // identity: loss = D when nothing comes back
  for (int t = 1; t <= 100; ++t) ASSERT_NEAR(f.loss[t + 12 - 1], f.defaults[t - 1], 1e-9) << t;
  // after the last default month, the cohorts still awaiting liquidation run off one by one
  EXPECT_GT(f.advanced_interest[110], 0.0);
  // identity: month 111 advances on month 100's defaults only, at the 6.25% net rate
  EXPECT_NEAR(f.advanced_interest[110], f.defaults[99] * 0.0625 / 12, 1e-9);
  EXPECT_EQ(f.advanced_interest[111], 0.0);  // month 112: liquidation, no advance
}

TEST(Advancing, RecoveryRepaysTheAdvances) {
  const Assumptions a{.prepay = constant_curve(0),
                      .default_rate = constant_curve(0.05),
                      .severity = constant_curve(0.30),
                      .lag_months = 12,
                      .advancing = Advancing::interest};
  const PoolFlows f = project_pool(one_loan(), a).pool;
  ASSERT_EQ(f.months, 112);
  const double n = 0.065 - 0.0025;
  for (int t = 1; t <= 100; ++t) {
    const double d = f.defaults[t - 1];
    // identity (DESIGN.md 4.7): recovery = (1 - severity) D - advances; here 12 months of D n / 12
    ASSERT_NEAR(f.recovery[t + 11], 0.70 * d - 12 * d * n / 12, 1e-9) << t;
    ASSERT_NEAR(f.loss[t + 11], d - (0.70 * d - 12 * d * n / 12), 1e-9) << t;
  }
}

TEST(Advancing, NoneAdvancesNothing) {
  const Assumptions a{.prepay = constant_curve(0),
                      .default_rate = constant_curve(0.05),
                      .severity = constant_curve(0.30),
                      .lag_months = 12};
  const PoolFlows f = project_pool(one_loan(), a).pool;
  for (int t = 1; t <= f.months; ++t) ASSERT_EQ(f.advanced_interest[t - 1], 0.0) << t;
  // identity: recovery = (1 - severity) D, nothing taken back for advances
  for (int t = 1; t <= 100; ++t) ASSERT_NEAR(f.recovery[t + 11], 0.70 * f.defaults[t - 1], 1e-9);
}

TEST(Lag, ZeroLiquidatesInTheMonthOfDefault) {
  for (Advancing adv : {Advancing::none, Advancing::interest}) {
    SCOPED_TRACE(to_string(adv));
    const Assumptions a{.prepay = constant_curve(0),
                        .default_rate = constant_curve(0.05),
                        .severity = constant_curve(0.40),
                        .lag_months = 0,
                        .advancing = adv};
    const PoolFlows f = project_pool(one_loan(), a).pool;
    ASSERT_EQ(f.months, 100);  // no month past the last payment
    for (int t = 1; t <= 100; ++t) {
      ASSERT_GT(f.defaults[t - 1], 0.0) << t;
      // identity: recovery (1 - severity) D and loss severity x D, in the month of default
      ASSERT_NEAR(f.recovery[t - 1], 0.60 * f.defaults[t - 1], 1e-9) << t;
      ASSERT_NEAR(f.loss[t - 1], 0.40 * f.defaults[t - 1], 1e-9) << t;
      ASSERT_EQ(f.advanced_interest[t - 1], 0.0) << t;  // nothing to advance with no wait
    }
  }
}

TEST(Severity, VectorByProjectionMonthAppliesToTheDefaultMonthsCohort) {
  const std::vector<double> severities = {0.10, 0.20, 0.30, 0.40, 0.50, 0.60, 0.70, 0.80};
  const Assumptions a{.prepay = constant_curve(0),
                      .default_rate = constant_curve(0.10),
                      .severity = vector_curve(severities),
                      .lag_months = 6};
  const PoolFlows f = project_pool(one_loan(), a).pool;
  ASSERT_EQ(f.months, 106);
  for (int t = 1; t <= 100; ++t) {
    const double sev = severities[std::min<std::size_t>(t, severities.size()) - 1];
    // identity: the severity of month t (the default month), not of month t + 6 (the liquidation
    // month), times the defaulted balance
    ASSERT_NEAR(f.loss[t + 5], sev * f.defaults[t - 1], 1e-9) << t;
    ASSERT_NEAR(f.recovery[t + 5], (1 - sev) * f.defaults[t - 1], 1e-9) << t;
  }
}

TEST(Severity, ByLoanAgeReadsTheAgeAtDefault) {
  // Severity ramps with loan age; the loan is 20 months old at cut-off, so month 1 reads age 21.
  const SpeedCurve sev = ramp_curve(0.0, 0.80, 40, CurveClock::loan_age);
  const Assumptions a{
      .prepay = constant_curve(0), .default_rate = constant_curve(0.10), .severity = sev, .lag_months = 3};
  const PoolFlows f = project_pool(one_loan(), a).pool;
  // identity: loss = severity at the loan's age in the month of default x the defaulted balance
  for (int t = 1; t <= 30; ++t)
    ASSERT_NEAR(f.loss[t + 2], curve_value(sev, 20 + t) * f.defaults[t - 1], 1e-9) << t;
}

// ---- delinquent loans
// -------------------------------------------------------------------------------

TEST(DelinquentDefault, OnlyNinetyPlusAndForeclosureDefaultInMonthOne) {
  const Delinquency statuses[] = {Delinquency::unknown,   Delinquency::current,
                                  Delinquency::dq30,      Delinquency::dq60,
                                  Delinquency::dq90_plus, Delinquency::foreclosure};
  std::vector<TestLoan> tape;
  for (Delinquency d : statuses)
    tape.push_back({.id = std::string(to_string(d)),
                    .upb = 100'000 + 1'000.0 * tape.size(),
                    .rate = 0.06,
                    .delinquency = d});
  const LoanArrays loans = make_loans(tape);
  ProjectionOptions o;
  o.loan_totals = true;
  const Assumptions on{.prepay = constant_curve(0),
                       .default_rate = constant_curve(0),
                       .severity = constant_curve(0.5),
                       .lag_months = 12,
                       .delinquent_default = true};
  const Projection p = project_pool(loans, on, o);
  for (std::size_t i = 0; i < loans.size(); ++i) {
    const bool defaults =
        statuses[i] == Delinquency::dq90_plus || statuses[i] == Delinquency::foreclosure;
    SCOPED_TRACE(loans.loan_id[i]);
    // identity: a delinquent loan defaults its whole balance and loses half of it (severity 50%)
    EXPECT_EQ(p.loans.defaults[i], defaults ? loans.current_balance[i] : 0.0);
    EXPECT_NEAR(p.loans.loss[i], defaults ? 0.5 * loans.current_balance[i] : 0.0, 1e-9);
    EXPECT_EQ(p.loans.sched_principal[i] + p.loans.prepayment[i] > 0, !defaults);
  }
  EXPECT_EQ(p.pool.defaults[0], 104'000.0 + 105'000.0);  // hand-computed: the two loans' balances
  for (int t = 2; t <= p.pool.months; ++t) ASSERT_EQ(p.pool.defaults[t - 1], 0.0) << t;
  // hand-computed: month 13 (lag 12) liquidates 104,000 + 105,000
  EXPECT_NEAR(p.pool.loss[12] + p.pool.recovery[12], 209'000.0, 1e-9);

  const Assumptions off{.prepay = constant_curve(0),
                        .default_rate = constant_curve(0),
                        .severity = constant_curve(0.5),
                        .lag_months = 12};
  const Projection q = project_pool(loans, off, o);
  for (std::size_t i = 0; i < loans.size(); ++i) EXPECT_EQ(q.loans.defaults[i], 0.0);
}

// ---- zero-rate loans
// --------------------------------------------------------------------------------

TEST(ZeroRate, AmortisesStraightLine) {
  const LoanArrays loans = make_loans({{.id = "Z",
                                        .upb = 120'000,
                                        .rate = 0.0,
                                        .remaining = 120,
                                        .age = 0,
                                        .servicing = 0.0,
                                        .original_term = 120}});
  const PoolFlows f = project_pool(loans, Assumptions{}).pool;
  ASSERT_EQ(f.months, 120);
  for (int t = 1; t <= 120; ++t) {
    ASSERT_NEAR(f.sched_principal[t - 1], 1'000.0, 1e-9) << t;  // hand-computed: 120,000 / 120
    ASSERT_EQ(f.gross_interest[t - 1], 0.0) << t;
  }
  EXPECT_EQ(f.end_balance.back(), 0.0);

  // identity: with prepayment the payment is still the balance left / the months left.
  const PoolFlows g =
      project_pool(loans, Assumptions{.prepay = constant_curve(0.2), .default_rate = constant_curve(0)}).pool;
  for (int t = 1; t <= g.months; ++t)
    ASSERT_NEAR(g.sched_principal[t - 1], g.begin_balance[t - 1] / (120 - t + 1), 1e-9) << t;
}

// ---- coupon paths
// -----------------------------------------------------------------------------------

LoanArrays two_loans() {
  return make_loans({{.id = "F", .upb = 300'000, .rate = 0.055, .remaining = 300, .age = 60},
                     {.id = "A",
                      .upb = 400'000,
                      .rate = 0.06,
                      .remaining = 300,
                      .age = 60,
                      .servicing = 0.00375,
                      .amortization = Amortization::arm}});
}

void expect_identical(const PoolFlows& a, const PoolFlows& b) {
  ASSERT_EQ(a.months, b.months);
  const auto ca = all_columns(a), cb = all_columns(b);
  for (std::size_t k = 0; k < ca.size(); ++k)
    EXPECT_EQ(*ca[k].second, *cb[k].second) << ca[k].first;
}

TEST(CouponPaths, PathAtTheNoteRateChangesNothing) {
  const LoanArrays loans = two_loans();
  const CouponPaths paths = coupon_changes({1}, 48, std::vector<double>(48, 0.06));
  const Assumptions a{.prepay = constant_curve(0.08),
                      .default_rate = constant_curve(0.01),
                      .lag_months = 6,
                      .advancing = Advancing::interest};
  ProjectionOptions o;
  const PoolFlows without = project_pool(loans, a, o).pool;
  o.coupons = &paths;
  const PoolFlows with = project_pool(loans, a, o).pool;
  expect_identical(with, without);  // identity: the same rate every month is no change at all
}

TEST(CouponPaths, StepUpReamortisesOverTheMonthsLeft) {
  const LoanArrays loans = two_loans();
  std::vector<double> rates;
  for (int t = 1; t <= 24; ++t) rates.push_back(t <= 12 ? 0.06 : t < 24 ? 0.08 : 0.09);
  const CouponPaths paths = coupon_changes({1}, 24, rates);
  ProjectionOptions o;
  o.coupons = &paths;
  o.loan_totals = true;
  const Projection p = project_pool(loans, Assumptions{}, o);
  // The ARM alone (loan index 0 of its own tape), to read its rows.
  const CouponPaths alone = coupon_changes({0}, 24, rates);
  ProjectionOptions o_alone;
  o_alone.coupons = &alone;
  const PoolFlows f = project_pool(single_loan(loans, 1), Assumptions{}, o_alone).pool;
  ASSERT_EQ(f.months, 300);

  // identity: 12 months of level payment at 6% over 300 months, then 8% over 288, amortised
  // independently here.
  const double first = level_payment(400'000, 0.06, 300);
  for (int t = 1; t <= 12; ++t) ASSERT_NEAR(scheduled_payment(f, t), first, 1e-8) << t;
  const double balance = balance_after(400'000, 0.06, 300, 12);
  ASSERT_NEAR(f.begin_balance[12], balance, 1e-6);
  const double stepped = level_payment(balance, 0.08, 288);
  EXPECT_NEAR(scheduled_payment(f, 13), stepped, 1e-7);
  EXPECT_NEAR(f.gross_interest[12], balance * 0.08 / 12, 1e-8);
  EXPECT_NEAR(f.net_interest[12], balance * (0.08 - 0.00375) / 12, 1e-8);
  for (int t = 14; t <= 23; ++t) ASSERT_NEAR(scheduled_payment(f, t), stepped, 1e-7) << t;
  // identity: month 24 on, 9% (the path's last rate) holds to maturity.
  const double b24 = f.begin_balance[23];
  const double last = level_payment(b24, 0.09, 300 - 23);
  for (int t = 24; t <= 300; ++t) {
    ASSERT_NEAR(scheduled_payment(f, t), last, 1e-7) << t;
    ASSERT_NEAR(f.gross_interest[t - 1], f.begin_balance[t - 1] * 0.09 / 12, 1e-8) << t;
  }
  EXPECT_EQ(f.end_balance.back(), 0.0);

  // identity: the unlisted loan keeps its note rate; the pool is it plus the ARM.
  const PoolFlows fixed = project_pool(single_loan(loans, 0), Assumptions{}).pool;
  for (int t = 1; t <= 300; ++t)
    ASSERT_NEAR(p.pool.gross_interest[t - 1], fixed.gross_interest[t - 1] + f.gross_interest[t - 1],
                1e-8)
        << t;
  EXPECT_NEAR(fixed.gross_interest[0], 300'000 * 0.055 / 12, 1e-9);  // hand-computed
}

TEST(CouponPaths, PathAtANoteRateThatTwelfthsDoNotRoundTripChangesNothing) {
  // 0.0525 / 12 * 12 != 0.0525 in doubles (likewise 5.375% and 5.625%): a path at the note rate
  // must still read as no change, whatever the loan type, so the results are bit-identical.
  for (const double rate : {0.0525, 0.05375, 0.05625}) {
    SCOPED_TRACE(::testing::Message() << "note rate " << rate);
    const LoanArrays loans = make_loans({{.id = "A",
                                          .upb = 400'000,
                                          .rate = rate,
                                          .remaining = 300,
                                          .age = 60,
                                          .servicing = 0.00375,
                                          .amortization = Amortization::arm},
                                         {.id = "IO",
                                          .upb = 250'000,
                                          .rate = rate,
                                          .remaining = 340,
                                          .age = 20,
                                          .amortization = Amortization::interest_only,
                                          .io_months = 120},
                                         {.id = "B",
                                          .upb = 150'000,
                                          .rate = rate,
                                          .remaining = 350,
                                          .age = 10,
                                          .amortization = Amortization::balloon,
                                          .balloon_month = 84}});
    const CouponPaths paths = coupon_changes({0, 1, 2}, 48, std::vector<double>(3 * 48, rate));
    const Assumptions a{.prepay = constant_curve(0.08),
                        .default_rate = constant_curve(0.01),
                        .lag_months = 6,
                        .advancing = Advancing::interest};
    ProjectionOptions o;
    o.loan_totals = true;
    const Projection without = project_pool(loans, a, o);
    o.coupons = &paths;
    const Projection with = project_pool(loans, a, o);
    expect_identical(with.pool, without.pool);  // identity: the note rate every month is no change
    EXPECT_EQ(with.loans.cash_flow, without.loans.cash_flow);
    EXPECT_EQ(with.loans.gross_interest, without.loans.gross_interest);
    EXPECT_EQ(with.loans.wal_years, without.loans.wal_years);
  }
}

TEST(CouponPaths, StepDuringInterestOnlyPaysTheNewRateThenAmortisesAtIt) {
  // 300 months left, 60 months old, interest-only for 120 months from the first payment: interest
  // only through projection month 60, then level pay over the 240 months left. The rate steps from
  // 6% to 7% in month 25 (mid-way through the interest-only months) or in month 60 (the last one).
  for (const int step : {25, 60}) {
    SCOPED_TRACE(::testing::Message() << "step in month " << step);
    const LoanArrays loans = make_loans({{.id = "IO",
                                          .upb = 400'000,
                                          .rate = 0.06,
                                          .remaining = 300,
                                          .age = 60,
                                          .servicing = 0.00375,
                                          .amortization = Amortization::interest_only,
                                          .io_months = 120}});
    std::vector<double> rates;
    for (int t = 1; t <= step; ++t) rates.push_back(t < step ? 0.06 : 0.07);
    const CouponPaths paths = coupon_changes({0}, step, rates);
    ProjectionOptions o;
    o.coupons = &paths;
    const PoolFlows f = project_pool(loans, Assumptions{}, o).pool;
    ASSERT_EQ(f.months, 300);
    for (int t = 1; t <= 60; ++t) {
      const double rate = t < step ? 0.06 : 0.07;
      ASSERT_EQ(f.begin_balance[t - 1], 400'000.0) << t;
      ASSERT_EQ(f.sched_principal[t - 1], 0.0) << t;
      // hand-computed: 400,000 x 6% / 12 = 2,000 before the step, x 7% / 12 = 2,333.33 after
      ASSERT_NEAR(f.gross_interest[t - 1], 400'000 * rate / 12, 1e-9) << t;
      ASSERT_NEAR(f.net_interest[t - 1], 400'000 * (rate - 0.00375) / 12, 1e-9) << t;
    }
    // identity: from month 61, the level payment on 400,000 at 7% over 240 months, amortised
    // independently here.
    const double level = level_payment(400'000, 0.07, 240);
    double balance = 400'000;
    for (int t = 61; t <= 300; ++t) {
      ASSERT_NEAR(f.begin_balance[t - 1], balance, 1e-6) << t;
      ASSERT_NEAR(f.gross_interest[t - 1], balance * 0.07 / 12, 1e-8) << t;
      ASSERT_NEAR(scheduled_payment(f, t), level, 1e-6) << t;
      balance = balance * (1 + 0.07 / 12) - level;
    }
    EXPECT_NEAR(f.sched_principal[60], level - 400'000 * 0.07 / 12, 1e-8);
    EXPECT_EQ(f.end_balance.back(), 0.0);  // identity: amortises to exactly zero
  }
}

TEST(CouponPaths, StepUpUnderPrepaymentAndDefaultMatchesASingleLoanAmortisation) {
  // The ARM steps from 6% to 8% in month 13, under 10 CPR and 2 CDR, severity 35%, liquidated in
  // the month of default, no advancing. Checked month by month against an amortisation written
  // here: defaults off the beginning balance, the level payment recomputed each month from the
  // performing balance, the month's rate and the months left, prepayment on what is left.
  const LoanArrays loans = make_loans({{.id = "A",
                                        .upb = 400'000,
                                        .rate = 0.06,
                                        .remaining = 300,
                                        .age = 60,
                                        .servicing = 0.00375,
                                        .amortization = Amortization::arm}});
  std::vector<double> rates;
  for (int t = 1; t <= 13; ++t) rates.push_back(t < 13 ? 0.06 : 0.08);
  const CouponPaths paths = coupon_changes({0}, 13, rates);  // month 13's 8% holds after it
  const Assumptions a{.prepay = constant_curve(0.10),
                      .default_rate = constant_curve(0.02),
                      .severity = constant_curve(0.35),
                      .lag_months = 0,
                      .advancing = Advancing::none};
  ProjectionOptions o;
  o.coupons = &paths;
  const PoolFlows f = project_pool(loans, a, o).pool;
  ASSERT_EQ(f.months, 300);

  const double smm = 1 - std::pow(1 - 0.10, 1.0 / 12);  // common practice: SMM from CPR
  const double mdr = 1 - std::pow(1 - 0.02, 1.0 / 12);  // common practice: MDR from CDR
  const double fee = 0.00375;
  const int months = 300;
  std::vector<double> begin, defaults, sched, prepay, gross, servicing, net, recovery, loss,
      total_principal, cash, end;
  double balance = 400'000;
  for (int t = 1; t <= months; ++t) {
    const double rate = t < 13 ? 0.06 : 0.08;
    const double d = balance * mdr;
    const double performing = balance - d;
    const double interest = performing * rate / 12;
    const bool last = t == months;
    const double principal =
        last ? performing : level_payment(performing, rate, months - t + 1) - interest;
    const double prepaid = last ? 0.0 : smm * (performing - principal);
    const double kept = d * (1 - 0.35);  // lag 0: recovered in the month of default
    begin.push_back(balance);
    defaults.push_back(d);
    sched.push_back(principal);
    prepay.push_back(prepaid);
    gross.push_back(interest);
    servicing.push_back(performing * fee / 12);
    net.push_back(performing * (rate - fee) / 12);
    recovery.push_back(kept);
    loss.push_back(d - kept);
    total_principal.push_back(principal + prepaid + kept);
    cash.push_back(net.back() + total_principal.back());
    balance = performing - principal - prepaid;
    end.push_back(balance);
  }
  // identity: the engine's carried-forward payment equals the payment recomputed each month
  constexpr double kRel = 1e-8;
  expect_series_near("begin_balance", f.begin_balance, begin, kRel);
  expect_series_near("defaults", f.defaults, defaults, kRel);
  expect_series_near("sched_principal", f.sched_principal, sched, kRel);
  expect_series_near("prepayment", f.prepayment, prepay, kRel);
  expect_series_near("gross_interest", f.gross_interest, gross, kRel);
  expect_series_near("servicing", f.servicing, servicing, kRel);
  expect_series_near("net_interest", f.net_interest, net, kRel);
  expect_series_near("recovery", f.recovery, recovery, kRel);
  expect_series_near("loss", f.loss, loss, kRel);
  expect_series_near("total_principal", f.total_principal, total_principal, kRel);
  expect_series_near("cash_flow", f.cash_flow, cash, kRel);
  expect_series_near("end_balance", f.end_balance, end, kRel);
  EXPECT_EQ(f.end_balance.back(), 0.0);  // identity: amortises to exactly zero
  // The step itself: month 13's interest at 8% on month 13's performing balance.
  EXPECT_NEAR(f.gross_interest[12], (begin[12] - defaults[12]) * 0.08 / 12, 1e-8);
}

// Coupon paths from their three vectors, as written.
CouponPaths listing(std::vector<std::uint32_t> loans, std::vector<std::uint32_t> begin,
                    std::vector<CouponChange> changes) {
  CouponPaths c;
  c.loans = std::move(loans);
  c.begin = std::move(begin);
  c.changes = std::move(changes);
  return c;
}

TEST(CouponPaths, BadPathsAreAnErrorThatSaysWhatIsWrong) {
  const LoanArrays loans = two_loans();  // loan 1, 'A', has a 0.375% servicing fee
  const double nan = std::nan("");
  struct Case {
    const char* what;
    CouponPaths paths;
    const char* message;  // part of what() the error must carry
  };
  const Case cases[] = {
      {"changes with no loans", listing({}, {}, {{1, 0.06}}), "no loans are listed"},
      {"begin too short", listing({1}, {0}, {}), "1 loans listed need 2 begin entries"},
      {"begin past the changes", listing({1}, {0, 2}, {{1, 0.06}}),
       "begin must run from 0 to the number of changes (1)"},
      {"begin not from 0", listing({1}, {1, 1}, {{1, 0.06}}), "begin must run from 0"},
      {"begin decreasing", listing({0, 1}, {0, 2, 1}, {{1, 0.06}}),
       "begin must not decrease: entry 2 is 1 after 2"},
      {"loan out of range", listing({2}, {0, 0}, {}), "listed loan 2 (entry 0) is past"},
      {"loans descending", listing({1, 0}, {0, 0, 0}, {}), "strictly ascending"},
      {"loan listed twice", listing({1, 1}, {0, 0, 0}, {}), "strictly ascending"},
      {"month 0", listing({1}, {0, 1}, {{0, 0.06}}),
       "loan 'A' (row 3): change in month 0 (months start at 1)"},
      {"months not rising", listing({1}, {0, 2}, {{5, 0.06}, {5, 0.07}}),
       "loan 'A' (row 3): change in month 5 follows one in month 5"},
      {"months falling", listing({1}, {0, 2}, {{7, 0.06}, {5, 0.07}}),
       "change in month 5 follows one in month 7"},
      {"rate not a number", listing({1}, {0, 1}, {{3, nan}}),
       "loan 'A' (row 3): rate nan in month 3 must be a finite number"},
      {"rate infinite", listing({1}, {0, 1}, {{3, HUGE_VAL}}), "rate inf in month 3"},
      {"rate below the fee", listing({1}, {0, 1}, {{3, 0.003}}),
       "rate 0.003 in month 3 must be a finite number no lower than the servicing fee 0.00375"},
  };
  for (const Case& c : cases) {
    SCOPED_TRACE(c.what);
    ProjectionOptions o;
    o.coupons = &c.paths;
    try {
      project_pool(loans, Assumptions{}, o);
      ADD_FAILURE() << "no exception";
    } catch (const std::invalid_argument& e) {
      const std::string what = e.what();
      EXPECT_NE(what.find("project_pool: coupon paths: "), std::string::npos) << what;
      EXPECT_NE(what.find(c.message), std::string::npos) << what;
    }
  }
}

TEST(CouponPaths, EmptyListsAndLoansWithoutChangesChangeNothing) {
  const LoanArrays loans = two_loans();
  const Assumptions a{.prepay = constant_curve(0.08), .default_rate = constant_curve(0.01)};
  ProjectionOptions o;
  o.loan_totals = true;
  const Projection without = project_pool(loans, a, o);
  const CouponPaths accepted[] = {
      listing({}, {}, {}),                  // nothing listed
      listing({}, {0}, {}),                 // nothing listed, begin given
      listing({0, 1}, {0, 0, 0}, {}),       // listed, no changes
      listing({1}, {0, 1}, {{1, 0.06}}),    // month 1 at the note rate
      listing({1}, {0, 1}, {{400, 0.09}}),  // after the last month
  };
  for (const CouponPaths& paths : accepted) {
    o.coupons = &paths;
    expect_same_projection(project_pool(loans, a, o), without);  // identity: no rate moves
  }
}

// identity: changes written out month by month and read back by coupon_changes project to the
// same bits as the changes themselves, for every loan type (level pay, interest-only, balloon,
// ARM), with changes in month 1, back to the note rate, that do not move the rate (every fifth
// loan's second), and listed loans with none.
TEST(CouponPaths, ChangesAndTheirMonthByMonthFormProjectToTheSameBits) {
  const LoanArrays loans = make_loans(random_test_loans(3'000, 777));
  CouponPaths sparse;
  sparse.begin.push_back(0);
  for (std::uint32_t i = 0; i < loans.size(); i += 3) {
    const double note = loans.note_rate[i], fee = loans.servicing_fee[i];
    const std::int32_t first = 1 + static_cast<std::int32_t>(i % 40);  // month 1 for i = 0, 120..
    const CouponChange runs[] = {{first, note + 0.015},
                                 {first + 7, note + 0.015 + 0.0025 * (i % 5)},
                                 {first + 19, note},
                                 {first + 20, std::max(fee, note - 0.01)},
                                 {first + 60, note + 0.0325}};
    sparse.loans.push_back(i);
    const std::size_t kept = (i / 3) % 6;  // 0 to 5 changes
    sparse.changes.insert(sparse.changes.end(), runs, runs + std::min<std::size_t>(kept, 5));
    sparse.begin.push_back(static_cast<std::uint32_t>(sparse.changes.size()));
  }
  const int months = 480;
  const CouponPaths dense =
      coupon_changes(sparse.loans, months, coupon_rates(sparse, loans, months));
  ASSERT_NE(dense.changes.size(), sparse.changes.size());  // month-1 entries, at least

  const Assumptions a{.prepay = standard_curve(CurveShape::psa, 1.5),
                      .default_rate = standard_curve(CurveShape::sda, 2.0),
                      .severity = constant_curve(0.4),
                      .lag_months = 12,
                      .advancing = Advancing::interest,
                      .delinquent_default = true};
  const Projection from_sparse = expect_same_bits_as_month_by_month(
      loans, a, sparse, dense, monthly_discount_factors(0.05, 1 + 480 + 12 + 1));
  // and the changes moved something: the pool differs from no paths at all
  EXPECT_NE(project_pool(loans, a).pool.gross_interest, from_sparse.pool.gross_interest);
}

// ---- coupon_changes

TEST(CouponChanges, MonthOneThenEveryMonthThatDiffers) {
  // Two loans over 6 months: 5% 5% 6% 6% 5% 5%, and 7% throughout.
  const std::vector<double> rates = {0.05, 0.05, 0.06, 0.06, 0.05, 0.05,
                                     0.07, 0.07, 0.07, 0.07, 0.07, 0.07};
  const CouponPaths c = coupon_changes({3, 8}, 6, rates);
  EXPECT_EQ(c.loans, (std::vector<std::uint32_t>{3, 8}));
  EXPECT_EQ(c.begin, (std::vector<std::uint32_t>{0, 3, 4}));
  ASSERT_EQ(c.changes.size(), 4u);
  const std::pair<int, double> want[] = {{1, 0.05}, {3, 0.06}, {5, 0.05}, {1, 0.07}};
  for (std::size_t j = 0; j < 4; ++j) {
    EXPECT_EQ(c.changes[j].month, want[j].first) << j;
    EXPECT_EQ(c.changes[j].rate, want[j].second) << j;
  }
  // One month: one change per loan. No loans: nothing, not even begin.
  const CouponPaths one = coupon_changes({0, 1}, 1, std::vector<double>{0.04, 0.05});
  EXPECT_EQ(one.begin, (std::vector<std::uint32_t>{0, 1, 2}));
  EXPECT_EQ(one.changes[1].month, 1);
  EXPECT_EQ(one.changes[1].rate, 0.05);
  const CouponPaths none = coupon_changes({}, 12, {});
  EXPECT_TRUE(none.loans.empty() && none.begin.empty() && none.changes.empty());
}

TEST(CouponChanges, RatesThatDoNotFitAreAnError) {
  const std::vector<double> rates(11, 0.06);
  try {
    coupon_changes({1}, 12, rates);
    FAIL() << "no exception";
  } catch (const std::invalid_argument& e) {
    EXPECT_STREQ(e.what(), "coupon_changes: 1 loans over 12 months need 12 rates, not 11");
  }
  EXPECT_THROW(coupon_changes({1}, 0, {}), std::invalid_argument);
  EXPECT_THROW(coupon_changes({}, 0, {}), std::invalid_argument);
}

// ---- inputs the engine refuses
// ----------------------------------------------------------------------

TEST(BadInputs, ServicingFeeAboveTheNoteRateIsAnError) {
  // A fee above the note rate would make net interest negative.
  const LoanArrays loans = make_loans({{.id = "OK", .upb = 100'000, .rate = 0.05},
                                       {.id = "FEE", .upb = 100'000, .rate = 0.002,
                                        .servicing = 0.0025}});
  try {
    project_pool(loans, Assumptions{});
    FAIL() << "accepted";
  } catch (const std::invalid_argument& e) {
    EXPECT_NE(std::string(e.what()).find("'FEE' (row 3)"), std::string::npos) << e.what();
  }
  // A fee equal to the note rate is allowed (net interest 0), so is a zero-rate loan with no fee.
  const LoanArrays equal = make_loans(
      {{.id = "EQ", .upb = 100'000, .rate = 0.0025, .servicing = 0.0025},
       {.id = "Z", .upb = 100'000, .rate = 0.0, .servicing = 0.0}});
  const PoolFlows f = project_pool(equal, Assumptions{}).pool;
  EXPECT_EQ(f.net_interest[0], 0.0);  // identity: (rate - fee) = 0 on both loans
  EXPECT_THROW(project_pool(make_loans({{.id = "Z0", .upb = 1'000, .rate = 0.0}}), Assumptions{}),
               std::invalid_argument);  // the default 0.25% fee on a zero-rate loan
}

TEST(BadInputs, CurvesOutsideZeroToOneHundredPercentAreAnError) {
  const LoanArrays loans = one_loan();
  const Assumptions fine{.prepay = constant_curve(1.0), .default_rate = constant_curve(1.0),
                         .severity = constant_curve(1.0)};
  EXPECT_NO_THROW(project_pool(loans, fine));  // 100% is the most each may be
  const Assumptions bad[] = {
      {.prepay = constant_curve(1.5)},
      {.prepay = constant_curve(-0.01)},
      {.prepay = vector_curve({0.05, 0.06, 1.2})},
      {.default_rate = constant_curve(1.5)},
      {.default_rate = ramp_curve(0.0, -0.02, 12)},
      {.severity = constant_curve(-0.1)},
      {.severity = constant_curve(1.01)},
      {.severity = vector_curve({0.4, -0.2})},
      {.prepay = constant_curve(std::nan(""))},
  };
  for (std::size_t k = 0; k < std::size(bad); ++k)
    EXPECT_THROW(project_pool(loans, bad[k]), std::invalid_argument) << "case " << k;
}

// ---- where the table ends
// ---------------------------------------------------------------------------

TEST(TableLength, RunsToTheLastMonthWithCashOrLiquidation) {
  ProjectionOptions o;
  o.loan_totals = true;
  EXPECT_EQ(project_pool(one_loan(100), Assumptions{}, o).pool.months, 100);
  // identity: defaults in month 100 liquidate in month 112.
  const Assumptions defaults{
      .prepay = constant_curve(0), .default_rate = constant_curve(0.02), .lag_months = 12};
  EXPECT_EQ(project_pool(one_loan(100), defaults, o).pool.months, 112);
  // identity: 100% CPR pays everything in month 1.
  const Projection all_at_once = project_pool(
      one_loan(100), Assumptions{.prepay = constant_curve(1.0), .default_rate = constant_curve(0)}, o);
  EXPECT_EQ(all_at_once.pool.months, 1);
  EXPECT_EQ(all_at_once.loans.last_month[0], 1);
  EXPECT_NEAR(all_at_once.pool.total_principal[0], 500'000, 1e-6);
  // A total loss liquidates with no cash: the table still shows the liquidation month, while the
  // loan's last month with cash is its last payment.
  const Assumptions total_loss{.prepay = constant_curve(0),
                               .default_rate = constant_curve(0.02),
                               .severity = constant_curve(1.0),
                               .lag_months = 12};
  const Projection p = project_pool(one_loan(100), total_loss, o);
  EXPECT_EQ(p.pool.months, 112);
  EXPECT_EQ(p.loans.last_month[0], 100);
  EXPECT_GT(p.pool.loss[111], 0.0);
  EXPECT_EQ(p.pool.cash_flow[111], 0.0);
}

TEST(TableLength, EmptyTapeGivesAnEmptyTable) {
  const Projection p = project_pool(LoanArrays{}, Assumptions{});
  EXPECT_EQ(p.pool.months, 0);
  EXPECT_EQ(p.pool.cutoff_balance, 0.0);
  expect_sized(p.pool);
}

TEST(Discount, FactorsMustCoverEveryMonth) {
  std::vector<double> discount(101, 1.0);  // [0] unused, months 1..100
  ProjectionOptions o;
  o.loan_totals = true;
  o.discount = discount;
  const Assumptions no_lag{.prepay = constant_curve(0), .default_rate = constant_curve(0), .lag_months = 0};
  const Projection p = project_pool(one_loan(100), no_lag, o);
  ASSERT_EQ(p.pool.months, 100);
  ASSERT_EQ(p.loans.present_value.size(), 1u);
  // identity: discount factors of 1 give the undiscounted cash
  EXPECT_NEAR(p.loans.present_value[0], p.loans.cash_flow[0], 1e-9 * p.loans.cash_flow[0]);
  o.discount = std::span<const double>(discount).first(100);  // month 100 missing
  EXPECT_THROW(project_pool(one_loan(100), no_lag, o), std::invalid_argument);
  // with defaults the table runs 12 months longer, and so must the factors
  o.discount = discount;
  const Assumptions defaults{.prepay = constant_curve(0), .default_rate = constant_curve(0.02), .lag_months = 12};
  EXPECT_THROW(project_pool(one_loan(100), defaults, o), std::invalid_argument);
}

TEST(Discount, AdvancesAreDiscountedInTheMonthsTheyArePaid) {
  // Present value of a loan with advancing = its own cash flows discounted month by month.
  std::vector<double> discount(1 + 112);
  for (std::size_t t = 0; t < discount.size(); ++t)
    discount[t] = std::pow(1.004, -static_cast<double>(t));
  ProjectionOptions o;
  o.loan_totals = true;
  o.discount = discount;
  const Assumptions a{.prepay = constant_curve(0.06),
                      .default_rate = constant_curve(0.05),
                      .severity = constant_curve(0.35),
                      .lag_months = 12,
                      .advancing = Advancing::interest};
  const Projection p = project_pool(one_loan(100), a, o);
  ASSERT_EQ(p.pool.months, 112);
  double pv = 0;
  for (int t = 1; t <= 112; ++t) pv += p.pool.cash_flow[t - 1] * discount[t];
  EXPECT_NEAR(p.loans.present_value[0], pv, 1e-9 * pv);  // identity: PV = sum cash_t DF_t
}

}  // namespace
}  // namespace poolbid
