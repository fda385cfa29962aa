// Test support for pricing/: payment grids built by hand with QuantLib's dates and day counts (no
// curves/ code), the same cash as a QuantLib Leg, QuantLib zero curves, and projected pool cash.
#pragma once

#include <ql/cashflows/simplecashflow.hpp>
#include <ql/termstructures/yield/flatforward.hpp>
#include <ql/termstructures/yield/zerocurve.hpp>
#include <ql/time/daycounters/actual365fixed.hpp>
#include <ql/time/daycounters/thirty360.hpp>

#include <chrono>
#include <cmath>
#include <memory>
#include <span>
#include <vector>

#include "cashflow/cashflow.h"
#include "pricing/pricing.h"
#include "tests/support/loans.h"

namespace poolbid::testing_support {

inline Date ymd(int y, unsigned m, unsigned d) {
  return Date{std::chrono::year{y}, std::chrono::month{m}, std::chrono::day{d}};
}
inline QuantLib::Date to_ql(Date d) {
  return QuantLib::Date(static_cast<QuantLib::Day>(static_cast<unsigned>(d.day())),
                        static_cast<QuantLib::Month>(static_cast<unsigned>(d.month())),
                        static_cast<int>(d.year()));
}
inline Date from_ql(const QuantLib::Date& d) {
  return ymd(d.year(), static_cast<unsigned>(d.month()), static_cast<unsigned>(d.dayOfMonth()));
}

// The grid for a cut-off on the first of a month: month t pays on the first of month t + 1 plus
// `delay` days (QuantLib date arithmetic); years by QuantLib's day counters; discount from `curve`
// (DF(pay) / DF(settle)), or 1 when no curve is given.
inline PaymentGrid hand_grid(Date cutoff, Date settle, int delay, int months,
                             const QuantLib::YieldTermStructure* curve = nullptr) {
  const QuantLib::Thirty360 thirty_360(QuantLib::Thirty360::BondBasis);
  const QuantLib::Actual365Fixed actual_365;
  const QuantLib::Date c = to_ql(cutoff), s = to_ql(settle);
  PaymentGrid g;
  g.months = months;
  for (int t = 1; t <= months; ++t) {
    const QuantLib::Date pay = c + QuantLib::Period(t, QuantLib::Months) + delay;
    g.pay_date.push_back(from_ql(pay));
    g.years_30_360.push_back(thirty_360.yearFraction(s, pay));
    g.years_365.push_back(actual_365.yearFraction(s, pay));
    g.discount.push_back(curve ? curve->discount(pay) / curve->discount(s) : 1.0);
  }
  return g;
}

// A grid by its year fractions alone: tau_t = first + (t - 1) / 12 for both day counts, discount
// exp(-rate T) (a flat continuous curve seen from settlement); dates left empty.
inline PaymentGrid regular_grid(int months, double first_years, double rate = 0.0) {
  PaymentGrid g;
  g.months = months;
  for (int t = 1; t <= months; ++t) {
    const double years = first_years + (t - 1) / 12.0;
    g.years_30_360.push_back(years);
    g.years_365.push_back(years);
    g.discount.push_back(std::exp(-rate * years));
  }
  return g;
}

// The cash as a QuantLib leg of simple cash flows on the grid's payment dates.
inline QuantLib::Leg leg_of(std::span<const double> cash, const PaymentGrid& grid) {
  QuantLib::Leg leg;
  for (std::size_t i = 0; i < cash.size(); ++i)
    leg.push_back(QuantLib::ext::make_shared<QuantLib::SimpleCashFlow>(cash[i],
                                                                       to_ql(grid.pay_date[i])));
  return leg;
}

// QuantLib curves from `as_of`, Actual/365 Fixed, continuous: flat, and a rising zero curve
// (linear in the zero rate, extrapolated flat-forward past 40 years).
inline QuantLib::ext::shared_ptr<QuantLib::YieldTermStructure> ql_flat_curve(Date as_of,
                                                                            double rate) {
  return QuantLib::ext::make_shared<QuantLib::FlatForward>(to_ql(as_of), rate,
                                                          QuantLib::Actual365Fixed(),
                                                          QuantLib::Continuous);
}
inline QuantLib::ext::shared_ptr<QuantLib::YieldTermStructure> ql_zero_curve(Date as_of) {
  namespace ql = QuantLib;
  const ql::Date d = to_ql(as_of);
  const std::vector<ql::Date> dates = {d,
                                       d + ql::Period(3, ql::Months),
                                       d + ql::Period(1, ql::Years),
                                       d + ql::Period(2, ql::Years),
                                       d + ql::Period(5, ql::Years),
                                       d + ql::Period(10, ql::Years),
                                       d + ql::Period(20, ql::Years),
                                       d + ql::Period(40, ql::Years)};
  const std::vector<ql::Rate> rates = {0.0430, 0.0430, 0.0395, 0.0370,
                                       0.0365, 0.0390, 0.0425, 0.0440};
  auto curve = ql::ext::make_shared<ql::ZeroCurve>(dates, rates, ql::Actual365Fixed());
  curve->enableExtrapolation();
  return curve;
}

// A YieldCurve around a QuantLib curve (no quotes, no bootstrap): what payment_grid reads.
inline YieldCurve wrap_curve(const QuantLib::ext::shared_ptr<QuantLib::YieldTermStructure>& ql,
                             Date as_of) {
  YieldCurve curve;
  curve.source = "QuantLib curve built in the test";
  curve.as_of = as_of;
  curve.term_structure =
      std::shared_ptr<const QuantLib::YieldTermStructure>(ql.get(), [keep = ql](const void*) {});
  return curve;
}

// One new 30-year level-pay loan: $250,000 at 6.5%, servicing 0.25% (net 6.25%), age 0.
inline LoanArrays one_new_loan() {
  return make_loans({{.id = "L1",
                      .upb = 250'000,
                      .rate = 0.065,
                      .remaining = 360,
                      .age = 0,
                      .servicing = 0.0025,
                      .original_term = 360}});
}

// The investor's monthly cash of `loans` under `prepay`, no defaults.
inline PoolFlows pool_flows(const LoanArrays& loans, const SpeedCurve& prepay) {
  Assumptions a;
  a.prepay = prepay;
  return project_pool(loans, a).pool;
}

}  // namespace poolbid::testing_support
