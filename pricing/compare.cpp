// compare_pools: several sellers' pools priced under one model, curve and target, read at one
// common price, and each later pool's price gap to the first attributed to underwriting factors by
// re-pricing with each factor read neutral. Tested in tests/pricing/compare_test.cpp.
#include <fmt/core.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include "pricing/pricing.h"

namespace poolbid {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

PoolView unsolved_view() {
  PoolView v;
  v.cfy = v.bey = v.z_spread = v.par_yield_at_wal = v.spread_at_wal = v.modified_duration = kNaN;
  return v;
}

// One view's measures at dirty value `pv`; false (and NaN measures) when the yield or the spread
// has no solution there.
bool read_view(const PoolFlows& pool, const PaymentGrid& grid, const YieldCurve& curve, double pv,
               PoolView& view) {
  view = unsolved_view();
  view.wal_years = wal_years(pool);
  const std::span<const double> cash(pool.cash_flow);
  const std::optional<Rate> cfy = yield_for_pv(cash, grid, pv);
  const std::optional<double> z = spread_for_pv(cash, grid, pv);
  if (cfy) {
    view.cfy = *cfy;
    view.bey = bey_from_cfy(*cfy);
    view.par_yield_at_wal = view.wal_years > 0 ? par_yield(curve, view.wal_years) : 0;
    view.spread_at_wal = view.bey - view.par_yield_at_wal;
    view.modified_duration = modified_duration(cash, grid, *cfy);
  }
  if (z) view.z_spread = *z;
  return cfy.has_value() && z.has_value();
}

void check_pools(std::span<const NamedPool> pools, const BidRequest& request, const char* what) {
  if (pools.empty()) throw std::invalid_argument(fmt::format("{}: no pool given", what));
  for (std::size_t p = 0; p < pools.size(); ++p)
    if (pools[p].loans == nullptr)
      throw std::invalid_argument(
          fmt::format("{}: pool {} ('{}') has no loans", what, p + 1, pools[p].name));
  if (request.model == nullptr)
    throw std::invalid_argument(
        fmt::format("{}: needs the loan-level model (BidRequest::model)", what));
  if (request.target == BidTarget::price)
    throw std::invalid_argument(fmt::format(
        "{}: a price target gives every pool the same price; target a yield or a spread", what));
}

double clean_price_at(const LoanArrays& loans, const YieldCurve& curve, const BidRequest& request,
                      FactorSet neutral) {
  BidRequest r = request;
  r.neutral = neutral;
  return price_pool(loans, curve, r).clean_price;
}

constexpr FactorSet kEveryFactor = (FactorSet{1} << kFactorCount) - 1;

}  // namespace

PoolAtPrice read_at_price(const BidResult& bid, const Settlement& settlement, double clean_price) {
  PoolAtPrice out;
  out.clean_price = clean_price;
  out.dirty_value = clean_price / 100 * bid.cutoff_balance + bid.accrued;
  const int months = std::max(bid.flows.pool.months, bid.no_loss_flows.months);
  const PaymentGrid grid = payment_grid(bid.curve, settlement, months);
  const bool la = read_view(bid.flows.pool, grid, bid.curve, out.dirty_value, out.loss_adjusted);
  const bool nl = read_view(bid.no_loss_flows, grid, bid.curve, out.dirty_value, out.no_loss);
  out.solved = la && nl && out.dirty_value > 0;
  out.credit_cost_bp = (out.no_loss.z_spread - out.loss_adjusted.z_spread) * 1e4;
  return out;
}

Comparison compare_pools(std::span<const NamedPool> pools, const YieldCurve& curve,
                         const BidRequest& request, const CompareOptions& options) {
  check_pools(pools, request, "compare_pools");
  Comparison out;
  for (const NamedPool& p : pools) {
    ComparedPool c;
    c.name = p.name;
    c.bid = price_pool(*p.loans, curve, request);
    c.cum_default_pct = c.bid.cum_default_pct;
    c.severity_pct = c.bid.severity_pct;
    c.cum_loss_pct = c.bid.expected_loss_pct;
    c.wal_years = c.bid.loss_adjusted.wal_years;
    out.pools.push_back(std::move(c));
  }
  out.price_given = options.common_price.has_value();
  out.common_price = options.common_price.value_or(out.pools.front().bid.clean_price);
  if (!std::isfinite(out.common_price))
    throw std::invalid_argument(
        fmt::format("compare_pools: common price {} is not a number", out.common_price));
  for (ComparedPool& c : out.pools)
    c.at_common_price = read_at_price(c.bid, request.settlement, out.common_price);

  if (!options.attribution) return out;
  BidRequest quick = request;
  quick.risk = false;
  quick.loan_values = false;
  for (std::size_t p = 0; p < pools.size(); ++p) {
    ComparedPool& c = out.pools[p];
    c.neutral_price.resize(kFactorCount);
    for (std::size_t f = 0; f < kFactorCount; ++f)
      c.neutral_price[f] = clean_price_at(*pools[p].loans, curve, quick,
                                          request.neutral | factor_bit(static_cast<Factor>(f)));
    c.all_neutral_price = clean_price_at(*pools[p].loans, curve, quick, kEveryFactor);
  }
  const ComparedPool& a = out.pools.front();
  for (std::size_t p = 1; p < out.pools.size(); ++p) {
    const ComparedPool& b = out.pools[p];
    const double balance_b = b.bid.cutoff_balance;
    auto line = [&](std::string label, std::optional<Factor> factor, double points) {
      return AttributionLine{std::move(label), factor, points, points / 100 * balance_b};
    };
    Attribution att;
    att.pool = p;
    att.gap_points = a.bid.clean_price - b.bid.clean_price;
    att.gap_dollars = att.gap_points / 100 * balance_b;
    double explained = 0;
    for (std::size_t f = 0; f < kFactorCount; ++f) {
      const Factor factor = static_cast<Factor>(f);
      const double points =
          (a.bid.clean_price - a.neutral_price[f]) - (b.bid.clean_price - b.neutral_price[f]);
      explained += points;
      att.lines.push_back(line(std::string(to_string(factor)), factor, points));
    }
    const double collateral = a.all_neutral_price - b.all_neutral_price;
    explained += collateral;
    att.lines.push_back(line("collateral and terms", std::nullopt, collateral));
    att.lines.push_back(line("interaction", std::nullopt, att.gap_points - explained));
    out.attributions.push_back(std::move(att));
  }
  return out;
}

}  // namespace poolbid
