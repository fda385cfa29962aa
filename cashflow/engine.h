// Private to cashflow/: what the projection loop reads (pool-wide tables, per-loan set-up) and what
// one chunk of loans hands back, so project_pool.cpp (threads, reduction) and monthly_step.cpp (the
// loop) share one vocabulary.
#pragma once

#include <array>
#include <cstddef>
#include <span>
#include <vector>

#include "cashflow/cashflow.h"

namespace poolbid::detail {

// Loans per block: a block's state (19 KiB; 41 KiB with loan totals) stays in L1 while its
// months run.
inline constexpr std::size_t kBlockLoans = 256;
// Loans per chunk: the unit of work handed to a thread and of the fixed-order reduction. It does
// not depend on the thread count, so neither do the sums.
inline constexpr std::size_t kChunkLoans = 16 * kBlockLoans;

// Monthly pool sums one chunk contributes, each indexed by projection month t (slot 0 unused).
// Recovery and advanced interest are kept by month of default; the pool table shifts them.
enum Sum : int {
  kBegin, kDefaults, kSched, kPrepay, kGross, kServicing, kNet, kEnd,
  kRecoveryByDefaultMonth,  // recovery of the balance defaulting in month t
  kAdvanceByDefaultMonth,   // monthly interest advanced on the balance defaulting in month t
  // The loan-level model, whose liquidation lag differs loan by loan: by month of liquidation.
  kRecoveryByLiquidationMonth,  // recovery received in month t
  kLiquidatedByLiquidationMonth,  // defaulted balance liquidated in month t
  kAdvanceStart,            // monthly advance starting in month t (month of default)
  kAdvanceStop,             // monthly advance ending before month t (month of liquidation)
  kSumCount
};
struct ChunkSums {
  std::array<std::vector<double>, kSumCount> by_month;
};

struct ModelTables;  // cashflow/loan_model.h

// Everything the loop needs besides the loans themselves; built once per projection.
struct EngineInputs {
  const LoanArrays* loans = nullptr;
  MonthlyTable smm, mdr, severity;   // SMM and MDR by month; severity share by month of default
  int lag = 0;
  bool advancing = false;
  bool delinquent_default = false;
  int horizon = 0;                   // last month any loan pays (before liquidation lag)
  std::span<const double> discount;  // by month t, covering horizon + lag; may be empty
  std::vector<double> advance_discount;  // [t] = sum of discount over months t .. t+lag-1
  const CouponPaths* coupons = nullptr;
  LoanFlows* loan_totals = nullptr;  // null: pool sums only
  // The loan-level model (null: the curves above). Its lags are per loan, up to max_lag.
  const ModelTables* model = nullptr;
  int max_lag = 0;
  std::vector<double> cumulative_discount;  // [t] = discount[1] + ... + discount[t]; model only
};

// Level payment per dollar of balance over `months` at monthly rate `r`: r / (1 - (1 + r)^-months),
// 1 / months when r = 0.
double annuity_factor(double r, int months);

// The loan's last projection month: remaining term, or the balloon month if that comes first.
int final_month(const LoanArrays& loans, std::size_t i);

// Projects loans [first, last) (one chunk) and adds their monthly sums into `sums`, which must be
// sized horizon + 1 and zeroed; writes the loans' totals if inputs.loan_totals is set.
void project_chunk(const EngineInputs& inputs, std::size_t first, std::size_t last,
                   ChunkSums& sums);

}  // namespace poolbid::detail
