// Repricing a held pool after a shock: value it at its held price under the base scenario, then
// under the shocked scenario at the same loss-adjusted Z-spread; the difference is the P&L.
#include <stdexcept>

#include "pricing/pricing.h"

namespace poolbid {

ShockResult reprice_after_shock(const LoanArrays& loans, const YieldCurve& curve,
                                const ShockRequest& request) {
  const BidRequest& held = request.held;
  if (!held.model)
    throw std::invalid_argument("reprice_after_shock: the held pool needs the loan-level model");
  if (held.target != BidTarget::price)
    throw std::invalid_argument("reprice_after_shock: the held pool is valued at its price");

  ShockResult result;
  result.before = price_pool(loans, curve, held);

  BidRequest shocked = held;
  shocked.target = BidTarget::spread;
  shocked.value = result.before.loss_adjusted.z_spread;
  shocked.scenario = request.shocked;
  result.after = price_pool(loans, curve, shocked);

  const BidResult& before = result.before;
  const BidResult& after = result.after;
  result.pnl = after.clean_value - before.clean_value;
  result.pnl_points = after.clean_price - before.clean_price;
  result.expected_loss_change = after.expected_loss - before.expected_loss;
  result.expected_loss_change_pct =
      before.cutoff_balance > 0 ? 100 * result.expected_loss_change / before.cutoff_balance : 0;
  if (held.loan_values) {
    const std::vector<double>& was = before.flows.loans.present_value;
    const std::vector<double>& now = after.flows.loans.present_value;
    if (was.size() != loans.size() || now.size() != loans.size())
      throw std::logic_error("reprice_after_shock: loan values missing from a view");
    result.loan_pnl.resize(loans.size());
    for (std::size_t i = 0; i < loans.size(); ++i) result.loan_pnl[i] = now[i] - was[i];
  }
  return result;
}

}  // namespace poolbid
