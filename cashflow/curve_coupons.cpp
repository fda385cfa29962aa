// ARM coupon paths read off a yield curve's index forwards, and the projection horizon they cover.
#include <algorithm>
#include <string>
#include <vector>

#include "cashflow/cashflow.h"
#include "cashflow/loan_model.h"

namespace poolbid {

int projection_horizon(const LoanArrays& loans, const Assumptions& assumptions,
                       const ModelRun* model) {
  int longest = 0;
  for (std::size_t i = 0; i < loans.size(); ++i)
    longest = std::max(longest, loans.remaining_term[i]);
  if (!model) return longest + std::max(assumptions.lag_months, 0) + 1;
  const detail::ModelTables tables = detail::model_tables(*model, false);
  int lag = 0;
  for (std::size_t i = 0; i < loans.size(); ++i) {
    const std::size_t state = loans.state[i];
    lag = std::max(lag, state < tables.timeline.size() ? tables.timeline[state] : tables.timeline[0]);
  }
  return longest + lag + 1;
}

CouponPaths arm_coupon_paths(const LoanArrays& loans, const YieldCurve& curve, Date cutoff,
                             int months) {
  // Only the indexes some ARM reads: a fixed-rate loan's leftover index column asks nothing of
  // the curve.
  std::vector<bool> used(loans.arm_index_names.size(), false);
  for (std::size_t i = 0; i < loans.size(); ++i)
    if (loans.amortization[i] == Amortization::arm && loans.arm_index[i] < used.size())
      used[loans.arm_index[i]] = true;
  std::vector<std::string> names;
  for (std::size_t k = 1; k < used.size(); ++k)
    if (used[k]) names.push_back(loans.arm_index_names[k]);
  return arm_coupon_paths(loans, index_paths(curve, names, cutoff, std::max(months, 1)));
}

}  // namespace poolbid
