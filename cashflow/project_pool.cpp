// project_pool: checks its inputs, splits the loans into fixed chunks run on worker threads, adds
// the chunks' monthly sums in chunk order (so the thread count cannot change a bit), then shifts
// liquidations by the lag and derives the pool table's remaining columns.
#include <algorithm>
#include <atomic>
#include <cmath>
#include <cstdint>
#include <exception>
#include <mutex>
#include <stdexcept>
#include <string>
#include <thread>

#include <fmt/core.h>

#include "cashflow/engine.h"
#include "cashflow/loan_model.h"

namespace poolbid {
namespace {

using detail::ChunkSums;
using detail::kChunkLoans;

// Loans must be the same length in every vector the loop reads, with usable terms and rates.
void check_loans(const LoanArrays& l) {
  const std::size_t n = l.size();
  const bool sized = l.note_rate.size() == n && l.servicing_fee.size() == n &&
                     l.remaining_term.size() == n && l.age.size() == n &&
                     l.io_months.size() == n && l.balloon_month.size() == n &&
                     l.delinquency.size() == n && l.loan_id.size() == n;
  if (!sized) throw std::invalid_argument("project_pool: loan arrays differ in length");
  for (std::size_t i = 0; i < n; ++i) {
    const bool usable = std::isfinite(l.current_balance[i]) && l.current_balance[i] >= 0 &&
                        std::isfinite(l.note_rate[i]) && l.note_rate[i] >= 0 &&
                        std::isfinite(l.servicing_fee[i]) && l.servicing_fee[i] >= 0 &&
                        l.servicing_fee[i] <= l.note_rate[i] &&
                        l.remaining_term[i] >= 1 && l.age[i] >= 0;
    if (!usable)
      throw std::invalid_argument(fmt::format(
          "project_pool: loan '{}' (row {}) has no usable balance, rate, fee (at most the "
          "rate), term or age",
          l.loan_id[i], i < l.row.size() ? l.row[i] : 0));
  }
}

// Coupon paths list loans once, ascending, each with a run of changes in `changes` (begin runs
// from 0 to changes.size(), never decreasing); a loan's changes fall in months 1 on, strictly
// ascending, at finite rates no lower than its servicing fee (as its note rate must be).
void check_coupons(const CouponPaths& c, const LoanArrays& l) {
  auto bad = [](const std::string& what) {
    throw std::invalid_argument("project_pool: coupon paths: " + what);
  };
  const std::size_t n = c.loans.size();
  if (n == 0) {
    if (!c.changes.empty() || c.begin.size() > 1 || (c.begin.size() == 1 && c.begin[0] != 0))
      bad(fmt::format("no loans are listed, yet there are {} changes and {} begin entries",
                      c.changes.size(), c.begin.size()));
    return;
  }
  if (c.begin.size() != n + 1)
    bad(fmt::format("{} loans listed need {} begin entries, not {}", n, n + 1, c.begin.size()));
  if (c.begin.front() != 0 || c.begin.back() != c.changes.size())
    bad(fmt::format("begin must run from 0 to the number of changes ({}), not {} to {}",
                    c.changes.size(), c.begin.front(), c.begin.back()));
  for (std::size_t k = 0; k < n; ++k) {
    const std::uint32_t i = c.loans[k];
    if (i >= l.size())
      bad(fmt::format("listed loan {} (entry {}) is past the last loan ({} loans)", i, k,
                      l.size()));
    if (k > 0 && i <= c.loans[k - 1])
      bad(fmt::format("loans must be strictly ascending: entry {} is loan {} after loan {}", k, i,
                      c.loans[k - 1]));
    if (c.begin[k + 1] < c.begin[k])
      bad(fmt::format("begin must not decrease: entry {} is {} after {}", k + 1, c.begin[k + 1],
                      c.begin[k]));
  }
  for (std::size_t k = 0; k < n; ++k) {
    const std::uint32_t i = c.loans[k];
    const std::string loan =
        fmt::format("loan '{}' (row {})", l.loan_id[i], i < l.row.size() ? l.row[i] : 0);
    const double fee = l.servicing_fee[i];
    std::int32_t previous = 0;
    for (std::uint32_t j = c.begin[k]; j < c.begin[k + 1]; ++j) {
      const CouponChange& change = c.changes[j];
      if (change.month < 1)
        bad(fmt::format("{}: change in month {} (months start at 1)", loan, change.month));
      if (change.month <= previous)
        bad(fmt::format("{}: change in month {} follows one in month {} (months must rise "
                        "strictly)",
                        loan, change.month, previous));
      if (!std::isfinite(change.rate) || change.rate < fee)
        bad(fmt::format("{}: rate {} in month {} must be a finite number no lower than the "
                        "servicing fee {}",
                        loan, change.rate, change.month, fee));
      previous = change.month;
    }
  }
}

// Monthly rates and severities must be shares: finite, 0 to 1. (curves/ refuses anything else from
// text or a file; a hand-built SpeedCurve could still carry one.)
void check_table(const MonthlyTable& table, const char* what) {
  const bool ok = table.hold >= 1 && table.by_month.size() == std::size_t(table.hold) + 1 &&
                  std::all_of(table.by_month.begin(), table.by_month.end(),
                              [](double v) { return std::isfinite(v) && v >= 0 && v <= 1; });
  if (!ok)
    throw std::invalid_argument(
        fmt::format("project_pool: the {} curve gives a monthly value outside 0-100%", what));
}

// Runs project_chunk over every chunk on `threads` workers; each chunk writes only its own sums.
void run_chunks(const detail::EngineInputs& in, std::size_t loans, unsigned threads,
                std::vector<ChunkSums>& chunks) {
  std::atomic<std::size_t> next{0};
  std::exception_ptr failure;
  std::mutex failure_lock;
  auto work = [&] {
    try {
      for (std::size_t c = next++; c < chunks.size(); c = next++) {
        const std::size_t first = c * kChunkLoans;
        detail::project_chunk(in, first, std::min(loans, first + kChunkLoans), chunks[c]);
      }
    } catch (...) {
      std::lock_guard<std::mutex> hold(failure_lock);
      if (!failure) failure = std::current_exception();
    }
  };
  std::vector<std::thread> workers;
  for (unsigned w = 1; w < threads; ++w) workers.emplace_back(work);
  work();
  for (std::thread& w : workers) w.join();
  if (failure) std::rethrow_exception(failure);
}

void size_loan_totals(LoanFlows& f, std::size_t n, bool discounted) {
  for (auto* v : {&f.sched_principal, &f.prepayment, &f.defaults, &f.loss, &f.recovery,
                  &f.gross_interest, &f.servicing, &f.net_interest, &f.advanced_interest,
                  &f.cash_flow, &f.wal_years})
    v->assign(n, 0.0);
  f.present_value.assign(discounted ? n : 0, 0.0);
  f.last_month.assign(n, 0);
}

// The pool table from the summed chunk columns: liquidations shifted by the lag, advances spread
// over the months each defaulted balance waits, then totals, realised speeds and cumulative loss.
PoolFlows pool_table(const std::array<std::vector<double>, detail::kSumCount>& s, int horizon,
                     int lag, bool advancing, double cutoff_balance, bool by_liquidation) {
  using namespace detail;
  const int months = horizon + lag;
  double advancing_now = 0, advances_started = 0;  // by_liquidation: running advance
  PoolFlows p;
  p.months = months;
  p.cutoff_balance = cutoff_balance;
  for (auto* v : {&p.begin_balance, &p.sched_principal, &p.prepayment, &p.defaults, &p.loss,
                  &p.recovery, &p.gross_interest, &p.servicing, &p.net_interest,
                  &p.advanced_interest, &p.total_principal, &p.cash_flow, &p.end_balance, &p.smm,
                  &p.mdr, &p.cpr, &p.cdr, &p.cum_loss_pct})
    v->assign(months, 0.0);
  double cumulative_loss = 0;
  for (int t = 1; t <= months; ++t) {
    const std::size_t k = t - 1;
    if (t <= horizon) {
      p.begin_balance[k] = s[kBegin][t];
      p.defaults[k] = s[kDefaults][t];
      p.sched_principal[k] = s[kSched][t];
      p.prepayment[k] = s[kPrepay][t];
      p.gross_interest[k] = s[kGross][t];
      p.servicing[k] = s[kServicing][t];
      p.net_interest[k] = s[kNet][t];
      p.end_balance[k] = s[kEnd][t];
    }
    if (by_liquidation) {
      p.recovery[k] = s[kRecoveryByLiquidationMonth][t];
      p.loss[k] = s[kLiquidatedByLiquidationMonth][t] - s[kRecoveryByLiquidationMonth][t];
      if (advancing) {  // advances run from the month of default to the month before the sale
        advances_started += s[kAdvanceStart][t];
        advancing_now += s[kAdvanceStart][t] - s[kAdvanceStop][t];
        // What is left once every advance has stopped is rounding: nothing.
        if (std::fabs(advancing_now) <= 1e-12 * advances_started) advancing_now = 0;
        p.advanced_interest[k] = advancing_now;
        p.net_interest[k] += advancing_now;
      }
    } else if (const int d = t - lag; d >= 1 && d <= horizon) {
      p.recovery[k] = s[kRecoveryByDefaultMonth][d];
      p.loss[k] = s[kDefaults][d] - s[kRecoveryByDefaultMonth][d];
    }
    if (advancing && !by_liquidation) {  // balances defaulted in months t - lag + 1 .. t await sale
      double advanced = 0;
      for (int d = std::max(1, t - lag + 1); d <= std::min(t, horizon); ++d)
        advanced += s[kAdvanceByDefaultMonth][d];
      p.advanced_interest[k] = advanced;
      p.net_interest[k] += advanced;
    }
    p.total_principal[k] = p.sched_principal[k] + p.prepayment[k] + p.recovery[k];
    p.cash_flow[k] = p.net_interest[k] + p.total_principal[k];
    const double prepayable = p.begin_balance[k] - p.defaults[k] - p.sched_principal[k];
    p.smm[k] = prepayable > 0 ? p.prepayment[k] / prepayable : 0.0;
    p.mdr[k] = p.begin_balance[k] > 0 ? p.defaults[k] / p.begin_balance[k] : 0.0;
    p.cpr[k] = 100.0 * cpr_from_smm(p.smm[k]);
    p.cdr[k] = 100.0 * cdr_from_mdr(p.mdr[k]);
    cumulative_loss += p.loss[k];
    p.cum_loss_pct[k] = cutoff_balance > 0 ? 100.0 * cumulative_loss / cutoff_balance : 0.0;
  }
  // Months after the last cash, default or liquidation carry nothing: drop them.
  int used = months;
  while (used > 0) {
    const std::size_t k = used - 1;
    if (p.begin_balance[k] != 0 || p.defaults[k] != 0 || p.loss[k] != 0 || p.cash_flow[k] != 0)
      break;
    --used;
  }
  p.months = used;
  for (auto* v : {&p.begin_balance, &p.sched_principal, &p.prepayment, &p.defaults, &p.loss,
                  &p.recovery, &p.gross_interest, &p.servicing, &p.net_interest,
                  &p.advanced_interest, &p.total_principal, &p.cash_flow, &p.end_balance, &p.smm,
                  &p.mdr, &p.cpr, &p.cdr, &p.cum_loss_pct})
    v->resize(used);
  return p;
}

}  // namespace

Projection project_pool(const LoanArrays& loans, const Assumptions& assumptions,
                        const ProjectionOptions& options) {
  check_loans(loans);
  if (assumptions.lag_months < 0)
    throw std::invalid_argument("project_pool: the severity lag cannot be negative");
  if (options.coupons) check_coupons(*options.coupons, loans);
  const std::size_t n = loans.size();

  detail::EngineInputs in;
  in.loans = &loans;
  in.smm = monthly_rate_table(assumptions.prepay);
  in.mdr = monthly_rate_table(assumptions.default_rate);
  in.severity = monthly_share_table(assumptions.severity);
  check_table(in.smm, "prepayment");
  check_table(in.mdr, "default");
  check_table(in.severity, "severity");
  in.lag = assumptions.lag_months;
  in.advancing = assumptions.advancing == Advancing::interest;
  in.delinquent_default = assumptions.delinquent_default;
  in.coupons = options.coupons;
  for (std::size_t i = 0; i < n; ++i)
    in.horizon = std::max(in.horizon, detail::final_month(loans, i));
  detail::ModelTables model;
  if (options.model) {
    model = detail::model_tables(*options.model, options.no_defaults);
    check_table(model.base_mdr, "model's base default");
    check_table(model.turnover_smm, "model's turnover");
    in.model = &model;
    in.lag = 0;
    in.delinquent_default = false;
    for (std::size_t i = 0; i < n; ++i) {
      const std::size_t state = loans.state[i];
      in.max_lag = std::max(in.max_lag, state < model.timeline.size() ? model.timeline[state]
                                                                      : model.timeline[0]);
    }
    const ModelRun& run = *options.model;
    if (run.house_price_index.size() < std::size_t(in.horizon + in.max_lag) ||
        run.mortgage_rate.size() < std::size_t(in.horizon) ||
        !std::all_of(run.house_price_index.begin(), run.house_price_index.end(),
                     [](double v) { return std::isfinite(v) && v > 0; }))
      throw std::invalid_argument(fmt::format(
          "project_pool: the model run covers {} months of house prices and {} of mortgage "
          "rates (all positive); these loans need {} and {}",
          run.house_price_index.size(), run.mortgage_rate.size(), in.horizon + in.max_lag,
          in.horizon));
  } else {
    in.max_lag = in.lag;
  }
  const int months = in.horizon + in.max_lag;

  Projection result;
  std::vector<double> no_discount;
  if (options.loan_totals) {
    const bool discounted = !options.discount.empty();
    if (discounted && options.discount.size() < std::size_t(months) + 1)
      throw std::invalid_argument(fmt::format(
          "project_pool: discount factors cover {} months; the projection needs {}",
          options.discount.size() == 0 ? 0 : options.discount.size() - 1, months));
    if (discounted) {
      in.discount = options.discount;
    } else {
      no_discount.assign(std::size_t(months) + 1, 0.0);
      in.discount = no_discount;
    }
    in.advance_discount.assign(std::size_t(in.horizon) + 1, 0.0);
    for (int t = 1; t <= in.horizon; ++t)
      for (int u = t; u < t + in.lag; ++u) in.advance_discount[t] += in.discount[u];
    if (in.model) {
      in.cumulative_discount.assign(std::size_t(months) + 1, 0.0);
      for (int t = 1; t <= months; ++t)
        in.cumulative_discount[t] = in.cumulative_discount[t - 1] + in.discount[t];
    }
    size_loan_totals(result.loans, n, discounted);
    in.loan_totals = &result.loans;
  }

  std::vector<ChunkSums> chunks((n + kChunkLoans - 1) / kChunkLoans);
  for (ChunkSums& c : chunks)
    for (auto& column : c.by_month) column.assign(std::size_t(months) + 1, 0.0);
  unsigned threads = options.threads ? options.threads : std::thread::hardware_concurrency();
  threads = std::max(1u, std::min<unsigned>(threads, static_cast<unsigned>(chunks.size())));
  run_chunks(in, n, threads, chunks);

  // Fixed-order reduction: chunk 0, 1, 2, ... whatever thread ran each.
  std::array<std::vector<double>, detail::kSumCount> sums;
  for (auto& column : sums) column.assign(std::size_t(months) + 1, 0.0);
  for (const ChunkSums& c : chunks)
    for (int k = 0; k < detail::kSumCount; ++k)
      for (std::size_t t = 0; t < sums[k].size(); ++t) sums[k][t] += c.by_month[k][t];
  double cutoff_balance = 0;
  for (std::size_t i = 0; i < n; ++i) cutoff_balance += loans.current_balance[i];

  result.pool = pool_table(sums, in.horizon, in.max_lag, in.advancing, cutoff_balance,
                           in.model != nullptr);
  return result;
}

}  // namespace poolbid
