// outcome_matrix: every pool priced under every scenario (house prices, rate shock, multipliers),
// with lifetime defaults and loss, the price at the target, WAL, and the yield and spread at one
// common price. Tested in tests/pricing/compare_test.cpp.
#include <fmt/core.h>

#include <cmath>
#include <stdexcept>
#include <string>
#include <vector>

#include "pricing/pricing.h"

namespace poolbid {

OutcomeMatrix outcome_matrix(std::span<const NamedPool> pools, std::span<const Scenario> scenarios,
                             const YieldCurve& curve, const BidRequest& request,
                             const MatrixOptions& options) {
  if (pools.empty()) throw std::invalid_argument("outcome_matrix: no pool given");
  if (scenarios.empty()) throw std::invalid_argument("outcome_matrix: no scenario given");
  for (std::size_t p = 0; p < pools.size(); ++p)
    if (pools[p].loans == nullptr)
      throw std::invalid_argument(
          fmt::format("outcome_matrix: pool {} ('{}') has no loans", p + 1, pools[p].name));
  if (request.model == nullptr)
    throw std::invalid_argument("outcome_matrix: needs the loan-level model (BidRequest::model)");
  if (request.target == BidTarget::price)
    throw std::invalid_argument(
        "outcome_matrix: a price target gives every cell the same price; target a yield or a "
        "spread");

  OutcomeMatrix out;
  for (const NamedPool& p : pools) out.pools.push_back(p.name);
  for (const Scenario& s : scenarios) out.scenarios.push_back(s.name);
  for (std::size_t s = 0; s < scenarios.size(); ++s)
    if (scenarios[s].name == "base") {
      out.price_scenario = s;
      break;
    }

  // The bids are kept only until their cells are read.
  std::vector<BidResult> bids(pools.size() * scenarios.size());
  BidRequest r = request;
  r.risk = false;
  r.loan_values = false;
  for (std::size_t p = 0; p < pools.size(); ++p)
    for (std::size_t s = 0; s < scenarios.size(); ++s) {
      r.scenario = scenarios[s];
      bids[p * scenarios.size() + s] = price_pool(*pools[p].loans, curve, r);
    }

  out.price_given = options.common_price.has_value();
  out.common_price = options.common_price.value_or(bids[out.price_scenario].clean_price);
  if (!std::isfinite(out.common_price))
    throw std::invalid_argument(
        fmt::format("outcome_matrix: common price {} is not a number", out.common_price));
  out.cells.resize(bids.size());
  for (std::size_t p = 0; p < pools.size(); ++p)
    for (std::size_t s = 0; s < scenarios.size(); ++s) {
      const BidResult& bid = bids[p * scenarios.size() + s];
      MatrixCell& cell = out.cells[p * scenarios.size() + s];
      cell.cum_default_pct = bid.cum_default_pct;
      cell.cum_loss_pct = bid.expected_loss_pct;
      cell.severity_pct = bid.severity_pct;
      cell.clean_price = bid.clean_price;
      cell.wal_years = bid.loss_adjusted.wal_years;
      cell.at_common_price = read_at_price(bid, request.settlement, out.common_price);
    }
  return out;
}

}  // namespace poolbid
