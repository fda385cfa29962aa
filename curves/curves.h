// Curves: assumption curves for prepayment (CPR), default (CDR) and loss severity as functions of
// loan age or projection month -- constant, vector, ramp, PSA, SDA -- with their command-line text
// and JSON file; and the yield curve (bootstrapped by QuantLib from market quotes, or flat), its
// shifts, forwards for ARM indexes and the market mortgage rate, and the payment-date rule.
// Rates are decimals per year. Everything here is a plain value; the functions are pure and safe
// to call from any thread.
#pragma once

#include <chrono>
#include <cstdint>
#include <memory>
#include <span>
#include <stdexcept>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

namespace QuantLib {
class YieldTermStructure;
}

namespace poolbid {

using Date = std::chrono::year_month_day;  // as in tape/tape.h
using Rate = double;  // decimal per year: 0.065

// ---- Standard curves and rate conversions (DESIGN.md sections 2 and 3) --------------------------
// PSA 100%: CPR = 6% x min(1, age / 30); `multiple` 1.5 = 150 PSA.
Rate psa_cpr(double multiple, int age_months);
// SDA 100%: CDR 0.02% x age to 30, 0.60% to 60, down 0.0095% a month to 120, then 0.03%.
Rate sda_cdr(double multiple, int age_months);
// SMM = 1 - (1 - CPR)^(1/12), MDR the same from CDR; and back: CPR = 1 - (1 - SMM)^12.
double smm_from_cpr(Rate cpr);
Rate cpr_from_smm(double smm);
double mdr_from_cdr(Rate cdr);
Rate cdr_from_mdr(double mdr);

// ---- Assumption curves --------------------------------------------------------------------------
// Which month a curve reads: the loan's age (age at cut-off + projection month, so a loan 3 months
// old at cut-off reads month 4 in projection month 1) or the projection month (1 = the first month
// after cut-off, the same for every loan).
enum class CurveClock : std::uint8_t { loan_age, projection_month };

enum class CurveShape : std::uint8_t {
  constant,  // `value` every month
  vector,    // `values[k - 1]` in month k; the last value holds after the vector ends
  ramp,      // linear from `ramp_from` in month 1 to `ramp_to` in month `ramp_months`, then holds
  psa,       // psa_cpr(value, k): `value` is the multiple (1.5 = 150%)
  sda,       // sda_cdr(value, k): `value` is the multiple
};

// One assumption as a function of month k = 1, 2, ...: an annual rate (CPR, CDR) or, for severity,
// a share of the defaulted balance. All values decimals (0.08 = 8%).
struct SpeedCurve {
  CurveShape shape = CurveShape::constant;
  CurveClock clock = CurveClock::projection_month;
  double value = 0;              // constant: the rate or share; psa / sda: the multiple
  std::vector<double> values{};  // vector
  double ramp_from = 0;          // ramp
  double ramp_to = 0;
  int ramp_months = 1;

  bool operator==(const SpeedCurve&) const = default;
};

// Curve builders: one line per assumption in code and tests.
inline SpeedCurve constant_curve(double value,
                                 CurveClock clock = CurveClock::projection_month) {
  SpeedCurve curve;
  curve.clock = clock;
  curve.value = value;
  return curve;
}
inline SpeedCurve vector_curve(std::vector<double> values,
                               CurveClock clock = CurveClock::projection_month) {
  SpeedCurve curve;
  curve.shape = CurveShape::vector;
  curve.clock = clock;
  curve.values = std::move(values);
  return curve;
}
inline SpeedCurve ramp_curve(double from, double to, int months,
                             CurveClock clock = CurveClock::projection_month) {
  SpeedCurve curve;
  curve.shape = CurveShape::ramp;
  curve.clock = clock;
  curve.ramp_from = from;
  curve.ramp_to = to;
  curve.ramp_months = months;
  return curve;
}
// PSA or SDA at `multiple` (1.5 = 150%), read by loan age unless told otherwise.
inline SpeedCurve standard_curve(CurveShape psa_or_sda, double multiple,
                                 CurveClock clock = CurveClock::loan_age) {
  SpeedCurve curve;
  curve.shape = psa_or_sda;
  curve.clock = clock;
  curve.value = multiple;
  return curve;
}

// The curve's value in month k (k >= 1; k = 0 reads as month 1).
double curve_value(const SpeedCurve& curve, int month);

// The curve tabulated for the monthly loop: month k reads `by_month[min(k, hold)]`; by_month[0]
// repeats month 1. For CPR and CDR the table holds SMM / MDR (converted once, not per loan-month);
// for severity it holds the share itself.
struct MonthlyTable {
  std::vector<double> by_month;  // size hold + 1
  int hold = 1;                  // last month with its own value; later months read this one
  CurveClock clock = CurveClock::projection_month;
};
MonthlyTable monthly_rate_table(const SpeedCurve& annual_rate);  // SMM or MDR by month
MonthlyTable monthly_share_table(const SpeedCurve& share);       // severity by month

// ---- Assumptions for one projection -------------------------------------------------------------
// What the servicer advances on loans that have defaulted but are not yet liquidated.
enum class Advancing : std::uint8_t {
  none,      // nothing: the investor gets no interest on defaulted balance
  interest,  // net interest each month until liquidation, repaid from the liquidation proceeds
};

struct Assumptions {
  // Voluntary prepayment, CPR. Default none (0 CPR).
  SpeedCurve prepay{};
  // Default, CDR, applied to the beginning balance each month. Default none (0 CDR).
  SpeedCurve default_rate{};
  // Share of the defaulted balance lost at liquidation, read in the month of default.
  // Default 40% (illustrative: first-lien severities of 30-60% are commonly reported).
  SpeedCurve severity = constant_curve(0.40);
  // Months from default to liquidation; 0 = the same month. Default 12 (illustrative).
  int lag_months = 12;
  Advancing advancing = Advancing::none;
  // Loans 90+ days delinquent or in foreclosure at cut-off default in full in month 1.
  bool delinquent_default = false;
};

// ---- Text forms (command line) ------------------------------------------------------------------
// Speeds are annual percent, as the trade quotes them:
//   prepay:   cpr:8   psa:150   cpr:6,7,8,9 (vector)   cpr:2..8/24 (ramp 2% -> 8% over 24 months)
//   default:  cdr:1.5 sda:200   cdr:0.5,1,1.5           cdr:0..3/36
//   severity: 45      45,40,35  60..40/24               (percent of defaulted balance)
// A curve reads loan age or projection month: `@age` or `@month` after any form says which.
// PSA and SDA read loan age unless told otherwise; the other forms read the projection month.
// Throws AssumptionError (source = `option`, the text as value) on a bad form.
SpeedCurve parse_prepay(std::string_view text, std::string_view option = "--prepay");
SpeedCurve parse_default(std::string_view text, std::string_view option = "--default");
SpeedCurve parse_severity(std::string_view text, std::string_view option = "--severity");
int parse_lag(std::string_view text, std::string_view option = "--lag");
Advancing parse_advancing(std::string_view text, std::string_view option = "--advancing");

// The canonical text form of a curve (parse_prepay(prepay_text(c)) == c); for reports.
std::string prepay_text(const SpeedCurve& curve);
std::string default_text(const SpeedCurve& curve);
std::string severity_text(const SpeedCurve& curve);
std::string_view to_string(Advancing advancing);  // "none", "interest"

// ---- JSON assumptions file ----------------------------------------------------------------------
// {"prepay": "psa:150", "default": "sda:200", "severity": 45, "lag_months": 12,
//  "advancing": "interest", "delinquent_default": true}
// Each curve may also be an object with explicit monthly values in percent:
//   {"cpr": [4, 5, 6, 7, 8], "clock": "loan_age"}   {"cdr": [...]}   {"severity": [...]}
// Keys left out keep `base`'s values; unknown keys are an error. Format documented in the README.
Assumptions load_assumptions(const std::string& path, const Assumptions& base = {});
Assumptions parse_assumptions(std::string_view json_text, std::string_view source_name,
                              const Assumptions& base = {});

// A bad assumption: `source` is the option ("--prepay") or file, `key` the JSON key ("" for an
// option), `value` the text at fault.
// what(): "--prepay 'psb:150': unknown form; use cpr:RATE, psa:MULTIPLE, ..."
struct AssumptionError : std::runtime_error {
  AssumptionError(std::string source, std::string key, std::string value,
                  const std::string& message);
  std::string source, key, value;
};

// ---- Payment dates (DESIGN.md section 5) --------------------------------------------------------
// Collection month t runs from cutoff + (t - 1) months; its cash reaches the investor on the first
// day of month t + 1 plus `delay_days`. Month 1 of a 2026-12-01 cut-off, delay 17: 2027-01-18.
Date payment_date(Date cutoff, int month, int delay_days);
// The first day of collection month t: cutoff + (t - 1) months (the day of month kept).
Date collection_start(Date cutoff, int month);

// ---- Yield curves (DESIGN.md section 5) ---------------------------------------------------------
// Curve file (JSON, our format, documented in the README):
//   {"as_of": "2026-12-01",
//    "quotes": [{"kind": "deposit", "tenor": "1M", "rate": 4.31},
//               {"kind": "swap", "tenor": "2Y", "rate": 3.92}, ...],
//    "indexes": {"SOFR30A": {"tenor": "1M", "spread": 0}},
//    "mortgage_spread": 1.45,
//    "description": "..."}
// Rates in percent. Kinds: "deposit" (simple, Actual/360, from as_of), "swap" (fixed annual
// Actual/360 against a compounded overnight rate, from as_of), "par_yield" (a semiannual 30/360
// bond priced at par, from as_of). One curve may mix kinds; two quotes may not share a maturity.
// "indexes" names the ARM indexes the curve can project: each reads the simple Actual/360 forward
// rate over its tenor, plus its spread (percent). "mortgage_spread" (percent) is the
// primary-secondary spread over the forward 10-year par rate for the market mortgage rate.
struct CurveQuote {
  enum class Kind : std::uint8_t { deposit, swap, par_yield };
  Kind kind = Kind::deposit;
  std::string tenor;   // as written: "1M", "2Y"
  int months = 0;      // the tenor in months
  Rate rate = 0;       // decimal
};
struct CurveIndex {
  std::string name;      // as a tape names it: "SOFR30A"
  int tenor_months = 1;  // term of the forward rate
  Rate spread = 0;       // added to the forward, decimal
};

struct YieldCurve {
  std::string source;                // the file, or "flat 4.5%", for messages and reports
  std::string description;
  Date as_of{};                      // reference date: discount factor 1
  std::vector<CurveQuote> quotes;    // empty for a flat curve
  Rate flat_rate = 0;                // flat curves: continuous zero rate, Actual/365 Fixed
  bool flat = false;
  // ARM indexes the curve projects. A flat curve projects any index name (1-month forward).
  std::vector<CurveIndex> indexes;
  Rate mortgage_spread = 0.0145;     // decimal; illustrative default, see the README
  double parallel_shift_bp = 0;      // shifts applied so far (for reports)
  std::vector<std::pair<double, double>> key_rate_shifts;  // (years, bp) applied so far
  // The QuantLib curve: discount factors, zero rates, forwards. Extrapolates past the last quote
  // (flat forward). Never null in a curve built by the functions below.
  std::shared_ptr<const QuantLib::YieldTermStructure> term_structure;
};

// Throws CurveError naming the file, the key (e.g. "quotes[3].tenor") and the value at fault:
// unreadable file, bad JSON, unknown or duplicate key, bad date, tenor or rate, duplicate
// maturity, or a bootstrap QuantLib cannot complete.
YieldCurve load_yield_curve(const std::string& path);
YieldCurve parse_yield_curve(std::string_view json_text, std::string_view source_name);
// Flat continuous zero rate (decimal), Actual/365 Fixed, from `as_of`.
YieldCurve flat_yield_curve(Rate continuous_rate, Date as_of);

// The curve with its continuous zero rates moved: `parallel_bp` everywhere, plus key-rate bumps
// (tenor in years, bp), each a triangle that is full at its tenor and falls to zero at the
// neighbouring key tenors (flat before the first and after the last). Quotes are not re-bootstrapped.
struct CurveShift {
  double parallel_bp = 0;
  std::vector<double> key_years;  // ascending, > 0
  std::vector<double> key_bp;     // one per key tenor
  bool operator==(const CurveShift&) const = default;
};
YieldCurve shift_curve(const YieldCurve& curve, const CurveShift& shift);
inline YieldCurve shift_curve(const YieldCurve& curve, double parallel_bp) {
  return shift_curve(curve, CurveShift{parallel_bp, {}, {}});
}

// Sampling. Dates before as_of are an error (std::invalid_argument).
double discount_factor(const YieldCurve& curve, Date date);
std::vector<double> discount_factors(const YieldCurve& curve, std::span<const Date> dates);
double curve_time(const YieldCurve& curve, Date date);   // Actual/365 Fixed years from as_of
Rate zero_rate(const YieldCurve& curve, Date date);      // continuous, Actual/365 Fixed
// Simple Actual/360 forward rate from `start` over `months` months.
Rate forward_rate(const YieldCurve& curve, Date start, int months);
// Par yield (semiannual coupon, 30/360, priced at par from as_of) for a maturity of `years`
// (> 0; fractional maturities interpolate linearly between half-year grid points; a maturity
// under half a year reads the half-year point).
Rate par_yield(const YieldCurve& curve, double years);

// ARM index rates by projection month for the indexes a tape names: rates[k][t - 1] is index
// names[k]'s forward rate (plus spread) over its tenor starting collection_start(cutoff, t), or
// starting at as_of for a collection month that starts before the curve's date.
// Throws CurveError if the curve does not define a name (a flat curve defines every name).
struct IndexPaths {
  int months = 0;
  std::vector<std::string> names;
  std::vector<std::vector<Rate>> rates;
};
IndexPaths index_paths(const YieldCurve& curve, std::span<const std::string> names, Date cutoff,
                       int months);
// The market mortgage rate by projection month: the forward 10-year par yield starting
// collection_start(cutoff, t) (or as_of, if later), plus the curve's mortgage_spread.
// [t - 1] = month t.
std::vector<Rate> mortgage_rate_path(const YieldCurve& curve, Date cutoff, int months);

// ---- Loan-level credit and prepayment model (DESIGN.md section 7) -------------------------------
// The model's tables: a loan's default, severity and prepayment respond to its credit attributes
// and to the economy that follows (house prices, the market mortgage rate). Every default value is
// illustrative (README: "Loan-level model" says where each comes from); a JSON model file
// overrides any table (format in the README). Categories are keyed by the tape's spellings
// (tape/tape.h to_string: "full", "investor", "cash_out_refi", "condo", "30", "90+", ...), states by
// postal code, so this header does not depend on tape/.

// A step function of one number. Value v reads multiplier[k] for the first k with v < upper[k],
// and multiplier.back() at or above the last bound (multiplier has upper.size() + 1 entries).
// NaN (not on the tape) reads `missing`. Bounds are in the number's own units: score points,
// decimal LTV and DTI (0.80).
struct BandTable {
  std::vector<double> upper;       // strictly ascending
  std::vector<double> multiplier;  // upper.size() + 1 entries, each >= 0
  double missing = 1.0;
  bool operator==(const BandTable&) const = default;
};
std::size_t band_index(const BandTable& table, double value);  // upper.size() + 1 = missing
double band_value(const BandTable& table, double value);
// "< 620", "620-659", ">= 780", "missing" -- `scale` multiplies the bounds for display (100 for
// LTV and DTI in percent).
std::string band_label(const BandTable& table, std::size_t band, double scale = 1.0);

// A category's multipliers by the tape's spelling; a category not listed (or "unknown") reads
// `missing`.
struct CategoryTable {
  std::vector<std::pair<std::string, double>> multiplier;  // ("full", 1.0), ...
  double missing = 1.0;
  bool operator==(const CategoryTable&) const = default;
};
double category_value(const CategoryTable& table, std::string_view key);

// A loan delinquent at cut-off: `default_share` of its balance defaults, evenly in monthly rate,
// over its first `months` projection months (MDR = 1 - (1 - share)^(1/months)); the rest then
// performs with its default rate times CreditModel::cured_multiplier.
struct DelinquencyRoll {
  double default_share = 0;  // decimal, 0..1
  int months = 1;            // >= 1
  bool operator==(const DelinquencyRoll&) const = default;
};

struct CreditModel {
  // Default: MDR = base MDR(loan age) x score x updated-LTV x DTI x documentation x occupancy x
  // purpose x property type x scenario multiplier, at most 1. Updated LTV = (balance + junior
  // liens) / (property value x house-price index): the junior liens are (CLTV - LTV) x the
  // property value, held; the property value is the tape's, else original balance / LTV, else
  // current balance / assumed_ltv.
  SpeedCurve base_default;     // CDR of the reference borrower (every multiplier 1)
  BandTable score_default, ltv_default, dti_default;
  CategoryTable documentation_default, occupancy_default, purpose_default, property_default;
  std::vector<std::pair<std::string, DelinquencyRoll>> delinquency_roll;  // "30", "60", "90+", "foreclosure"
  double cured_multiplier = 1.0;
  double assumed_ltv = 0.80;   // decimal

  // Severity of a loan defaulting in month t with liquidation `timeline` months later:
  //   sale price   = property value x index(t + timeline) x (1 - distressed_discount)
  //   proceeds     = sale price x (1 - sale_cost) - foreclosure_cost
  //                  - carrying_cost x property value x index(t) x timeline / 12
  //   severity     = max(0, 1 - proceeds / balance) + lost interest (net rate x timeline / 12)
  // The engine pays the lost interest as DESIGN section 4 does: advanced and repaid from proceeds
  // (advancing interest), or never paid (advancing none).
  double distressed_discount = 0;  // decimal of the market value
  double sale_cost = 0;            // decimal of the sale price
  double carrying_cost = 0;        // decimal of the property value per year
  double foreclosure_cost = 0;     // dollars per loan
  std::vector<std::pair<std::string, int>> timeline_months;  // state postal code -> months
  int default_timeline_months = 12;  // states not listed, and loans without a state

  // Prepayment: SMM = turnover SMM(loan age) x turnover-LTV + refinance SMM(incentive) x score
  // x refinance-LTV x burnout, times the scenario multiplier, at most 1. The incentive is the
  // loan's note rate less the market mortgage rate (forward 10-year par + the curve's
  // mortgage_spread). Refinance CPR = refi_max_cpr / (1 + exp(-(incentive - refi_midpoint) /
  // refi_width)). Burnout starts at 1; each month with a positive incentive it keeps
  // max(0, 1 - burnout x incentive in percent) of itself.
  SpeedCurve turnover;         // CPR by loan age (seasoning ramp)
  double refi_max_cpr = 0, refi_midpoint = 0, refi_width = 0.0025;  // decimals
  double burnout = 0;          // per month per percentage point of incentive
  BandTable score_refi, ltv_refi, ltv_turnover;
  // Refinance multiplier for a loan delinquent at cut-off (one that rolls): a borrower behind on
  // payments can rarely refinance. Held for the loan's life.
  double delinquent_refi = 1.0;

  bool operator==(const CreditModel&) const = default;
};

// The illustrative defaults (values and their sources in the README).
CreditModel default_credit_model();
// A JSON model file: any key overrides `base`'s table whole; unknown keys, bad bands (bounds not
// ascending, wrong count, negative multipliers) and bad values throw AssumptionError naming the
// file, the key and the value.
CreditModel load_credit_model(const std::string& path, const CreditModel& base = default_credit_model());
CreditModel parse_credit_model(std::string_view json_text, std::string_view source_name,
                               const CreditModel& base = default_credit_model());
// The model as a JSON file that parse_credit_model reads back equal (for reports and for users who
// want a starting point).
std::string credit_model_json(const CreditModel& model);

// A named economy to run the model under.
struct Scenario {
  std::string name;
  std::string description;
  // House prices from cut-off: annual change by year (decimal; the last year's change continues),
  // or a monthly index (month 0 = cut-off; the last value holds). Exactly one is non-empty; both
  // empty = flat prices.
  std::vector<double> house_price_annual;
  std::vector<double> house_price_monthly;
  CurveShift rate_shock;       // applied to the yield curve (discounting, mortgage rate, ARM indexes)
  double prepay_multiplier = 1.0;
  double default_multiplier = 1.0;
  bool operator==(const Scenario&) const = default;
};
// House-price index by month, [0] = 1 at cut-off, [t] = end of month t; `months` + 1 entries.
std::vector<double> house_price_index(const Scenario& scenario, int months);
// The shipped set, invented and plausible: "boom", "base", "mild_downturn", "severe_downturn".
std::vector<Scenario> default_scenarios();
// {"scenarios": [{"name": ..., "description": ..., "house_prices": {"annual": [3, 3]} or
//   {"monthly": [100, 100.4, ...]}, "rate_shock": {"parallel_bp": 50, "key_rates": {"2": 25}},
//   "prepay_multiplier": 1, "default_multiplier": 1}, ...]}  (annual changes in percent)
// Throws AssumptionError naming the file, the key ("scenarios[2].house_prices") and the value.
std::vector<Scenario> load_scenarios(const std::string& path);
std::vector<Scenario> parse_scenarios(std::string_view json_text, std::string_view source_name);
std::string scenarios_json(std::span<const Scenario> scenarios);
// The scenario called `name`, or AssumptionError (source `option`) listing the names there are.
const Scenario& find_scenario(std::span<const Scenario> scenarios, std::string_view name,
                              std::string_view option = "--scenario");

// A bad curve file or curve option: `source` the file or option, `key` the JSON key ("" for an
// option), `value` the text at fault.
struct CurveError : std::runtime_error {
  CurveError(std::string source, std::string key, std::string value, const std::string& message);
  std::string source, key, value;
};

}  // namespace poolbid
