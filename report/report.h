// Report: turns a checked tape, its strats and its projected cash flows into text for a terminal,
// JSON for a program and CSV for a spreadsheet. Functions return the whole document as a string,
// so a caller writes all of it or nothing; the per-loan CSV can also be streamed.
#pragma once

#include <chrono>
#include <iosfwd>
#include <span>
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
struct ModelNote;

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
// `model`: the loan-level model run (report/report.h "Model explanation"), or null.
std::string cashflow_text(const TapeRead& tape, const Assumptions& assumptions,
                          const PoolFlows& pool, int delay_days,
                          const YieldCurve* arm_curve = nullptr, const ModelNote* model = nullptr);
// {"file", "cutoff_date", "payment_delay_days", "assumptions", "arm_curve", "summary", "months",
//  "rejected", "caution"}; "arm_curve" is {"source", "as_of"} or null; "months" entries have the
//  CSV's keys, numbers unrounded.
// With a model, "model" follows "assumptions" (which then holds only "advancing").
std::string cashflow_json(const TapeRead& tape, const Assumptions& assumptions,
                          const PoolFlows& pool, int delay_days,
                          const YieldCurve* arm_curve = nullptr, const ModelNote* model = nullptr);

// `poolbid price`: the bid and what it means. Keys, columns and units are documented in the README
// and are a public interface.
//
// Terminal report: tape, curve and assumptions; the bid (clean and dirty, % and $, accrued); a
// two-column table of the loss-adjusted and no-loss views (yield, BEY, Z-spread, spread at WAL,
// WAL, modified duration); credit cost; expected loss; effective duration, convexity, DV01;
// every rejected row; the caution.
// With request.model set the report shows the model (tables named by `model`, or "built-in" /
// "custom" without it) and the scenario in place of the pool-wide curves, and values on
// result.curve (the scenario's shock applied).
std::string price_text(const TapeRead& tape, const YieldCurve& curve, const BidRequest& request,
                       const BidResult& result, const ModelNote* model = nullptr);
// {"file", "cutoff_date", "settlement_date", "payment_delay_days", "curve", "assumptions",
//  "target", "bid", "loss_adjusted", "no_loss", "credit", "risk", "loans_priced", "rejected",
//  "caution"}; rates and spreads as decimals, prices in percent, money in dollars, unrounded.
// With request.model set, "model" follows "assumptions" (which then holds only "advancing").
std::string price_json(const TapeRead& tape, const YieldCurve& curve, const BidRequest& request,
                       const BidResult& result, const ModelNote* model = nullptr);
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

// ---- Model explanation --------------------------------------------------------------------------
// What a report says about a loan-level model run (report/explain_report.cpp): the cash-flow and
// price reports take one (null = pool-wide assumption curves) and then show the model, the
// scenario and, with --explain, one loan's explanation, in place of the pool-wide curves.
struct Scenario;
struct LoanExplanation;
struct ModelNote {
  std::string tables = "built-in";     // "built-in" or the model file
  std::string scenarios = "built-in";  // "built-in" or the scenarios file
  const Scenario* scenario = nullptr;  // the scenario run; not null
  const LoanExplanation* explanation = nullptr;  // --explain LOAN_ID, or null
};
// "Model: loan-level (built-in tables), scenario base: house prices +3% a year; rates unmoved;
// prepayment x1, default x1".
std::string model_line(const ModelNote& note);
// Why the model treats a loan as it does: each factor's value, band and multipliers, the property
// value and updated LTV, month-1 default, prepayment and severity, delinquency roll. Rates in
// percent in the text; the JSON object has decimals, keys documented in the README.
std::string explain_text(const LoanExplanation& explanation);
std::string explain_json(const LoanExplanation& explanation);  // one JSON object

// ---- Kick-outs ----------------------------------------------------------------------------------
// `poolbid price --kickouts` (report/kickout_report.cpp). Keys, columns and units are documented in
// the README ("Kick-outs") and are a public interface.
struct KickoutResult;

// The price report of the whole pool (price_text on result.whole) with a kick-out section before
// the rejected rows: the credit box, the decision economics (margin, bad-loan loss, break-even
// default probability), loans and UPB by reason, the bid with and without the kicked-out loans,
// and the first `list_limit` kicked-out loans in tape order with their reasons (the rest counted;
// every loan is in the JSON and the CSV). `model` as for price_text.
std::string price_kickouts_text(const TapeRead& tape, const YieldCurve& curve,
                                const BidRequest& request, const KickoutResult& result,
                                const ModelNote* model = nullptr, std::size_t list_limit = 25);
// price_json on result.whole with "kickouts" before "rejected": {"box" (reads back as a credit box
// file), "box_source", "economics", "counts", "without", "kicked" (every kicked-out loan)}.
std::string price_kickouts_json(const TapeRead& tape, const YieldCurve& curve,
                                const BidRequest& request, const KickoutResult& result,
                                const ModelNote* model = nullptr);
// Every loan's decision, one line per loan in tape order (loan ids and seller names quoted as
// RFC 4180 says when needed; reasons joined by "; ").
std::string kickouts_csv(const LoanArrays& loans, const KickoutResult& result);
void write_kickouts_csv(std::ostream& out, const LoanArrays& loans, const KickoutResult& result);
inline constexpr std::string_view kKickoutsCsvHeader =
    "loan_id,row,seller,cutoff_balance,decision,outside_box,below_price,above_break_even,value,"
    "value_price,allocated,allocated_price,default_pct,severity_pct,severity_modelled,"
    "break_even_pct,expected_loss,loss_pct,reasons";

// ---- Seller comparison and outcome matrix -------------------------------------------------------
// `poolbid compare` and `poolbid matrix` (report/compare_report.cpp, report/matrix_report.cpp).
// `tapes[k]` is the tape read for pool k of the comparison or matrix (same order); `model_source`
// names the model file, "" for the built-in illustrative model. Keys, columns and units are
// documented in the README. Units as in `poolbid price`: JSON rates and spreads decimals, prices
// percent of cut-off UPB, money dollars, keys ending in _pct percent, _bp basis points.
struct Comparison;
struct OutcomeMatrix;
struct Scenario;

// Text: the target, curve, model and scenario; the pools' strats side by side (one column per
// pool); modelled defaults, severity, loss, WAL and the price at the target; yield and spreads at
// the common price; for each later pool, the attribution of its price gap to the first pool by
// underwriting factor (points and dollars on that pool's balance; positive = the first pool worth
// more) and which pool comes out ahead and why; every rejected row; the caution.
std::string compare_text(std::span<const TapeRead* const> tapes, const YieldCurve& curve,
                         const BidRequest& request, const Comparison& comparison,
                         std::string_view model_source = "");
// {"cutoff_date", "settlement_date", "payment_delay_days", "curve", "model", "advancing",
//  "scenario", "target", "common_price", "pools", "attribution", "caution"}.
std::string compare_json(std::span<const TapeRead* const> tapes, const YieldCurve& curve,
                         const BidRequest& request, const Comparison& comparison,
                         std::string_view model_source = "");
// Text: the target, curve, model, common price and scenarios, then one table with a row per pool
// and scenario: lifetime defaults, loss and severity, price at the target, WAL, and loss-adjusted
// yield and Z-spread at the common price; every rejected row; the caution. `scenarios` are the
// matrix's, in its order.
std::string matrix_text(std::span<const TapeRead* const> tapes, std::span<const Scenario> scenarios,
                        const YieldCurve& curve, const BidRequest& request,
                        const OutcomeMatrix& matrix, std::string_view model_source = "");
// {"cutoff_date", "settlement_date", "payment_delay_days", "curve", "model", "advancing",
//  "target", "common_price", "pools", "scenarios", "cells", "caution"}.
std::string matrix_json(std::span<const TapeRead* const> tapes, std::span<const Scenario> scenarios,
                        const YieldCurve& curve, const BidRequest& request,
                        const OutcomeMatrix& matrix, std::string_view model_source = "");

// ---- Shock repricing ----------------------------------------------------------------------------
// `poolbid shock` (report/shock_report.cpp): a held pool repriced after a shock. `curve` is the
// curve as given (each scenario's rate shock moves it); `model` names the tables and scenario set
// (its scenario and explanation are not read: the request holds both scenarios). Keys, columns
// and units are documented in the README and are a public interface; units as in `poolbid price`.
struct ShockRequest;
struct ShockResult;

// Text: the tape, dates, curve, model, held price, both scenarios; a before / after / change table
// (clean price, clean and dirty value, Z-spread, yield, WAL, effective duration, lifetime defaults,
// severity, expected loss); the P&L in dollars and points and the change in expected loss; every
// rejected row; the caution.
std::string shock_text(const TapeRead& tape, const YieldCurve& curve, const ShockRequest& request,
                       const ShockResult& result, const ModelNote& model);
// {"file", "cutoff_date", "settlement_date", "payment_delay_days", "curve", "model", "advancing",
//  "held_price", "base_scenario", "shocked_scenario", "before", "after", "pnl",
//  "expected_loss_change", "loans_priced", "rejected", "caution"}.
std::string shock_json(const TapeRead& tape, const YieldCurve& curve, const ShockRequest& request,
                       const ShockResult& result, const ModelNote& model);
// Each loan's value before and after the shock and its P&L, one line per loan in tape order (needs
// result.loan_pnl). value_before / value_after: the loan's cash discounted at its view's pool
// cash-flow yield (dollars; each column adds up to that view's dirty value); pnl = value_after -
// value_before; price_before / price_after = value / cutoff_balance x 100.
std::string shock_loans_csv(const LoanArrays& loans, const ShockResult& result);
void write_shock_loans_csv(std::ostream& out, const LoanArrays& loans, const ShockResult& result);
inline constexpr std::string_view kShockLoansCsvHeader =
    "loan_id,row,seller,cutoff_balance,value_before,value_after,pnl,price_before,price_after,"
    "expected_loss_before,expected_loss_after";

}  // namespace poolbid
