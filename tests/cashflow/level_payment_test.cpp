// Tests the level-payment schedule of project_pool (one loan, no prepayment, no default) against
// published values and against QuantLib's amortising fixed-rate bond.
#include <gtest/gtest.h>

#include <ql/cashflows/coupon.hpp>
#include <ql/instruments/bonds/amortizingfixedratebond.hpp>
#include <ql/time/calendars/nullcalendar.hpp>
#include <ql/time/daycounters/thirty360.hpp>

#include <cmath>
#include <memory>
#include <vector>

#include "cashflow/cashflow.h"
#include "tests/cashflow/flows_support.h"

namespace poolbid {
namespace {

using testing_support::expect_series_near;
using testing_support::make_loans;

// One fully amortising loan, age 0, `months` to go, no servicing; no prepayment or default.
PoolFlows amortise(double balance, double rate, int months = 360) {
  const LoanArrays loans = make_loans({{.id = "L",
                                        .upb = balance,
                                        .rate = rate,
                                        .remaining = months,
                                        .age = 0,
                                        .servicing = 0.0,
                                        .original_term = months}});
  return project_pool(loans, Assumptions{}).pool;
}

double payment(const PoolFlows& f, int t) {
  return f.sched_principal[t - 1] + f.gross_interest[t - 1];
}

TEST(LevelPayment, PerHundredOfBalance) {
  // source: QuantLib test suite, amortizing bond tests (as quoted in DESIGN.md section 8)
  EXPECT_NEAR(payment(amortise(100, 0.06), 1), 0.599550525, 1e-9);  // source: QuantLib test suite
  EXPECT_NEAR(payment(amortise(100, 0.10), 1), 0.877571570, 1e-9);  // source: QuantLib test suite
  EXPECT_NEAR(payment(amortise(100, 0.12), 1), 1.028612597, 1e-9);  // source: QuantLib test suite
}

TEST(LevelPayment, BalanceAfter270Payments) {
  const PoolFlows f = amortise(100'000, 0.10);
  ASSERT_EQ(f.months, 360);
  // source: QuantLib test suite, amortizing bond tests (as quoted in DESIGN.md section 8)
  EXPECT_NEAR(f.begin_balance[270], 55'409.50, 0.005);
  EXPECT_NEAR(f.end_balance[269], 55'409.50, 0.005);
}

TEST(LevelPayment, SamePaymentEveryMonthAndZeroAtTheEnd) {
  for (double rate : {0.0, 0.02, 0.06, 0.10, 0.12}) {
    SCOPED_TRACE(::testing::Message() << "rate " << rate);
    const PoolFlows f = amortise(250'000, rate);
    ASSERT_EQ(f.months, 360);
    const double first = payment(f, 1);
    // identity: a level-pay loan without prepayment pays the same every month
    for (int t = 2; t <= 360; ++t) ASSERT_NEAR(payment(f, t), first, 1e-9 * first) << t;
    EXPECT_EQ(f.end_balance.back(), 0.0);  // identity: amortises to exactly zero
    // identity: the level payment formula, written independently
    EXPECT_NEAR(first, testing_support::level_payment(250'000, rate, 360), 1e-9 * first);
  }
}

// The same loan as an amortising fixed-rate bond in QuantLib: notionals from sinkingNotionals,
// monthly coupons at the note rate on 30/360 (one twelfth of a year each).
struct QuantLibSchedule {
  std::vector<double> principal, interest;  // [0] = month 1
};
QuantLibSchedule quantlib_schedule(double balance, double rate, int years) {
  using namespace QuantLib;
  const Schedule schedule = sinkingSchedule(QuantLib::Date(1, January, 2027), Period(years, Years),
                                            Monthly, NullCalendar());
  const std::vector<Real> notionals =
      sinkingNotionals(Period(years, Years), Monthly, rate, balance);
  const AmortizingFixedRateBond bond(0, notionals, schedule, {rate},
                                     Thirty360(Thirty360::BondBasis));
  QuantLibSchedule out;
  out.principal.assign(schedule.size() - 1, 0.0);
  out.interest.assign(schedule.size() - 1, 0.0);
  for (const auto& cf : bond.cashflows()) {
    std::size_t k = 1;
    while (k < schedule.size() && schedule.date(k) != cf->date()) ++k;
    if (k == schedule.size()) {
      ADD_FAILURE() << "QuantLib cash flow off the schedule: " << cf->date();
      continue;
    }
    if (ext::dynamic_pointer_cast<Coupon>(cf))
      out.interest[k - 1] += cf->amount();
    else
      out.principal[k - 1] += cf->amount();
  }
  return out;
}

TEST(LevelPayment, MatchesQuantLibMonthByMonth) {
  for (double rate : {0.03, 0.06, 0.10, 0.12}) {
    for (int years : {15, 30}) {
      SCOPED_TRACE(::testing::Message() << "rate " << rate << ", " << years << " years");
      const QuantLibSchedule ql = quantlib_schedule(100'000, rate, years);
      const PoolFlows f = amortise(100'000, rate, 12 * years);
      ASSERT_EQ(ql.principal.size(), static_cast<std::size_t>(12 * years));
      ASSERT_EQ(f.months, 12 * years);
      // source: QuantLib as a reference library (sinkingNotionals, AmortizingFixedRateBond)
      expect_series_near("principal", f.sched_principal, ql.principal, 0, 1e-6);
      expect_series_near("interest", f.gross_interest, ql.interest, 0, 1e-6);
    }
  }
}

}  // namespace
}  // namespace poolbid
