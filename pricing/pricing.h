// Pricing: values projected pool cash on a yield curve (DESIGN.md sections 5 and 6) -- payment
// grid, price from yield or Z-spread and back, WAL, durations, convexity, DV01 -- and prices a pool
// for a bid target, with the loss-adjusted and no-loss views side by side.
#pragma once

#include <limits>
#include <optional>
#include <span>
#include <stdexcept>
#include <string>
#include <vector>

#include "cashflow/cashflow.h"
#include "curves/curves.h"

namespace poolbid {

// ---- Settlement and the payment grid ------------------------------------------------------------
struct Settlement {
  Date cutoff{};        // balances are as of it; the first day of a month
  Date settle{};        // the buyer pays; >= cutoff and >= the curve's as_of
  int delay_days = 17;  // collection month t pays on the first of month t + 1 plus this
};

// What valuation needs for each month t of a pool's cash ([t - 1] = month t), sampled once.
struct PaymentGrid {
  int months = 0;
  std::vector<Date> pay_date;        // payment_date(cutoff, t, delay)
  std::vector<double> years_30_360;  // settle -> pay, 30/360 bond basis (cash-flow yield)
  std::vector<double> years_365;     // settle -> pay, Actual/365 Fixed (Z-spread)
  std::vector<double> discount;      // the curve's DF(pay) / DF(settle)
};
// Throws std::invalid_argument if the cut-off is not the first of a month, settle < cutoff,
// settle < curve.as_of, settle is on or after the first payment date, or delay or months < 0.
PaymentGrid payment_grid(const YieldCurve& curve, const Settlement& settlement, int months);

// ---- Measures on one cash vector: cash[t - 1] = dollars paid for month t --------------------------
// Present value at settlement at a monthly-compounded cash-flow yield (decimal):
// sum cash_t (1 + cfy / 12)^(-12 tau_t), tau the 30/360 years from settlement to payment.
double pv_at_yield(std::span<const double> cash, const PaymentGrid& grid, Rate cfy);
// Present value at settlement with z (decimal) added to the curve's continuous zero rates:
// sum cash_t DF_t exp(-z T_t), T the Actual/365 Fixed years from settlement to payment.
double pv_at_spread(std::span<const double> cash, const PaymentGrid& grid, double z);
// The cash-flow yield or Z-spread at which the cash is worth `pv`, solved with QuantLib's Brent
// solver to 1e-12; nullopt when none exists (no positive cash, pv <= 0, or no root between -99%
// and +100% a year).
std::optional<Rate> yield_for_pv(std::span<const double> cash, const PaymentGrid& grid, double pv);
std::optional<double> spread_for_pv(std::span<const double> cash, const PaymentGrid& grid,
                                    double pv);
// Bond-equivalent yield from the monthly cash-flow yield: 2[(1 + cfy/12)^6 - 1]; and back.
Rate bey_from_cfy(Rate cfy);
Rate cfy_from_bey(Rate bey);
// -(1/P) dP/dy at the cash-flow yield (years); 0 when the cash is worth nothing.
// Every measure throws std::invalid_argument when `cash` has more months than the grid.
double modified_duration(std::span<const double> cash, const PaymentGrid& grid, Rate cfy);
// sum (t/12) principal_t / sum principal_t, principal = scheduled + prepaid + recovered; 0 if none.
double wal_years(const PoolFlows& pool);
// balance x net rate x days30/360(cutoff -> settle) / 360, bond basis.
double accrued_interest(double balance, Rate net_rate, Date cutoff, Date settle);

// ---- The bid ------------------------------------------------------------------------------------
enum class BidTarget : std::uint8_t {
  yield,   // value = loss-adjusted bond-equivalent yield, decimal
  spread,  // value = loss-adjusted Z-spread, decimal (0.0125 = 125 bp)
  price,   // value = clean price, percent of the cut-off balance (98.5)
};

struct BidRequest {
  BidTarget target = BidTarget::yield;
  double value = 0;
  Settlement settlement;
  Assumptions assumptions;   // the loss-adjusted view; the no-loss view turns defaults off
  double shock_bp = 25;      // effective duration and convexity: curve +/- this, flows re-projected
  // Key-rate durations at these tenors (years, ascending; empty = none): each tenor's zero rates
  // moved +/- shock_bp as a triangle falling to zero at the neighbouring tenors (flat before the
  // first and after the last, so the key-rate durations add up to the effective duration).
  std::vector<double> key_rate_years = {2, 5, 10, 30};
  unsigned threads = 0;      // 0 = every core; results do not depend on it
  bool loan_values = false;  // value every loan at the pool's loss-adjusted yield
  // The loan-level model (null = the assumptions' pool-wide curves). With it, the scenario's rate
  // shock moves the curve before anything is projected or discounted (BidResult::curve), every
  // loan is re-projected for effective and key-rate durations (prepayment reads rates), and the
  // assumptions' advancing is the only field read.
  const CreditModel* model = nullptr;
  Scenario scenario;         // with a model: house prices, rate shock, multipliers
  FactorSet neutral = 0;     // with a model: factors read neutral (attribution)
  bool risk = true;          // effective duration, convexity, DV01, key-rate durations
};

// The pool's cash under one set of assumptions, read at the bid price.
struct PoolView {
  Rate cfy = 0;              // monthly cash-flow yield
  Rate bey = 0;              // bond-equivalent yield
  double z_spread = 0;       // over the curve, decimal
  double wal_years = 0;
  Rate par_yield_at_wal = 0; // the curve's semiannual par yield at the WAL
  double spread_at_wal = 0;  // bey - par_yield_at_wal, decimal
  double modified_duration = 0;
};

struct BidResult {
  double cutoff_balance = 0;     // dollars, the loans priced
  Rate net_coupon = 0;           // balance-weighted note rate less servicing fee
  double accrued = 0;            // dollars, cut-off to settlement
  double clean_price = 0;        // percent of cutoff_balance
  double dirty_price = 0;
  double clean_value = 0;        // dollars
  double dirty_value = 0;
  PoolView loss_adjusted;        // assumptions as given
  PoolView no_loss;              // defaults off (and no delinquent roll to default)
  double credit_cost_bp = 0;     // (no_loss.z_spread - loss_adjusted.z_spread) in bp
  double expected_loss = 0;      // dollars, lifetime, loss-adjusted flows
  double expected_loss_pct = 0;  // percent of cutoff_balance
  double effective_duration = 0; // curve +/- shock_bp, flows re-projected, Z-spread held
  double effective_convexity = 0;
  double dv01 = 0;               // dollars per 1 bp fall in the curve
  struct KeyRateDuration {
    double years = 0;
    double duration = 0;
  };
  std::vector<KeyRateDuration> key_rate_durations;  // one per BidRequest::key_rate_years
  std::size_t arm_loans = 0;     // loans on coupon paths from the curve's index forwards
  std::string scenario;          // with a model: the scenario's name; "" otherwise
  YieldCurve curve;              // the curve valued on: the given one moved by the scenario's shock
  double cum_default_pct = 0;    // lifetime defaults, percent of cutoff_balance
  double severity_pct = 0;       // lifetime loss / lifetime defaults, percent (0 if none)
  Projection flows;              // loss-adjusted; with loan totals (present_value at the pool's
                                 // cash-flow yield) when BidRequest::loan_values
  PoolFlows no_loss_flows;
  // With BidRequest::loan_values: each loan's no-loss cash valued at the pool's loss-adjusted
  // cash-flow yield, dollars (tape order); empty otherwise.
  std::vector<double> no_loss_loan_values;
};

// Projects the pool under the request's assumptions (ARMs on coupon paths from the curve), solves
// the price for the target and reads every measure at that price. Throws PricingError when the
// target cannot be met or a measure has no solution (the message says which and why),
// std::invalid_argument for a bad settlement, CurveError for an ARM index the curve lacks.
BidResult price_pool(const LoanArrays& loans, const YieldCurve& curve, const BidRequest& request);

struct PricingError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

// ---- Kick-outs and decision analysis (DESIGN.md section 6) ---------------------------------------
// pricing/kickouts.cpp. A buyer screens a seller's loans with a credit box, values each loan at
// the bid, weighs the cost of each decision, kicks out the loans it will not buy and bids again.

// A buyer's credit box: the loans it will buy. A limit not set and an empty list screen nothing.
// Ratios are decimals (0.95 = 95%); categories are the tape's values, states USPS codes.
struct CreditBox {
  std::string source = "default";  // the file it came from, or "default"; for reports
  std::string description;
  std::optional<double> min_score;
  std::optional<double> max_ltv, max_cltv, max_dti;  // original LTV, combined LTV, DTI
  std::vector<Documentation> documentation;           // allowed; empty = any
  std::vector<Occupancy> occupancy;
  std::vector<PropertyType> property_types;
  std::vector<std::uint8_t> states;                   // state_index() codes
  // A loan missing a field the box screens on (no score, `unknown` documentation, no state, ...)
  // is inside (true) or outside with the reason "score not on the tape" (false).
  bool missing_inside = false;
  bool operator==(const CreditBox&) const = default;
};

// The illustrative buyer box (demo-pools/credit-box.json holds the same): score >= 620,
// LTV <= 95%, CLTV <= 100%, DTI <= 50%, full or limited documentation, any occupancy, every
// property type but manufactured, any state; a loan missing a screened field is outside.
CreditBox default_credit_box();

// The credit box file (JSON, our format; README "Kick-outs"), LTV, CLTV and DTI in percent:
//   {"description": "...", "min_score": 620, "max_ltv": 95, "max_cltv": 100, "max_dti": 50,
//    "documentation": ["full", "limited"], "occupancy": ["owner"], "property_types": [...],
//    "states": ["CA", "TX"], "missing_fields": "outside"}
// A key left out (or null) screens nothing. Unknown and duplicate keys and bad values throw
// AssumptionError naming the file, the key ("states[2]") and the value.
CreditBox load_credit_box(const std::string& path);
CreditBox parse_credit_box(std::string_view json_text, std::string_view source_name);

// The box's screens, in the order reasons are given.
enum class BoxScreen : std::uint8_t {
  score, ltv, cltv, dti, documentation, occupancy, property_type, state, count_
};
inline constexpr std::size_t kBoxScreenCount = static_cast<std::size_t>(BoxScreen::count_);
std::string_view to_string(BoxScreen s);  // "score", "LTV", "CLTV", "DTI", "property type", ...

// Why loan i is outside the box, one short reason per screen it fails ("score 598 below 620",
// "LTV 97.0% above 95.0%", "documentation none not allowed", "DTI not on the tape"); empty when
// inside. Throws std::out_of_range if i >= loans.size().
std::vector<std::string> box_reasons(const CreditBox& box, const LoanArrays& loans,
                                     std::size_t i);

// What each decision costs, decimals of the loan's balance (illustrative defaults).
struct DecisionEconomics {
  double margin = 0.05;         // declining a loan that would have paid: its margin, a few points
  double bad_loan_loss = 0.50;  // approving a loan that defaults: about half its balance
};
// p* = margin / (margin + loss): above this lifetime default probability a loan's expected loss
// exceeds the margin expected from it. Throws std::invalid_argument unless both are finite and
// >= 0 with a positive sum.
double break_even_default_probability(double margin, double loss);

// One loan's decision, read from the whole pool's bid.
struct LoanDecision {
  double default_probability = 0;  // lifetime defaults / cut-off balance
  double expected_loss = 0;        // dollars, lifetime
  double expected_loss_pct = 0;    // percent of the cut-off balance
  double value = 0;                // dollars: its cash at the pool's loss-adjusted yield
  double value_price = 0;          // value per 100 of balance
  double allocated = 0;            // dollars: the bid's dirty value x the loan's share of the
                                   // pool's no-loss value (coupon and term priced, credit not)
  double allocated_price = 0;      // allocated per 100 of balance
  double severity = 0;             // loss / defaults if it defaults, else bad_loan_loss
  bool modelled_severity = false;  // severity from its own defaults
  double break_even = 0;           // its p* at `severity`
  std::uint16_t box_screens = 0;   // bit (1 << BoxScreen) for each screen failed
  std::vector<std::string> box_reasons;
  bool outside_box = false;
  bool below_price = false;        // value below allocated
  bool above_break_even = false;   // default_probability above break_even
  bool kicked() const { return outside_box || below_price || above_break_even; }
};

struct KickoutTally {
  std::size_t loans = 0;
  double upb = 0;  // dollars, cut-off balance
};

struct KickoutResult {
  CreditBox box;
  DecisionEconomics economics;
  double break_even = 0;            // p* at economics.bad_loan_loss
  BidResult whole;                  // every loan, with loan values
  std::vector<LoanDecision> loans;  // one per loan, tape order
  std::vector<std::uint32_t> kept, kicked;  // loan indexes, ascending; together every loan once
  KickoutTally outside_box, below_price, above_break_even;  // a loan may be in several
  std::vector<KickoutTally> by_screen;  // kBoxScreenCount entries: loans failing each screen
  KickoutTally kicked_total, kept_total;
  // The kept loans priced at the same target with the request as given; none when no loan or
  // every loan is kicked.
  std::optional<BidResult> without;
};

// Prices every loan (loan values on), decides each loan (outside the box, value below its
// allocated price -- the bid's dirty value shared out by no-loss value at the pool's yield, so a
// loan's coupon and term are paid for and only its credit can put it below --, or lifetime
// default probability above its break-even), then prices the kept loans at the same target. A value counts as below when it
// is under the allocation by more than 1e-9 of the balance (rounding). Throws what price_pool
// throws, and std::invalid_argument for bad economics.
KickoutResult price_with_kickouts(const LoanArrays& loans, const YieldCurve& curve,
                                  const BidRequest& request, const CreditBox& box,
                                  const DecisionEconomics& economics = {});

// ---- Seller comparison, attribution and the outcome matrix --------------------------------------
// Pools set side by side under one model, one curve and one target (pricing/compare.cpp,
// pricing/matrix.cpp). Every run is price_pool with the request as given, except as noted.

// A pool to compare: a name for reports (the tape, the seller) and its accepted loans.
struct NamedPool {
  std::string name;
  const LoanArrays* loans = nullptr;  // not null; must outlive the call
};

// A pool's measures read at a price other than its own bid: the loss-adjusted and no-loss views of
// its flows at that clean price (percent of its cut-off balance; its own accrued interest added).
// A measure with no solution at that price is NaN (PoolView fields) and `solved` false.
struct PoolAtPrice {
  double clean_price = 0;        // percent of cutoff_balance
  double dirty_value = 0;        // dollars
  PoolView loss_adjusted;
  PoolView no_loss;
  double credit_cost_bp = 0;     // no-loss Z-spread less loss-adjusted, bp
  bool solved = true;
};

// One line of the attribution of a price gap between the first pool (A) and a later one (B), in
// points of clean price at the common target. Positive = A is worth more because of it.
struct AttributionLine {
  std::string label;             // to_string(factor), "collateral and terms", "interaction"
  std::optional<Factor> factor;  // none for the last two lines
  double points = 0;             // percent of cut-off balance
  double dollars = 0;            // points / 100 x pool B's cut-off balance
};

// Gap = P_A - P_B at the common target (clean, percent). For each factor f,
// line_f = [P_A - P_A(f neutral)] - [P_B - P_B(f neutral)]; collateral and terms =
// P_A(every factor neutral) - P_B(every factor neutral) (coupon, term, balance, state timelines:
// the gap with credit read the same); interaction = gap - collateral - sum of factor lines, so
// the lines add up to the gap exactly.
struct Attribution {
  std::size_t pool = 1;           // index of pool B in the comparison; A is pool 0
  double gap_points = 0;
  double gap_dollars = 0;         // gap_points / 100 x pool B's cut-off balance
  std::vector<AttributionLine> lines;  // factors in Factor order, then collateral, interaction
};

struct ComparedPool {
  std::string name;
  BidResult bid;                  // at the common target (the request as given)
  double cum_default_pct = 0;     // lifetime defaults, percent of cut-off balance
  double severity_pct = 0;        // lifetime loss / lifetime defaults, percent
  double cum_loss_pct = 0;        // lifetime loss, percent of cut-off balance
  double wal_years = 0;           // loss-adjusted
  PoolAtPrice at_common_price;
  // Clean price at the common target with one factor read neutral ([f] for Factor f), and with
  // every factor neutral; empty / NaN when attribution was not asked for.
  std::vector<double> neutral_price;
  double all_neutral_price = std::numeric_limits<double>::quiet_NaN();
};

struct CompareOptions {
  // Clean price (percent) at which every pool's spread and yield are read; none = the first
  // pool's price at the target.
  std::optional<double> common_price;
  bool attribution = true;        // the factor-neutral runs (9 more pricings per pool)
};

struct Comparison {
  double common_price = 0;        // clean, percent, as used
  bool price_given = false;       // common price from the options (else the first pool's)
  std::vector<ComparedPool> pools;      // in the order given
  std::vector<Attribution> attributions;  // one per later pool, in order (none without)
};

// Prices every pool at the request's target (yield or Z-spread; a price target is refused) under
// the request's model and scenario, reads each at the common price, and attributes each later
// pool's gap to the first by underwriting factor. Needs request.model (std::invalid_argument
// otherwise, and for fewer than one pool or a null LoanArrays). Attribution runs use risk = false.
// Throws what price_pool throws.
Comparison compare_pools(std::span<const NamedPool> pools, const YieldCurve& curve,
                         const BidRequest& request, const CompareOptions& options = {});

// The pool's measures at clean price `clean_price` from its BidResult's flows, on the curve it was
// valued on (BidResult::curve: with a model, moved by the scenario's shock). No re-projection.
PoolAtPrice read_at_price(const BidResult& bid, const Settlement& settlement, double clean_price);

// Every pool under every scenario: lifetime defaults and loss, the price at the target, WAL, and
// the loss-adjusted yield and Z-spread (over the scenario's curve) at one common clean price.
struct MatrixCell {
  double cum_default_pct = 0;     // percent of cut-off balance
  double cum_loss_pct = 0;        // percent of cut-off balance
  double severity_pct = 0;        // loss / defaults, percent (0 if none)
  double clean_price = 0;         // at the target, percent
  double wal_years = 0;           // loss-adjusted
  PoolAtPrice at_common_price;
};

struct MatrixOptions {
  // Clean price (percent) for the spread columns; none = the first pool's price in the scenario
  // named "base", or in the first scenario when none is called that.
  std::optional<double> common_price;
};

struct OutcomeMatrix {
  std::vector<std::string> pools;      // names, in the order given
  std::vector<std::string> scenarios;  // names, in the order given
  double common_price = 0;             // as used
  std::size_t price_scenario = 0;      // the scenario the default common price came from
  bool price_given = false;            // common price from the options
  std::vector<MatrixCell> cells;       // pool-major: cells[pool x scenarios.size() + scenario]
  const MatrixCell& at(std::size_t pool, std::size_t scenario) const {
    return cells[pool * scenarios.size() + scenario];
  }
};

// Runs price_pool (risk off, the request otherwise as given, its scenario replaced by each of
// `scenarios`) for every pool and scenario. Needs request.model and at least one pool and one
// scenario (std::invalid_argument); a price target is refused. Throws what price_pool throws.
OutcomeMatrix outcome_matrix(std::span<const NamedPool> pools, std::span<const Scenario> scenarios,
                             const YieldCurve& curve, const BidRequest& request,
                             const MatrixOptions& options = {});

// ---- Repricing a held pool after a shock --------------------------------------------------------
// pricing/shock.cpp. A risk desk holds a pool at a known clean price. Valued at that price under a
// base scenario, it has a loss-adjusted Z-spread; the shocked scenario (its house prices,
// multipliers and rate shock, which moves the curve) is then valued at that same Z-spread. The
// difference is the shock's P&L. Both views run the loan-level model.
struct ShockRequest {
  // The held pool: target price with value = the held clean price (percent of cut-off UPB), the
  // settlement, the model (not null) and the base scenario in `held.scenario`; advancing, shock_bp
  // (effective duration), key-rate tenors, threads and loan_values as price_pool reads them.
  BidRequest held;
  Scenario shocked;  // the scenario after the shock
};

struct ShockResult {
  BidResult before;  // under the base scenario at the held price
  BidResult after;   // under the shocked scenario at before.loss_adjusted.z_spread
  double pnl = 0;                   // after.clean_value - before.clean_value, dollars
  double pnl_points = 0;            // after.clean_price - before.clean_price, percent of UPB
  double expected_loss_change = 0;  // after.expected_loss - before.expected_loss, dollars
  double expected_loss_change_pct = 0;  // the same, percent of the cut-off UPB
  // With held.loan_values: each loan's value after less its value before (dollars, tape order;
  // each value at its own view's pool cash-flow yield, so the entries add up to `pnl`, the
  // accrued interest being the same on both sides).
  std::vector<double> loan_pnl;
};

// Throws std::invalid_argument unless held.model is set and held.target is BidTarget::price, and
// whatever price_pool throws (PricingError when the held price has no Z-spread).
ShockResult reprice_after_shock(const LoanArrays& loans, const YieldCurve& curve,
                                const ShockRequest& request);

}  // namespace poolbid
