// Cash-flow projection: every loan's monthly flows under the assumption curves (DESIGN.md
// section 4), summed to a pool table in a fixed order, so results are bit-identical for any thread count.
// Loans are read as structure-of-arrays and projected in blocks: months outer, loans inner.
// project_pool is safe to call from several threads at once; it starts its own worker threads.
#pragma once

#include <cstdint>
#include <string>
#include <string_view>
#include <span>
#include <vector>

#include "curves/curves.h"
#include "tape/tape.h"

namespace poolbid {

// A listed loan's note rate from projection month `month` on (until its next change).
struct CouponChange {
  std::int32_t month = 1;  // projection month, >= 1
  Rate rate = 0;           // decimal per year, >= the loan's servicing fee
};

// Note rates for loans whose coupon changes (ARMs), as changes. A loan not listed keeps its note
// rate; a listed loan keeps its note rate until its first change. The level payment re-amortises
// whenever a change moves the rate.
struct CouponPaths {
  std::vector<std::uint32_t> loans;    // loan indexes into LoanArrays, strictly ascending
  std::vector<std::uint32_t> begin;    // loans[k]'s changes are changes[begin[k] .. begin[k + 1]);
                                       // loans.size() + 1 entries (or empty when no loans)
  std::vector<CouponChange> changes;   // months strictly ascending within each loan
};

// Month-by-month rates (rates[k * months + t - 1] for loans[k], month t; later months keep the
// last) as changes: month 1, then every month whose rate differs from the month before.
// Throws std::invalid_argument unless months >= 1 and rates.size() == loans.size() x months.
CouponPaths coupon_changes(std::vector<std::uint32_t> loans, int months,
                           std::span<const Rate> rates);

// Coupon paths for every ARM on the tape (amortization == arm), from projected index rates:
// at each reset -- loan month arm_first_reset, then every arm_reset_period months, counted from
// the first payment, so projection month t is loan month age + t -- the rate becomes index +
// margin (the index read in that collection month), moved at most arm_periodic_cap from the
// previous rate (no limit if not given), then held within [floor, lifetime cap]. A floor not given
// is the margin (common practice); a lifetime cap not given is no cap. Between resets the rate
// holds, and never falls below the loan's servicing fee. Resets run through month `index.months`
// (the rate then holds). Rates are not rounded. Every ARM is listed; its changes are the resets
// that move its rate, plus a month-1 change only when the servicing fee lifts the note rate (no
// month-1 entry at the note rate). Throws std::invalid_argument naming the loan and the index if
// an ARM's index is not in `index.names`.
CouponPaths arm_coupon_paths(const LoanArrays& loans, const IndexPaths& index);
// The same with index rates projected from a yield curve (curves' index_paths) for every index the
// tape's ARMs name, over `months` projection months from `cutoff`. Throws CurveError for an index
// the curve does not define.
CouponPaths arm_coupon_paths(const LoanArrays& loans, const YieldCurve& curve, Date cutoff,
                             int months);
// ---- The loan-level model in a projection (DESIGN.md section 7) ---------------------------------
// Underwriting factors the model reads. Attribution reads a factor "neutral": score, DTI,
// documentation, occupancy, purpose and property type at multiplier 1; LTV at the reference
// (multipliers 1, property value = balance / CreditModel::assumed_ltv, no junior lien);
// delinquency as current.
enum class Factor : std::uint8_t {
  score, ltv, dti, documentation, occupancy, purpose, property_type, delinquency, count_
};
inline constexpr std::size_t kFactorCount = static_cast<std::size_t>(Factor::count_);
std::string_view to_string(Factor f);  // "score", "ltv", ...
using FactorSet = std::uint32_t;        // bit (1 << Factor) set = read neutral
inline constexpr FactorSet factor_bit(Factor f) { return FactorSet{1} << static_cast<int>(f); }

// Everything a projection needs to run the model: the tables, the scenario's economy and the
// market mortgage rate on the (already shocked) yield curve. Build with model_run.
struct ModelRun {
  const CreditModel* model = nullptr;      // must outlive the run
  std::string scenario;                    // name, for reports
  std::vector<double> house_price_index;   // [t], t = 0 .. months
  std::vector<Rate> mortgage_rate;         // [t - 1] = month t, t = 1 .. months
  double prepay_multiplier = 1.0, default_multiplier = 1.0;
  FactorSet neutral = 0;
  int months = 0;                          // months covered (>= any projection's horizon)
};
// `curve` is the curve the scenario's economy runs on (the caller applies the scenario's rate
// shock). `months` is usually projection_horizon(loans, assumptions, model).
ModelRun model_run(const CreditModel& model, const Scenario& scenario, const YieldCurve& curve,
                   Date cutoff, int months, FactorSet neutral = 0);

// Why the model treats a loan as it does: each factor's band and multipliers, the property value,
// updated LTV, timeline, severity if it defaulted in month 1, and month-1 prepayment parts.
struct FactorLine {
  std::string factor;     // "score", "ltv", "dti", ..., "scenario"
  std::string value;      // the tape's value as read ("712", "83.5%", "limited")
  std::string band;       // "700-739", or the category
  double default_multiplier = 1.0;
  double prepay_multiplier = 1.0;  // refinance (score, LTV) or 1
};
struct LoanExplanation {
  std::string loan_id;
  std::uint32_t row = 0;
  std::vector<FactorLine> factors;
  double property_value = 0;       // at cut-off, dollars
  double junior_liens = 0;         // dollars
  double updated_ltv = 0;          // at cut-off, decimal
  int timeline_months = 0;         // liquidation lag
  double default_multiplier = 1.0; // product, scenario included
  double base_cdr_month1 = 0, cdr_month1 = 0;  // decimals, annual
  double incentive_month1 = 0;     // note rate less market mortgage rate, decimal
  double turnover_cpr_month1 = 0, refi_cpr_month1 = 0, cpr_month1 = 0;
  double severity_month1 = 0;      // if it defaulted in month 1, lost interest included
  std::string delinquency;         // "current", "60", ...; roll share and months if any
  double roll_share = 0;
  int roll_months = 0;
};
// Throws std::out_of_range if `index` >= loans.size().
LoanExplanation explain_loan(const LoanArrays& loans, std::size_t index, const ModelRun& run);

// Months a projection of these loans can run: the longest remaining term plus the liquidation lag
// (with the model, the longest state timeline), plus one. Coupon paths and discount factors that
// cover this many months cover every loan.
int projection_horizon(const LoanArrays& loans, const Assumptions& assumptions,
                       const ModelRun* model = nullptr);

struct ProjectionOptions {
  // Worker threads; 0 = every core. Results do not depend on it.
  unsigned threads = 0;
  // Fill Projection::loans with one row of lifetime totals per loan (13 numbers a loan; slower).
  bool loan_totals = false;
  // Discount factor for the cash of each projection month (index t = month t; [0] unused). If
  // given and loan_totals is set, each loan's present value is filled. It must cover the longest
  // loan's final month plus Assumptions::lag_months, else std::invalid_argument.
  std::span<const double> discount;
  // Coupon paths for rate-changing loans; null = every loan keeps its note rate.
  const CouponPaths* coupons = nullptr;
  // The loan-level model: when set, each loan's SMM, MDR, severity and liquidation lag come from
  // it, and Assumptions' prepay, default, severity, lag_months and delinquent_default are not
  // read (advancing still is). Its months must cover projection_horizon(..., model).
  const ModelRun* model = nullptr;
  // With the model: defaults off (the no-loss view), prepayment as modelled.
  bool no_defaults = false;
};

// The pool by month. Vectors have `months` entries, [0] = month 1. Dollars unless noted.
struct PoolFlows {
  int months = 0;                      // through the last month with any cash or liquidation
  double cutoff_balance = 0;           // sum of current balances projected
  std::vector<double> begin_balance;   // performing balance at the start of the month
  std::vector<double> sched_principal;
  std::vector<double> prepayment;
  std::vector<double> defaults;        // balance defaulting this month (leaves begin_balance)
  std::vector<double> loss;            // liquidated this month: defaulted balance not recovered
  std::vector<double> recovery;        // liquidated this month: cash recovered
  std::vector<double> gross_interest;  // note rate on the performing balance
  std::vector<double> servicing;       // servicing fee on the performing balance
  // Net interest paid to the investor: borrowers' (gross less servicing) plus, with advancing,
  // interest advanced on defaulted loans awaiting liquidation (`advanced_interest`).
  std::vector<double> net_interest;
  std::vector<double> advanced_interest;
  std::vector<double> total_principal;  // sched_principal + prepayment + recovery
  std::vector<double> cash_flow;        // net_interest + total_principal
  std::vector<double> end_balance;      // performing balance at the end of the month
  // Pool speeds actually realised: smm = prepayment / (begin - defaults - sched_principal),
  // mdr = defaults / begin (decimals); cpr and cdr their annual equivalents in percent.
  std::vector<double> smm, mdr, cpr, cdr;
  std::vector<double> cum_loss_pct;     // cumulative loss, percent of cutoff_balance
};

// Lifetime totals per loan, the same index as LoanArrays. Dollars unless noted.
struct LoanFlows {
  std::vector<double> sched_principal, prepayment, defaults, loss, recovery;
  std::vector<double> gross_interest, servicing, net_interest, advanced_interest, cash_flow;
  std::vector<double> wal_years;       // sum (t/12) principal_t / sum principal_t; 0 if none
  std::vector<double> present_value;   // sum cash_t x discount_t; empty without discount factors
  std::vector<std::int32_t> last_month;  // last month the investor gets cash; 0 if none
  std::size_t size() const { return cash_flow.size(); }
};

struct Projection {
  PoolFlows pool;
  LoanFlows loans;  // empty unless ProjectionOptions::loan_totals
};

// Projects every loan from its cut-off balance to maturity (or its balloon month), defaults off the
// beginning balance, level payment on the performing balance, prepayment SMM x (performing less
// scheduled principal), liquidation `lag_months` after default. Loans the tape marks 90+ days
// delinquent or in foreclosure default in month 1 when Assumptions::delinquent_default is set.
Projection project_pool(const LoanArrays& loans, const Assumptions& assumptions,
                        const ProjectionOptions& options = {});

}  // namespace poolbid
