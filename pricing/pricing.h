// Pricing: values projected pool cash on a yield curve (DESIGN.md sections 5 and 6) -- payment
// grid, price from yield or Z-spread and back, WAL, durations, convexity, DV01 -- and prices a pool
// for a bid target, with the loss-adjusted and no-loss views side by side.
#pragma once

#include <optional>
#include <span>
#include <stdexcept>
#include <string>
#include <vector>

#include "cashflow/cashflow.h"
#include "curves/curves.h"

namespace poolbid {

// ---- Settlement and the payment grid ------------------------------------------------------------
struct Settlement {
  Date cutoff{};        // balances are as of it; the first day of a month
  Date settle{};        // the buyer pays; >= cutoff and >= the curve's as_of
  int delay_days = 17;  // collection month t pays on the first of month t + 1 plus this
};

// What valuation needs for each month t of a pool's cash ([t - 1] = month t), sampled once.
struct PaymentGrid {
  int months = 0;
  std::vector<Date> pay_date;        // payment_date(cutoff, t, delay)
  std::vector<double> years_30_360;  // settle -> pay, 30/360 bond basis (cash-flow yield)
  std::vector<double> years_365;     // settle -> pay, Actual/365 Fixed (Z-spread)
  std::vector<double> discount;      // the curve's DF(pay) / DF(settle)
};
// Throws std::invalid_argument if the cut-off is not the first of a month, settle < cutoff,
// settle < curve.as_of, settle is on or after the first payment date, or delay or months < 0.
PaymentGrid payment_grid(const YieldCurve& curve, const Settlement& settlement, int months);

// ---- Measures on one cash vector: cash[t - 1] = dollars paid for month t --------------------------
// Present value at settlement at a monthly-compounded cash-flow yield (decimal):
// sum cash_t (1 + cfy / 12)^(-12 tau_t), tau the 30/360 years from settlement to payment.
double pv_at_yield(std::span<const double> cash, const PaymentGrid& grid, Rate cfy);
// Present value at settlement with z (decimal) added to the curve's continuous zero rates:
// sum cash_t DF_t exp(-z T_t), T the Actual/365 Fixed years from settlement to payment.
double pv_at_spread(std::span<const double> cash, const PaymentGrid& grid, double z);
// The cash-flow yield or Z-spread at which the cash is worth `pv`, solved with QuantLib's Brent
// solver to 1e-12; nullopt when none exists (no positive cash, pv <= 0, or no root between -99%
// and +100% a year).
std::optional<Rate> yield_for_pv(std::span<const double> cash, const PaymentGrid& grid, double pv);
std::optional<double> spread_for_pv(std::span<const double> cash, const PaymentGrid& grid,
                                    double pv);
// Bond-equivalent yield from the monthly cash-flow yield: 2[(1 + cfy/12)^6 - 1]; and back.
Rate bey_from_cfy(Rate cfy);
Rate cfy_from_bey(Rate bey);
// -(1/P) dP/dy at the cash-flow yield (years); 0 when the cash is worth nothing.
// Every measure throws std::invalid_argument when `cash` has more months than the grid.
double modified_duration(std::span<const double> cash, const PaymentGrid& grid, Rate cfy);
// sum (t/12) principal_t / sum principal_t, principal = scheduled + prepaid + recovered; 0 if none.
double wal_years(const PoolFlows& pool);
// balance x net rate x days30/360(cutoff -> settle) / 360, bond basis.
double accrued_interest(double balance, Rate net_rate, Date cutoff, Date settle);

// ---- The bid ------------------------------------------------------------------------------------
enum class BidTarget : std::uint8_t {
  yield,   // value = loss-adjusted bond-equivalent yield, decimal
  spread,  // value = loss-adjusted Z-spread, decimal (0.0125 = 125 bp)
  price,   // value = clean price, percent of the cut-off balance (98.5)
};

struct BidRequest {
  BidTarget target = BidTarget::yield;
  double value = 0;
  Settlement settlement;
  Assumptions assumptions;   // the loss-adjusted view; the no-loss view turns defaults off
  double shock_bp = 25;      // effective duration and convexity: curve +/- this, flows re-projected
  // Key-rate durations at these tenors (years, ascending; empty = none): each tenor's zero rates
  // moved +/- shock_bp as a triangle falling to zero at the neighbouring tenors (flat before the
  // first and after the last, so the key-rate durations add up to the effective duration).
  std::vector<double> key_rate_years = {2, 5, 10, 30};
  unsigned threads = 0;      // 0 = every core; results do not depend on it
  bool loan_values = false;  // value every loan at the pool's loss-adjusted yield
};

// The pool's cash under one set of assumptions, read at the bid price.
struct PoolView {
  Rate cfy = 0;              // monthly cash-flow yield
  Rate bey = 0;              // bond-equivalent yield
  double z_spread = 0;       // over the curve, decimal
  double wal_years = 0;
  Rate par_yield_at_wal = 0; // the curve's semiannual par yield at the WAL
  double spread_at_wal = 0;  // bey - par_yield_at_wal, decimal
  double modified_duration = 0;
};

struct BidResult {
  double cutoff_balance = 0;     // dollars, the loans priced
  Rate net_coupon = 0;           // balance-weighted note rate less servicing fee
  double accrued = 0;            // dollars, cut-off to settlement
  double clean_price = 0;        // percent of cutoff_balance
  double dirty_price = 0;
  double clean_value = 0;        // dollars
  double dirty_value = 0;
  PoolView loss_adjusted;        // assumptions as given
  PoolView no_loss;              // defaults off (and no delinquent roll to default)
  double credit_cost_bp = 0;     // (no_loss.z_spread - loss_adjusted.z_spread) in bp
  double expected_loss = 0;      // dollars, lifetime, loss-adjusted flows
  double expected_loss_pct = 0;  // percent of cutoff_balance
  double effective_duration = 0; // curve +/- shock_bp, flows re-projected, Z-spread held
  double effective_convexity = 0;
  double dv01 = 0;               // dollars per 1 bp fall in the curve
  struct KeyRateDuration {
    double years = 0;
    double duration = 0;
  };
  std::vector<KeyRateDuration> key_rate_durations;  // one per BidRequest::key_rate_years
  std::size_t arm_loans = 0;     // loans on coupon paths from the curve's index forwards
  Projection flows;              // loss-adjusted; with loan totals (present_value at the pool's
                                 // cash-flow yield) when BidRequest::loan_values
  PoolFlows no_loss_flows;
};

// Projects the pool under the request's assumptions (ARMs on coupon paths from the curve), solves
// the price for the target and reads every measure at that price. Throws PricingError when the
// target cannot be met or a measure has no solution (the message says which and why),
// std::invalid_argument for a bad settlement, CurveError for an ARM index the curve lacks.
BidResult price_pool(const LoanArrays& loans, const YieldCurve& curve, const BidRequest& request);

struct PricingError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

}  // namespace poolbid
