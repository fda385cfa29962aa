// The loans and assumption sets the cash-flow benchmarks and the NumPy cross-check share. Loans are
// made from integer formulas over a counter hash (splitmix64), so bench/numpy_cashflow.py builds
// the very same loans, bit for bit, and pool totals can be compared across the three programs.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "bench/tight_loop.h"
#include "curves/curves.h"
#include "tape/tape.h"

namespace poolbid::bench {

// `count` 30-year fixed-rate level-pay loans: age 0-60 months, remaining term 360 - age, note
// rate 5-8% in eighths, balance $60k-$960k skewed low (mean about $285k) in whole $50s, servicing
// 0.25%, about 2% 90+ days delinquent. Loan j depends only on (seed, j).
LoanArrays make_fixed_loans(std::size_t count, std::uint64_t seed);

// The cross-check pool: three hand-written loans (one 15-year, one 90+ delinquent) followed by
// make_fixed_loans(count - 3, seed).
LoanArrays make_check_loans(std::size_t count, std::uint64_t seed);

// A named set of assumptions, as the benchmark and the cross-check run them.
struct CashflowCase {
  std::string name;
  Assumptions assumptions;
};

// constant:    8 CPR, 1 CDR, severity 40%, lag 12, no advancing
// psa_sda:     150 PSA, 200 SDA (by loan age), severity 40%, lag 12
// cpr_vector:  a 360-entry CPR vector by projection month, 1 CDR, severity 40%, lag 12
// all_options: 150 PSA, 200 SDA, severity 40%, lag 12, advancing interest, delinquent default
std::vector<CashflowCase> bench_cases();
// bench_cases() plus sev_vector_lag0: 8 CPR, 2 CDR, a 24-entry severity vector by loan age
// (30% rising to 53%), lag 0, advancing interest, delinquent default.
std::vector<CashflowCase> check_cases();

// Loan-months the engine projects: each loan's remaining term, or 1 for a loan that defaults in
// full in month 1 under delinquent_default.
std::int64_t loan_months(const LoanArrays& loans, const Assumptions& assumptions);

// The same projection for the tight loop: tables from curves' monthly tables, and loans as spans
// into `loans`; `flags` keeps the month-1 default flags alive.
TightAssumptions tight_assumptions(const Assumptions& assumptions);
TightLoans tight_loans(const LoanArrays& loans, const Assumptions& assumptions,
                       std::vector<std::uint8_t>& flags);

}  // namespace poolbid::bench
