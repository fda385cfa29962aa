// price_pool: projects a pool (loss-adjusted and no-loss), solves the price for a bid target and
// reads every measure at that price; effective duration re-projects under the shifted curve.
#include <fmt/core.h>

#include <algorithm>
#include <cmath>
#include <numeric>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include "pricing/pricing.h"

namespace poolbid {
namespace {

std::size_t count_arms(const LoanArrays& loans) {
  return static_cast<std::size_t>(
      std::count(loans.amortization.begin(), loans.amortization.end(), Amortization::arm));
}

// ARM coupon paths on one curve; none when the tape has no ARM.
std::optional<CouponPaths> coupons_on(const LoanArrays& loans, const YieldCurve& curve,
                                      const BidRequest& request, int horizon) {
  if (count_arms(loans) == 0) return std::nullopt;
  return arm_coupon_paths(loans, curve, request.settlement.cutoff, horizon);
}

Projection project_with(const LoanArrays& loans, const std::optional<CouponPaths>& coupons,
                        const Assumptions& a, const BidRequest& request, bool loan_totals,
                        std::span<const double> discount = {}, const ModelRun* model = nullptr,
                        bool no_defaults = false) {
  ProjectionOptions options;
  options.threads = request.threads;
  options.loan_totals = loan_totals;
  options.discount = discount;
  options.coupons = coupons ? &*coupons : nullptr;
  options.model = model;
  options.no_defaults = no_defaults;
  return project_pool(loans, a, options);
}

bool shifts(const CurveShift& shift) {
  return shift.parallel_bp != 0 ||
         std::any_of(shift.key_bp.begin(), shift.key_bp.end(), [](double bp) { return bp != 0; });
}

// The loan-level model's run on one curve, or none without a model.
std::optional<ModelRun> run_on(const YieldCurve& curve, const BidRequest& request, int horizon) {
  if (!request.model) return std::nullopt;
  return model_run(*request.model, request.scenario, curve, request.settlement.cutoff, horizon,
                   request.neutral);
}

const ModelRun* pointer(const std::optional<ModelRun>& run) { return run ? &*run : nullptr; }

// to += sign x from, month by month. Every projection ends within the horizon (the longest
// remaining term plus the lag); a longer one would be a bug here, not a fact of the pool.
void add_cash(std::vector<double>& to, const std::vector<double>& from, double sign) {
  if (from.size() > to.size())
    throw std::logic_error(fmt::format("price_pool: a projection of {} months past the {}-month "
                                       "horizon",
                                       from.size(), to.size()));
  for (std::size_t t = 0; t < from.size(); ++t) to[t] += sign * from[t];
}

Assumptions without_defaults(Assumptions a) {
  a.default_rate = constant_curve(0);
  a.delinquent_default = false;
  return a;
}

std::string price_text(double pv, double balance) {
  return fmt::format("{:.3f}% of UPB", balance > 0 ? pv / balance * 100 : 0.0);
}

// $1,234,567.89, for messages.
std::string dollars(double x) {
  const std::string digits = fmt::format("{:.2f}", std::fabs(x));
  const std::size_t whole = digits.size() - 3;  // before ".cc"
  std::string out = x < 0 ? "-$" : "$";
  for (std::size_t i = 0; i < whole; ++i) {
    if (i > 0 && (whole - i) % 3 == 0) out += ',';
    out += digits[i];
  }
  return out + digits.substr(whole);
}

// Every measure of one view at the bid's dirty value `pv`.
PoolView read_view(const PoolFlows& pool, const PaymentGrid& grid, const YieldCurve& curve,
                   double pv, double balance, const char* which) {
  const std::span<const double> cash(pool.cash_flow);
  PoolView view;
  const std::optional<Rate> cfy = yield_for_pv(cash, grid, pv);
  if (!cfy) {
    // The solve looks between -99% and +100% a year: say which end the price is beyond.
    const bool too_high = pv > pv_at_yield(cash, grid, -0.99);
    throw PricingError(fmt::format(
        "no cash-flow yield prices the {} flows at a dirty value of {} ({}): {}", which,
        dollars(pv), price_text(pv, balance),
        too_high ? "the yield would be below -99% a year (the price is above what the loans "
                   "could pay)"
                 : "the yield would be above 100% a year (the price is too low to solve)"));
  }
  const std::optional<double> z = spread_for_pv(cash, grid, pv);
  if (!z)
    throw PricingError(fmt::format("no Z-spread over the curve prices the {} flows at {}", which,
                                   price_text(pv, balance)));
  view.cfy = *cfy;
  view.bey = bey_from_cfy(*cfy);
  view.z_spread = *z;
  view.wal_years = wal_years(pool);
  view.par_yield_at_wal = view.wal_years > 0 ? par_yield(curve, view.wal_years) : 0;
  view.spread_at_wal = view.bey - view.par_yield_at_wal;
  view.modified_duration = modified_duration(cash, grid, *cfy);
  return view;
}

}  // namespace

BidResult price_pool(const LoanArrays& loans, const YieldCurve& given_curve,
                     const BidRequest& request) {
  BidResult result;
  // With the model, the scenario's rate shock moves the curve for everything that follows.
  result.curve = request.model && shifts(request.scenario.rate_shock)
                     ? shift_curve(given_curve, request.scenario.rate_shock)
                     : given_curve;
  const YieldCurve& curve = result.curve;
  if (request.model) result.scenario = request.scenario.name;
  const Settlement& settlement = request.settlement;
  double balance = 0, net = 0;
  for (std::size_t i = 0; i < loans.size(); ++i) {
    balance += loans.current_balance[i];
    net += loans.current_balance[i] * (loans.note_rate[i] - loans.servicing_fee[i]);
  }
  if (!(balance > 0)) throw PricingError("no loans to price: the tape has no accepted loan");
  if (!(request.shock_bp > 0))
    throw std::invalid_argument(fmt::format("shock of {} bp: must be above 0", request.shock_bp));
  result.cutoff_balance = balance;
  result.net_coupon = net / balance;
  result.arm_loans = count_arms(loans);

  ModelRun probe;
  probe.model = request.model;
  const int horizon =
      projection_horizon(loans, request.assumptions, request.model ? &probe : nullptr);
  const std::optional<ModelRun> run = run_on(curve, request, horizon);
  const PaymentGrid grid = payment_grid(curve, settlement, horizon);
  result.accrued =
      accrued_interest(balance, result.net_coupon, settlement.cutoff, settlement.settle);

  // With a yield target the pool's yield is known before projecting, so per-loan values come
  // from the first projection; otherwise they need a second one at the solved yield.
  std::vector<double> loan_discount;
  auto discount_at = [&](Rate cfy) {
    loan_discount.assign(static_cast<std::size_t>(horizon) + 1, 0.0);
    for (int t = 1; t <= horizon; ++t)
      loan_discount[t] = std::pow(1 + cfy / 12, -12 * grid.years_30_360[t - 1]);
    return std::span<const double>(loan_discount);
  };
  const bool values_now = request.loan_values && request.target == BidTarget::yield;
  const std::optional<CouponPaths> coupons = coupons_on(loans, curve, request, horizon);
  result.flows = project_with(loans, coupons, request.assumptions, request, values_now,
                              values_now ? discount_at(cfy_from_bey(request.value))
                                       : std::span<const double>{},
                              pointer(run));
  const PoolFlows& pool = result.flows.pool;
  const std::span<const double> cash(pool.cash_flow);

  double pv = 0;
  switch (request.target) {
    case BidTarget::yield:
      pv = pv_at_yield(cash, grid, cfy_from_bey(request.value));
      break;
    case BidTarget::spread:
      pv = pv_at_spread(cash, grid, request.value);
      break;
    case BidTarget::price:
      pv = (request.value / 100) * balance + result.accrued;
      break;
  }
  if (!(pv > 0) || !std::isfinite(pv))
    throw PricingError(fmt::format("the target gives a dirty value of ${:.2f} ({}): nothing to bid",
                                   pv, price_text(pv, balance)));
  result.dirty_value = pv;
  result.clean_value = pv - result.accrued;
  result.dirty_price = pv / balance * 100;
  result.clean_price = result.clean_value / balance * 100;

  const Assumptions no_loss = without_defaults(request.assumptions);
  result.no_loss_flows =
      project_with(loans, coupons, no_loss, request, false, {}, pointer(run), true).pool;
  result.loss_adjusted = read_view(pool, grid, curve, pv, balance, "loss-adjusted");
  result.no_loss = read_view(result.no_loss_flows, grid, curve, pv, balance, "no-loss");
  result.credit_cost_bp = (result.no_loss.z_spread - result.loss_adjusted.z_spread) * 1e4;
  double defaults = 0;
  for (double loss : pool.loss) result.expected_loss += loss;
  for (double d : pool.defaults) defaults += d;
  result.expected_loss_pct = result.expected_loss / balance * 100;
  result.cum_default_pct = defaults / balance * 100;
  result.severity_pct = defaults > 0 ? result.expected_loss / defaults * 100 : 0.0;
  // Per-loan values at the pool's loss-adjusted yield, with and without losses.
  auto value_loans = [&] {
    if (!request.loan_values) return;
    const std::span<const double> discount = discount_at(result.loss_adjusted.cfy);
    if (!values_now)
      result.flows = project_with(loans, coupons, request.assumptions, request, true, discount,
                                  pointer(run));
    result.no_loss_loan_values =
        project_with(loans, coupons, no_loss, request, true, discount, pointer(run), true)
            .loans.present_value;
  };
  if (!request.risk) {
    value_loans();
    return result;
  }

  // Effective duration and convexity: the curve moved by +/- the shock, the loss-adjusted flows
  // re-projected where they read the curve, the Z-spread held. Only ARM coupons read the curve,
  // so only the ARMs are re-projected and swapped into the pool's cash:
  // cash(moved) = cash - ARM cash(curve) + ARM cash(moved).
  const double shock = request.shock_bp / 1e4;
  const std::size_t months = static_cast<std::size_t>(horizon);
  std::vector<double> steady_cash(months, 0.0);  // what the shift leaves alone
  add_cash(steady_cash, pool.cash_flow, 1.0);
  LoanArrays arm_subset;
  const LoanArrays* movers = &loans;  // the loans whose flows read the curve
  // With the model every loan's prepayment reads the curve (the market mortgage rate): all move.
  const bool all_move = request.model != nullptr;
  if (all_move) {
    std::fill(steady_cash.begin(), steady_cash.end(), 0.0);
  } else if (result.arm_loans > 0 && result.arm_loans < loans.size()) {
    std::vector<std::uint32_t> arm_indexes;
    arm_indexes.reserve(result.arm_loans);
    for (std::size_t i = 0; i < loans.size(); ++i)
      if (loans.amortization[i] == Amortization::arm)
        arm_indexes.push_back(static_cast<std::uint32_t>(i));
    arm_subset = select_loans(loans, arm_indexes);
    movers = &arm_subset;
    // The base curve's coupon paths list every ARM in loan order: the subset's are the same
    // changes with the loans renumbered 0, 1, ... (no second build).
    std::optional<CouponPaths> subset_coupons = coupons;
    if (subset_coupons->loans != arm_indexes)
      throw std::logic_error("price_pool: the coupon paths do not list every ARM in loan order");
    std::iota(subset_coupons->loans.begin(), subset_coupons->loans.end(), std::uint32_t{0});
    const PoolFlows arms_here =
        project_with(arm_subset, subset_coupons, request.assumptions, request, false).pool;
    add_cash(steady_cash, arms_here.cash_flow, -1.0);
  } else if (result.arm_loans > 0) {
    std::fill(steady_cash.begin(), steady_cash.end(), 0.0);  // every loan moves
  }
  // The pool's value on a moved curve at the bid's Z-spread.
  auto value_on = [&](const YieldCurve& moved) {
    std::vector<double> moved_cash = steady_cash;
    if (all_move) {
      const std::optional<ModelRun> moved_run = run_on(moved, request, horizon);
      const PoolFlows p = project_with(loans, coupons_on(loans, moved, request, horizon),
                                       request.assumptions, request, false, {},
                                       pointer(moved_run))
                              .pool;
      add_cash(moved_cash, p.cash_flow, 1.0);
    } else if (result.arm_loans > 0) {
      const PoolFlows p = project_with(*movers, coupons_on(*movers, moved, request, horizon),
                                       request.assumptions, request, false)
                              .pool;
      add_cash(moved_cash, p.cash_flow, 1.0);
    }
    return pv_at_spread(moved_cash, payment_grid(moved, settlement, horizon),
                        result.loss_adjusted.z_spread);
  };
  const double base_pv = pv_at_spread(cash, grid, result.loss_adjusted.z_spread);
  const double up = value_on(shift_curve(curve, request.shock_bp));
  const double down = value_on(shift_curve(curve, -request.shock_bp));
  result.effective_duration = (down - up) / (2 * base_pv * shock);
  result.effective_convexity = (up + down - 2 * base_pv) / (base_pv * shock * shock);
  result.dv01 = (down - up) / (2 * request.shock_bp);

  // Key-rate durations: the same, with the shock as a triangle at one key tenor at a time.
  const std::vector<double>& keys = request.key_rate_years;
  for (std::size_t k = 0; k < keys.size(); ++k) {
    CurveShift bump{0, keys, std::vector<double>(keys.size(), 0.0)};
    bump.key_bp[k] = request.shock_bp;
    const double key_up = value_on(shift_curve(curve, bump));
    bump.key_bp[k] = -request.shock_bp;
    const double key_down = value_on(shift_curve(curve, bump));
    result.key_rate_durations.push_back({keys[k], (key_down - key_up) / (2 * base_pv * shock)});
  }

  value_loans();
  return result;
}

}  // namespace poolbid
