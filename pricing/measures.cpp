// Measures on one cash vector and a payment grid: price <-> cash-flow yield and Z-spread
// (QuantLib's Brent solver), bond-equivalent yield, modified duration, WAL and accrued interest
// (DESIGN.md section 5). The present values are allocation-free loops that solvers call.
#include <ql/math/solvers1d/brent.hpp>
#include <ql/time/daycounters/thirty360.hpp>

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <optional>
#include <span>
#include <stdexcept>

#include "pricing/pricing.h"
#include "pricing/ql_date.h"

namespace poolbid {

namespace {

// Yields and spreads are searched between these (decimal per year); outside them: no solution.
constexpr double kLowestRate = -0.99;
constexpr double kHighestRate = 1.0;
constexpr double kSolverAccuracy = 1e-12;

void check_length(std::span<const double> cash, std::size_t grid_months, const char* what) {
  if (cash.size() > grid_months)
    throw std::invalid_argument(fmt::format("{}: {} months of cash but the payment grid has {}",
                                            what, cash.size(), grid_months));
}

// The rate in [kLowestRate, kHighestRate] at which pv_at(rate) == pv, for a present value that
// falls as the rate rises; nullopt if there is none.
template <class PvAt>
std::optional<double> solve_for_pv(std::span<const double> cash, double pv, double guess,
                                   const PvAt& pv_at) {
  if (!(pv > 0) || !std::isfinite(pv)) return std::nullopt;
  if (std::none_of(cash.begin(), cash.end(), [](double c) { return c > 0; })) return std::nullopt;
  const auto gap = [&](double rate) { return pv_at(rate) - pv; };
  const double at_lowest = gap(kLowestRate);
  const double at_highest = gap(kHighestRate);
  if (!std::isfinite(at_lowest) || !std::isfinite(at_highest)) return std::nullopt;
  if (at_lowest == 0) return kLowestRate;
  if (at_highest == 0) return kHighestRate;
  if ((at_lowest > 0) == (at_highest > 0)) return std::nullopt;
  return QuantLib::Brent().solve(gap, kSolverAccuracy, guess, kLowestRate, kHighestRate);
}

}  // namespace

double pv_at_yield(std::span<const double> cash, const PaymentGrid& grid, Rate cfy) {
  check_length(cash, grid.years_30_360.size(), "pv_at_yield");
  // (1 + cfy/12)^(-12 tau) = exp(-12 tau log(1 + cfy/12)): one logarithm, one exponential a month.
  const double log_growth = std::log1p(cfy / 12.0);
  const double* years = grid.years_30_360.data();
  double pv = 0;
  for (std::size_t i = 0; i < cash.size(); ++i)
    pv += cash[i] * std::exp(-12.0 * years[i] * log_growth);
  return pv;
}

double pv_at_spread(std::span<const double> cash, const PaymentGrid& grid, double z) {
  check_length(cash, std::min(grid.years_365.size(), grid.discount.size()), "pv_at_spread");
  const double* years = grid.years_365.data();
  const double* discount = grid.discount.data();
  double pv = 0;
  for (std::size_t i = 0; i < cash.size(); ++i)
    pv += cash[i] * discount[i] * std::exp(-z * years[i]);
  return pv;
}

std::optional<Rate> yield_for_pv(std::span<const double> cash, const PaymentGrid& grid,
                                 double pv) {
  check_length(cash, grid.years_30_360.size(), "yield_for_pv");
  return solve_for_pv(cash, pv, 0.05, [&](Rate cfy) { return pv_at_yield(cash, grid, cfy); });
}

std::optional<double> spread_for_pv(std::span<const double> cash, const PaymentGrid& grid,
                                    double pv) {
  check_length(cash, std::min(grid.years_365.size(), grid.discount.size()), "spread_for_pv");
  return solve_for_pv(cash, pv, 0.0, [&](double z) { return pv_at_spread(cash, grid, z); });
}

Rate bey_from_cfy(Rate cfy) { return 2.0 * (std::pow(1.0 + cfy / 12.0, 6.0) - 1.0); }

Rate cfy_from_bey(Rate bey) { return 12.0 * (std::pow(1.0 + bey / 2.0, 1.0 / 6.0) - 1.0); }

double modified_duration(std::span<const double> cash, const PaymentGrid& grid, Rate cfy) {
  check_length(cash, grid.years_30_360.size(), "modified_duration");
  // dP/dy = -sum tau cash (1 + y/12)^(-12 tau - 1), analytic at monthly compounding.
  const double log_growth = std::log1p(cfy / 12.0);
  const double* years = grid.years_30_360.data();
  double pv = 0;
  double weighted = 0;
  for (std::size_t i = 0; i < cash.size(); ++i) {
    const double discounted = cash[i] * std::exp(-12.0 * years[i] * log_growth);
    pv += discounted;
    weighted += years[i] * discounted;
  }
  if (pv == 0) return 0;
  return weighted / (1.0 + cfy / 12.0) / pv;
}

double wal_years(const PoolFlows& pool) {
  const auto n = static_cast<std::size_t>(std::max(pool.months, 0));
  if (pool.sched_principal.size() < n || pool.prepayment.size() < n || pool.recovery.size() < n)
    throw std::invalid_argument(
        fmt::format("wal_years: pool flows shorter than their {} months", pool.months));
  double weighted = 0;
  double total = 0;
  for (std::size_t i = 0; i < n; ++i) {
    const double principal = pool.sched_principal[i] + pool.prepayment[i] + pool.recovery[i];
    weighted += static_cast<double>(i + 1) / 12.0 * principal;
    total += principal;
  }
  return total == 0 ? 0.0 : weighted / total;
}

double accrued_interest(double balance, Rate net_rate, Date cutoff, Date settle) {
  if (settle < cutoff)
    throw std::invalid_argument(fmt::format("settlement date {} is before the cut-off date {}",
                                            detail::date_text(settle), detail::date_text(cutoff)));
  const QuantLib::Thirty360 thirty_360(QuantLib::Thirty360::BondBasis);
  const auto days = thirty_360.dayCount(detail::to_quantlib(cutoff), detail::to_quantlib(settle));
  return balance * net_rate * static_cast<double>(days) / 360.0;
}

}  // namespace poolbid
