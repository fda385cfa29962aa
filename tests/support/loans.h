// Test support: build LoanArrays by hand from a few loans, so a test states only what it varies.
// Header-only. Every vector of LoanArrays gets one slot per loan.
#pragma once

#include <gtest/gtest.h>

#include <algorithm>
#include <cstdint>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "tape/tape.h"

namespace poolbid::testing_support {

inline constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// One loan as a test writes it; rates and ratios are decimals, NaN = not given.
struct TestLoan {
  std::string id;
  double upb;
  double rate;
  int remaining = 350;
  int age = 10;
  double score = 740;
  double ltv = 0.80;
  double cltv = 0.80;
  double dti = 0.36;
  std::string state = "CA";  // "" = not given
  Occupancy occupancy = Occupancy::owner;
  Delinquency delinquency = Delinquency::current;
  double servicing = 0.0025;  // servicing fee, decimal per year
  int original_term = 360;
  Amortization amortization = Amortization::fixed;
  int io_months = 0;          // interest-only months from first payment; 0 = none
  int balloon_month = 0;      // loan month the balloon is paid; 0 = none
  // ARM terms (any loan may carry them; only amortization == arm uses them).
  std::string arm_index = "";     // index name; "" = none
  double arm_margin = kNaN;
  double arm_periodic_cap = kNaN;
  double arm_lifetime_cap = kNaN;  // absolute rate
  double arm_floor = kNaN;         // absolute rate
  int arm_first_reset = 0;         // loan month of the first rate change; 0 = none
  int arm_reset_period = 0;        // months between later changes; 0 = none
  // Credit terms the loan-level model reads (appended so older initialisers keep their order).
  Documentation documentation = Documentation::full;
  Purpose purpose = Purpose::purchase;
  PropertyType property_type = PropertyType::single_family;
  double property_value = kNaN;    // dollars; NaN = not given
  double original_balance = kNaN;  // dollars; NaN = not given
};

// Loans in order, tape rows 2, 3, ...; one seller; full documentation, single-family purchases
// unless the TestLoan says otherwise; fixed-rate 30-year loans with a 0.25% servicing fee and no ARM terms unless the TestLoan says
// otherwise. ARM index names are numbered from 1 in order of first appearance.
inline LoanArrays make_loans(const std::vector<TestLoan>& loans) {
  LoanArrays a;
  a.seller_names = {"test seller"};
  a.arm_index_names = {""};
  std::uint32_t row = 2;
  for (const TestLoan& t : loans) {
    a.loan_id.push_back(t.id);
    a.row.push_back(row++);
    a.seller.push_back(0);
    a.current_balance.push_back(t.upb);
    a.original_balance.push_back(t.original_balance);
    a.note_rate.push_back(t.rate);
    a.servicing_fee.push_back(t.servicing);
    a.original_term.push_back(t.original_term);
    a.remaining_term.push_back(t.remaining);
    a.age.push_back(t.age);
    a.amortization.push_back(t.amortization);
    a.io_months.push_back(t.io_months);
    a.balloon_month.push_back(t.balloon_month);
    std::uint8_t arm_index = 0;
    if (!t.arm_index.empty()) {
      const auto found = std::find(a.arm_index_names.begin(), a.arm_index_names.end(), t.arm_index);
      arm_index = static_cast<std::uint8_t>(found - a.arm_index_names.begin());
      if (found == a.arm_index_names.end()) a.arm_index_names.push_back(t.arm_index);
    }
    a.arm_index.push_back(arm_index);
    a.arm_margin.push_back(t.arm_margin);
    a.arm_periodic_cap.push_back(t.arm_periodic_cap);
    a.arm_lifetime_cap.push_back(t.arm_lifetime_cap);
    a.arm_floor.push_back(t.arm_floor);
    a.arm_first_reset.push_back(t.arm_first_reset);
    a.arm_reset_period.push_back(t.arm_reset_period);
    a.credit_score.push_back(t.score);
    a.original_ltv.push_back(t.ltv);
    a.combined_ltv.push_back(t.cltv);
    a.dti.push_back(t.dti);
    a.property_value.push_back(t.property_value);
    a.property_value_date.push_back(kNoDate);
    a.occupancy.push_back(t.occupancy);
    a.property_type.push_back(t.property_type);
    a.purpose.push_back(t.purpose);
    a.documentation.push_back(t.documentation);
    std::uint8_t state = 0;
    if (!t.state.empty()) {
      const std::optional<std::uint8_t> index = state_index(t.state);
      EXPECT_TRUE(index) << "not a state code: " << t.state;
      state = index.value_or(0);
    }
    a.state.push_back(state);
    a.delinquency.push_back(t.delinquency);
  }
  return a;
}

}  // namespace poolbid::testing_support
