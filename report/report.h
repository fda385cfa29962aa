// Report: turns a checked tape, its strats and its projected cash flows into text for a terminal,
// JSON for a program and CSV for a spreadsheet. Functions return the whole document as a string,
// so a caller writes all of it or nothing; the per-loan CSV can also be streamed.
#pragma once

#include <chrono>
#include <iosfwd>
#include <string>
#include <string_view>

namespace poolbid {

using Date = std::chrono::year_month_day;  // as in tape/tape.h

struct TapeRead;
struct Strats;
struct LoanArrays;
struct Assumptions;
struct PoolFlows;
struct LoanFlows;
struct YieldCurve;
struct BidRequest;
struct BidResult;

// `poolbid check`: rows read / accepted / rejected / with warnings, UPB accepted and rejected,
// file-level notes, then every problem (row, loan id, column, value, reason).
std::string check_text(const TapeRead& tape);
std::string check_json(const TapeRead& tape);

// `poolbid strats`: pool summary, weighted averages with missing counts, one table per
// stratification; a short account of rejected rows (the full list is `check`'s).
std::string strats_text(const TapeRead& tape, const Strats& strats);
std::string strats_json(const TapeRead& tape, const Strats& strats);

// `poolbid cashflows`. Cash of collection month t reaches the investor `delay_days` after the
// first day of month t + 1 (DESIGN.md section 5); tape.cutoff must be set (std::invalid_argument
// otherwise). Columns, keys and units are documented in the README and are a public interface.
//
// The monthly pool table as CSV: the header line, then one line per month 1..pool.months. Dates
// ISO, dollars to the cent, smm and mdr decimals (10 places), cpr, cdr and cum_loss_pct percent
// (6 places). Plain commas, "\n" line ends, no quoting needed.
std::string cashflow_csv(const PoolFlows& pool, Date cutoff, int delay_days);
inline constexpr std::string_view kCashflowCsvHeader =
    "month,date,begin_balance,sched_principal,prepayment,default,loss,recovery,gross_interest,"
    "servicing,net_interest,total_principal,cash_flow,end_balance,smm,mdr,cpr,cdr,cum_loss_pct";
// Lifetime totals per loan as CSV, one line per loan in tape order; loan ids and seller names
// quoted as RFC 4180 says when they hold a comma, a quote or a line break.
std::string loan_flows_csv(const LoanArrays& loans, const LoanFlows& flows);
void write_loan_flows_csv(std::ostream& out, const LoanArrays& loans, const LoanFlows& flows);
inline constexpr std::string_view kLoanFlowsCsvHeader =
    "loan_id,row,seller,cutoff_balance,sched_principal,prepayment,default,loss,recovery,"
    "gross_interest,servicing,net_interest,advanced_interest,cash_flow,wal_years,last_month";
// Terminal report: the assumptions, pool totals, the months 1-12 then every 12th and the last,
// every rejected row, the caution.
// `arm_curve`: the curve whose index forwards reset the ARMs (`--curve`), or null when ARMs kept
// their cut-off note rate; the report says which.
std::string cashflow_text(const TapeRead& tape, const Assumptions& assumptions,
                          const PoolFlows& pool, int delay_days,
                          const YieldCurve* arm_curve = nullptr);
// {"file", "cutoff_date", "payment_delay_days", "assumptions", "arm_curve", "summary", "months",
//  "rejected", "caution"}; "arm_curve" is {"source", "as_of"} or null; "months" entries have the
//  CSV's keys, numbers unrounded.
std::string cashflow_json(const TapeRead& tape, const Assumptions& assumptions,
                          const PoolFlows& pool, int delay_days,
                          const YieldCurve* arm_curve = nullptr);

// `poolbid price`: the bid and what it means. Keys, columns and units are documented in the README
// and are a public interface.
//
// Terminal report: tape, curve and assumptions; the bid (clean and dirty, % and $, accrued); a
// two-column table of the loss-adjusted and no-loss views (yield, BEY, Z-spread, spread at WAL,
// WAL, modified duration); credit cost; expected loss; effective duration, convexity, DV01;
// every rejected row; the caution.
std::string price_text(const TapeRead& tape, const YieldCurve& curve, const BidRequest& request,
                       const BidResult& result);
// {"file", "cutoff_date", "settlement_date", "payment_delay_days", "curve", "assumptions",
//  "target", "bid", "loss_adjusted", "no_loss", "credit", "risk", "loans_priced", "rejected",
//  "caution"}; rates and spreads as decimals, prices in percent, money in dollars, unrounded.
std::string price_json(const TapeRead& tape, const YieldCurve& curve, const BidRequest& request,
                       const BidResult& result);
// Each loan's value at the pool's loss-adjusted cash-flow yield, one line per loan in tape order
// (needs BidResult::flows.loans with present_value). value = the loan's allocated share of the
// dirty bid in dollars (values sum to the pool's dirty value); dirty_price = value / balance x 100.
std::string loan_values_csv(const LoanArrays& loans, const BidResult& result);
void write_loan_values_csv(std::ostream& out, const LoanArrays& loans, const BidResult& result);
inline constexpr std::string_view kLoanValuesCsvHeader =
    "loan_id,row,seller,cutoff_balance,note_rate,value,dirty_price,wal_years,expected_loss,"
    "loss_pct";

// Every rejecting problem of a tape, one line each (row, loan id, column, value, reason), under
// a line counting the rows; "" when no row was rejected. For standard error when the standard
// output carries a table.
std::string rejected_rows_text(const TapeRead& tape);

// The caution every report carries.
std::string_view caution_text();

}  // namespace poolbid
