// Yardstick for the cash-flow engine: a minimal hand-written blocked loop of the same monthly
// arithmetic (DESIGN.md section 4) for fixed-rate level-pay loans only, with no checks,
// no per-loan totals and no ARM, interest-only or balloon terms. Benchmarks compare the engine's
// speed with this loop's (the practical limit) and check that both give the same pool totals.
#pragma once

#include <cstdint>
#include <span>
#include <vector>

namespace poolbid::bench {

// Monthly rates tabulated like curves' MonthlyTable: month k reads by_month[min(k, hold)], k the
// loan's age (age at cut-off + projection month) when by_age, else the projection month.
struct TightTable {
  std::vector<double> by_month;  // size hold + 1
  int hold = 1;
  bool by_age = false;
};

struct TightAssumptions {
  TightTable smm, mdr, severity;  // SMM and MDR (decimals a month) and severity (share)
  int lag_months = 12;            // months from default to liquidation
  bool advance_interest = false;  // servicer advances net interest on defaulted balance
};

// Loans as structure-of-arrays, one slot per loan; rates decimal per year.
struct TightLoans {
  std::span<const double> balance, note_rate, servicing_fee;
  std::span<const std::int32_t> remaining_term, age;
  std::span<const std::uint8_t> default_at_cutoff;  // 1 = defaults in full in month 1; may be empty
};

// Pool sums by month; index t - 1 = month t. `months` = through the last month with cash or a
// liquidation.
struct TightPool {
  int months = 0;
  std::vector<double> begin_balance, defaults, sched_principal, prepayment, gross_interest,
      servicing, net_interest, advanced_interest, loss, recovery, end_balance;
};

// Projects every loan to maturity in blocks of 256 loans (months outer, loans inner), on
// `threads` threads (0 = 1) over fixed chunks of 64 blocks summed in chunk order, so the result
// does not depend on the thread count.
TightPool tight_project(const TightLoans& loans, const TightAssumptions& assumptions,
                        unsigned threads);

}  // namespace poolbid::bench
