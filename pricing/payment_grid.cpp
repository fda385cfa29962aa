// The payment grid: for each month of a pool's cash its payment date, the 30/360 and Actual/365
// Fixed years from settlement and the curve's discount factor, sampled once (DESIGN.md section 5).
#include <ql/time/daycounters/actual365fixed.hpp>
#include <ql/time/daycounters/thirty360.hpp>

#include <fmt/format.h>

#include <cstddef>
#include <stdexcept>
#include <vector>

#include "pricing/pricing.h"
#include "pricing/ql_date.h"

namespace poolbid {

using detail::date_text;
using detail::to_quantlib;

namespace {

void check_settlement(const YieldCurve& curve, const Settlement& settlement, int months) {
  if (months < 0)
    throw std::invalid_argument(fmt::format("payment grid: {} months; must be 0 or more", months));
  if (!settlement.cutoff.ok() || settlement.cutoff.day() != std::chrono::day{1})
    throw std::invalid_argument(fmt::format("cut-off date {}: must be the first day of a month",
                                            date_text(settlement.cutoff)));
  if (!settlement.settle.ok())
    throw std::invalid_argument(
        fmt::format("settlement date {}: not a date", date_text(settlement.settle)));
  if (settlement.settle < settlement.cutoff)
    throw std::invalid_argument(fmt::format("settlement date {} is before the cut-off date {}",
                                            date_text(settlement.settle),
                                            date_text(settlement.cutoff)));
  if (settlement.settle < curve.as_of)
    throw std::invalid_argument(fmt::format(
        "settlement date {} is before the yield curve's date {} ({})",
        date_text(settlement.settle), date_text(curve.as_of), curve.source));
  if (settlement.delay_days < 0)
    throw std::invalid_argument(
        fmt::format("payment delay {} days: must be 0 or more", settlement.delay_days));
  // A buyer settling on or after the first payment date would not receive cash the balances
  // assume it does: the cut-off date is the one to move.
  const Date first_payment = payment_date(settlement.cutoff, 1, settlement.delay_days);
  if (!(settlement.settle < first_payment))
    throw std::invalid_argument(fmt::format(
        "settlement date {} is on or after the first payment date {}: move the cut-off date",
        date_text(settlement.settle), date_text(first_payment)));
}

}  // namespace

PaymentGrid payment_grid(const YieldCurve& curve, const Settlement& settlement, int months) {
  check_settlement(curve, settlement, months);
  const auto n = static_cast<std::size_t>(months);

  // Settlement first, then every payment date: one sampling of the curve for the whole grid.
  std::vector<Date> dates(n + 1);
  dates[0] = settlement.settle;
  for (std::size_t i = 1; i <= n; ++i)
    dates[i] = payment_date(settlement.cutoff, static_cast<int>(i), settlement.delay_days);
  const std::vector<double> df = discount_factors(curve, dates);

  const QuantLib::Thirty360 thirty_360(QuantLib::Thirty360::BondBasis);
  const QuantLib::Actual365Fixed actual_365;
  const QuantLib::Date settle = to_quantlib(settlement.settle);

  PaymentGrid grid;
  grid.months = months;
  grid.pay_date.assign(dates.begin() + 1, dates.end());
  grid.years_30_360.resize(n);
  grid.years_365.resize(n);
  grid.discount.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    const QuantLib::Date pay = to_quantlib(grid.pay_date[i]);
    grid.years_30_360[i] = thirty_360.yearFraction(settle, pay);
    grid.years_365[i] = actual_365.yearFraction(settle, pay);
    grid.discount[i] = df[i + 1] / df[0];
  }
  return grid;
}

}  // namespace poolbid
