// Private to cashflow/: the loan-level model turned into what the monthly loop reads -- tables by
// month, band and incentive built once per projection, and each loan's fixed terms.
#pragma once

#include <array>
#include <cstddef>
#include <cstdint>
#include <vector>

#include "cashflow/cashflow.h"

namespace poolbid::detail {

// Distinct updated-LTV bounds the loop compares against (the union of the three LTV tables'); the
// loop always makes this many comparisons, unused ones against +infinity.
inline constexpr int kMaxLtvEdges = 10;
// Incentive grid of the refinance table: -6% to +6% by 1 bp; incentives beyond read the end.
inline constexpr double kIncentiveLow = -0.06;
inline constexpr double kIncentiveStep = 0.0001;
inline constexpr int kIncentivePoints = 1201;

struct ModelTables {
  const CreditModel* model = nullptr;
  MonthlyTable base_mdr;      // reference borrower's MDR by loan age (or month)
  MonthlyTable turnover_smm;  // turnover SMM by loan age (or month)
  // Updated LTV: band k = number of edges at or below the LTV; slots kMaxLtvEdges + 1 (missing
  // from the tape) and kMaxLtvEdges + 2 (read neutral, every multiplier 1) are fixed per loan.
  std::array<double, kMaxLtvEdges> ltv_edges{};
  std::array<double, kMaxLtvEdges + 3> ltv_default{}, ltv_refi{}, ltv_turnover{};
  std::vector<double> refi_smm;        // by incentive grid point
  std::vector<double> house_price;     // index by month, [0] = cut-off
  std::vector<double> mortgage_rate;   // [t] = month t ([0] unused)
  double prepay_multiplier = 1, default_multiplier = 1;
  double burnout_per_unit = 0;         // burnout per unit (decimal) of incentive: burnout x 100
  double sale_factor = 1;              // (1 - distressed discount) x (1 - sale cost)
  double carrying_per_month = 0;       // carrying cost per month, share of property value
  double foreclosure_cost = 0;         // dollars
  bool no_defaults = false;
  FactorSet neutral = 0;
  // Categories by the tape's enumerations.
  std::array<double, 4> documentation{}, occupancy{}, purpose{};
  std::array<double, 7> property{};
  std::array<double, 6> roll_mdr{};    // by Delinquency
  std::array<int, 6> roll_months{};
  std::array<int, 64> timeline{};      // by state index
  double cured_multiplier = 1;
  int max_timeline = 0;
};

// A loan's fixed terms under the model.
struct LoanTerms {
  double default_multiplier = 1;  // score x DTI x documentation x occupancy x purpose x property
                                  // x cured (after a roll) x scenario
  double refi_multiplier = 1;     // score
  double property_value = 0;      // at cut-off
  double junior = 0;              // junior liens, dollars
  int ltv_slot = -1;              // -1: band from the updated LTV; else a fixed slot
  int timeline = 0;               // months from default to liquidation
  double roll_mdr = 0;            // MDR while rolling (delinquent at cut-off)
  int roll_months = 0;            // months of the roll (0 = none)
};

ModelTables model_tables(const ModelRun& run, bool no_defaults);
LoanTerms loan_terms(const ModelTables& tables, const LoanArrays& loans, std::size_t i);
// The updated-LTV band of `ltv` (edges at or below it).
int ltv_band(const ModelTables& tables, double ltv);
// The refinance table's grid point for an incentive (nearest basis point, clamped).
int incentive_point(double incentive);

}  // namespace poolbid::detail
