// Demo tapes: invented loans from invented sellers as CSV, the same bytes for a seed everywhere.
//
// Two random streams, both std::mt19937_64 (its output sequence is fixed by the C++ standard) with
// our own transforms, never std::*_distribution (whose output differs between standard libraries):
//   deal   = seeded from the seed alone: balance, note rate, term, age, amortisation type and its
//            ARM / interest-only / balloon terms, property type, state. The same for every profile.
//   credit = seeded from the seed and the profile: credit score, LTV, CLTV, DTI, documentation,
//            occupancy, purpose, delinquency, property value.
// So at one seed a strict and a loose tape have the same coupon, term and balance loan by loan and
// differ only in underwriting. Money is kept in integer cents, note rates in eighths of a percent
// and ratios in hundredths of a percent, so amortisation and printing are exact integer work; only
// the normal and lognormal draws go through the C library's log, cos and exp. Their last bit may
// differ between C libraries, but every draw is then rounded (whole score points, 1/8 percent,
// $50, 0.01 percent), so output changes only if a draw sits on a rounding edge. The committed demo
// tapes are regenerated and compared byte for byte by tests/tape/demo_tape_test.cpp.
//
// Planted problems (`bad_rows`): loans after the first, evenly spaced, cycling through twelve ways
// to be rejected, then two loans that only warn (see Writer::plant).
//
// Every number below (mixes, means, spreads, weights) is illustrative, invented to look like a
// plausible US residential pool; none is taken from a real seller or a real pool.
#include <fmt/format.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>
#include <ostream>
#include <random>
#include <string>
#include <string_view>
#include <vector>

#include "tape/tape.h"

namespace poolbid {
namespace {

using std::chrono::year_month;
using std::chrono::months;

// ---- Random numbers ----------------------------------------------------------------------------

// SplitMix64 finaliser (Steele, Lea and Flood, "Fast splittable pseudorandom number generators",
// OOPSLA 2014; constants as in Vigna's splitmix64.c): spreads nearby seeds over the whole state.
std::uint64_t mix64(std::uint64_t x) {
  x += 0x9E3779B97F4A7C15ULL;
  x = (x ^ (x >> 30)) * 0xBF58476D1CE4E5B9ULL;
  x = (x ^ (x >> 27)) * 0x94D049BB133111EBULL;
  return x ^ (x >> 31);
}

struct Stream {
  std::mt19937_64 engine;

  explicit Stream(std::uint64_t seed) : engine(seed) {}

  // Uniform on [0, 1): the top 53 bits of one 64-bit output, times 2^-53 (exact in a double).
  double uniform() { return static_cast<double>(engine() >> 11) * 0x1.0p-53; }

  // Standard normal by the Box–Muller transform (Box and Muller, "A note on the generation of
  // random normal deviates", Ann. Math. Statist. 29, 1958): sqrt(-2 ln u1) cos(2 pi u2), with
  // u1 in (0, 1]. One normal per two uniforms; the sine half is not kept, so the stream never
  // carries state between calls.
  double normal() {
    const double u1 = 1.0 - uniform();
    const double u2 = uniform();
    return std::sqrt(-2.0 * std::log(u1)) * std::cos(2.0 * 3.14159265358979323846 * u2);
  }

  double normal(double mean, double sd, double low, double high) {
    return std::clamp(mean + sd * normal(), low, high);  // clipped, as a tape's bounds would be
  }

  bool chance(double p) { return uniform() < p; }

  // An index drawn with the given integer weights.
  template <std::size_t N>
  std::size_t pick(const std::array<int, N>& weights) {
    int total = 0;
    for (int w : weights) total += w;
    double x = uniform() * total;
    for (std::size_t i = 0; i < N; ++i) {
      if (x < weights[i]) return i;
      x -= weights[i];
    }
    return N - 1;
  }
};

// ---- Illustrative mixes ------------------------------------------------------------------------

// States weighted toward the big housing markets (illustrative weights, per mille).
constexpr std::array<std::string_view, 51> kStates = {
    "CA", "TX", "FL", "NY", "WA", "IL", "NJ", "VA", "GA", "NC", "CO", "AZ", "MA",
    "PA", "MD", "OH", "MI", "MN", "TN", "UT", "OR", "SC", "NV", "WI", "IN", "MO",
    "CT", "AL", "KY", "LA", "OK", "ID", "NH", "HI", "DC", "DE", "RI", "NM", "NE",
    "IA", "KS", "AR", "MS", "ME", "MT", "WV", "VT", "SD", "ND", "AK", "WY"};
constexpr std::array<int, 51> kStateWeights = {
    150, 80, 75, 50, 38, 35, 35, 32, 32, 31, 31, 30, 30,
    28,  26, 22, 20, 18, 18, 17, 15, 15, 13, 12, 12, 12,
    10,  8,  8,  7,  6,  7,  6,  6,  5,  4,  4,  4,  4,
    4,   4,  3,  3,  3,  3,  2,  2,  2,  2,  2,  2};

// Single family, PUD, condo, 2-4 unit, manufactured, co-op (percent).
constexpr std::array<PropertyType, 6> kPropertyTypes = {
    PropertyType::single_family, PropertyType::pud, PropertyType::condo,
    PropertyType::two_to_four, PropertyType::manufactured, PropertyType::coop};
constexpr std::array<int, 6> kPropertyTypeWeights = {62, 20, 10, 5, 2, 1};

// Underwriting of one profile: clipped normals and category mixes (percent).
struct UnderwritingMix {
  double score_mean, score_sd, score_low, score_high;
  double ltv_mean, ltv_sd, ltv_low, ltv_high;     // percent
  double second_lien_chance, cltv_high;           // CLTV above LTV for this share, up to cltv_high
  double dti_mean, dti_sd, dti_low, dti_high;     // percent
  std::array<int, 3> documentation;               // full, limited, none
  std::array<int, 3> occupancy;                   // owner, second home, investor
  std::array<int, 3> purpose;                     // purchase, rate/term refi, cash-out refi
  std::array<int, 5> delinquency;                 // per 1000: current, 30, 60, 90+, foreclosure
};

constexpr UnderwritingMix kStrict = {
    765, 30, 680, 840,
    70, 12, 20, 90,
    0.08, 95,
    30, 6, 10, 43,
    {97, 3, 0},
    {92, 5, 3},
    {55, 30, 15},
    {993, 5, 1, 1, 0}};

constexpr UnderwritingMix kLoose = {
    690, 45, 560, 820,
    85, 10, 30, 100,
    0.20, 100,
    41, 8, 15, 55,
    {60, 25, 15},
    {78, 7, 15},
    {40, 25, 35},
    {930, 40, 15, 10, 5}};

constexpr std::array<Documentation, 3> kDocumentation = {
    Documentation::full, Documentation::limited, Documentation::none};
constexpr std::array<Occupancy, 3> kOccupancy = {
    Occupancy::owner, Occupancy::second_home, Occupancy::investor};
constexpr std::array<Purpose, 3> kPurpose = {
    Purpose::purchase, Purpose::rate_term_refi, Purpose::cash_out_refi};
constexpr std::array<Delinquency, 5> kDelinquency = {
    Delinquency::current, Delinquency::dq30, Delinquency::dq60, Delinquency::dq90_plus,
    Delinquency::foreclosure};

constexpr std::string_view kArmIndex = "SOFR30A";  // 30-day average SOFR, a public index
constexpr int kArmMarginThousandths = 2750;        // 2.75% margin; the floor is the margin
constexpr int kArmPeriodicCapThousandths = 2000;   // 2% each reset (no separate first-reset cap)
constexpr int kArmLifetimeCapEighths = 40;         // lifetime cap: start rate + 5%

// ---- One invented loan -------------------------------------------------------------------------

struct DemoLoan {
  // Deal terms (deal stream).
  std::int64_t original_cents = 0, current_cents = 0;
  int rate_eighths = 0;             // note rate in 1/8 percent: 52 = 6.5%
  int fee_thousandths = 0;          // servicing fee in 1/1000 percent: 250 = 0.25%
  int original_term = 0, age = 0;   // months
  Amortization amortization = Amortization::fixed;
  int io_months = 0, balloon_month = 0;
  int arm_first_reset = 0, arm_reset_period = 0;
  PropertyType property_type = PropertyType::single_family;
  std::string_view state;
  // Underwriting (credit stream).
  int credit_score = 0;
  int ltv_bp = 0, cltv_bp = 0, dti_bp = 0;  // hundredths of a percent: 7250 = 72.50%
  std::int64_t property_value = 0;          // dollars
  int appraisal_day = 1;                    // day of the month of the valuation
  Documentation documentation = Documentation::full;
  Occupancy occupancy = Occupancy::owner;
  Purpose purpose = Purpose::purchase;
  Delinquency delinquency = Delinquency::current;
};

// Balance after `payments` level payments, in whole cents: the payment is rounded to the cent
// and each month's interest is rounded to the cent, as a servicer's ledger would. With the rate
// in eighths of a percent, monthly interest = balance x eighths / 9600 exactly. `growth` is
// (1 + r)^term, worked out once per rate and term by repeated multiplication (plain IEEE
// products, so the same on every platform).
std::int64_t amortised_cents(std::int64_t original, int rate_eighths, double growth,
                             int payments) {
  const double monthly = rate_eighths / 9600.0;
  const auto payment = static_cast<std::int64_t>(
      std::llround(static_cast<double>(original) * monthly * growth / (growth - 1.0)));
  std::int64_t balance = original;
  for (int i = 0; i < payments && balance > 0; ++i) {
    const std::int64_t interest = (balance * rate_eighths + 4800) / 9600;  // round half up
    balance -= std::min(balance, payment - interest);
  }
  return balance;
}

// (1 + r)^term for every note rate and term the generator draws, built once per tape.
struct GrowthTable {
  static constexpr int kMaxEighths = 64;
  std::array<std::array<double, kMaxEighths + 1>, 3> by_term{};  // 180, 240, 360 months

  GrowthTable() {
    const int terms[3] = {180, 240, 360};
    for (int t = 0; t < 3; ++t)
      for (int e = 1; e <= kMaxEighths; ++e) {
        double growth = 1.0;
        for (int i = 0; i < terms[t]; ++i) growth *= 1.0 + e / 9600.0;
        by_term[t][e] = growth;
      }
  }
  double operator()(int rate_eighths, int term) const {
    return by_term[term == 180 ? 0 : term == 240 ? 1 : 2][rate_eighths];
  }
};

void draw_deal(Stream& deal, const GrowthTable& growth, DemoLoan& loan) {
  // Amortisation: ~8% ARMs (5/1 and 7/1), ~4% interest-only, ~1% balloon, the rest fixed.
  const double kind = deal.uniform();
  loan.amortization = kind < 0.08   ? Amortization::arm
                      : kind < 0.12 ? Amortization::interest_only
                      : kind < 0.13 ? Amortization::balloon
                                    : Amortization::fixed;
  // Term: 30-year mostly; fixed-rate loans are also 15-year (15%) and 20-year (6%).
  loan.original_term = 360;
  if (loan.amortization == Amortization::fixed) {
    const double t = deal.uniform();
    loan.original_term = t < 0.15 ? 180 : t < 0.21 ? 240 : 360;
  }
  // Note rate around 5.5-7.5% in 1/8 steps: shorter terms and ARMs lower, IO and balloons higher.
  double rate = deal.normal(6.5, 0.45, 4.0, 9.0);
  if (loan.original_term == 180) rate -= 0.625;
  if (loan.original_term == 240) rate -= 0.25;
  if (loan.amortization == Amortization::arm) rate -= 0.5;
  if (loan.amortization == Amortization::interest_only) rate += 0.25;
  if (loan.amortization == Amortization::balloon) rate += 0.5;
  loan.rate_eighths =
      std::clamp(static_cast<int>(std::lround(rate * 8)), 42, GrowthTable::kMaxEighths);  // 5.25-8%
  // Original balance lognormal, median $290k (mean about $320k), $50k-$1.6M, whole $50s.
  const double balance = std::exp(std::log(290000.0) + 0.45 * deal.normal());
  loan.original_cents =
      std::llround(std::clamp(balance, 50000.0, 1600000.0) / 50.0) * 50 * 100;
  loan.age = std::min(60, static_cast<int>(deal.uniform() * 61));  // 0-60 months seasoned
  loan.fee_thousandths = 250;
  loan.io_months = loan.balloon_month = loan.arm_first_reset = loan.arm_reset_period = 0;
  switch (loan.amortization) {
    case Amortization::arm:  // 5/1 (60%) or 7/1: fixed for 5 or 7 years, then yearly
      loan.arm_first_reset = deal.chance(0.6) ? 61 : 85;
      loan.arm_reset_period = 12;
      loan.fee_thousandths = 375;
      break;
    case Amortization::interest_only:  // ten years interest-only, then amortising over twenty
      loan.io_months = 120;
      break;
    case Amortization::balloon:  // 30-year amortisation, balloon after 7 or 10 years
      loan.balloon_month = deal.chance(0.5) ? 84 : 120;
      break;
    case Amortization::fixed:
      break;
  }
  loan.property_type = kPropertyTypes[deal.pick(kPropertyTypeWeights)];
  loan.state = kStates[deal.pick(kStateWeights)];
  if (loan.amortization == Amortization::interest_only) {
    loan.current_cents = loan.original_cents;  // no principal due in the first 120 months
  } else {
    loan.current_cents = amortised_cents(loan.original_cents, loan.rate_eighths,
                                         growth(loan.rate_eighths, loan.original_term), loan.age);
  }
}

void draw_credit(Stream& credit, const UnderwritingMix& box, DemoLoan& loan) {
  loan.credit_score = static_cast<int>(std::lround(
      credit.normal(box.score_mean, box.score_sd, box.score_low, box.score_high)));
  const double ltv = credit.normal(box.ltv_mean, box.ltv_sd, box.ltv_low, box.ltv_high);
  loan.ltv_bp = static_cast<int>(std::lround(ltv * 100));
  loan.cltv_bp = loan.ltv_bp;
  if (credit.chance(box.second_lien_chance)) {  // a second lien behind this one
    const double cltv = std::min(box.cltv_high, ltv + 5 + 15 * credit.uniform());
    loan.cltv_bp = std::max(loan.ltv_bp, static_cast<int>(std::lround(cltv * 100)));
  }
  loan.dti_bp = static_cast<int>(
      std::lround(100 * credit.normal(box.dti_mean, box.dti_sd, box.dti_low, box.dti_high)));
  loan.documentation = kDocumentation[credit.pick(box.documentation)];
  loan.occupancy = kOccupancy[credit.pick(box.occupancy)];
  loan.purpose = kPurpose[credit.pick(box.purpose)];
  loan.delinquency = kDelinquency[credit.pick(box.delinquency)];
  // A loan cannot be further behind than the payments it has had due.
  const int months_behind = static_cast<int>(loan.delinquency) - 1;
  if (months_behind > loan.age) loan.delinquency = Delinquency::current;
  // Value at origination: original balance / LTV, to the dollar.
  loan.property_value = (loan.original_cents * 100 + loan.ltv_bp / 2) / loan.ltv_bp;
  loan.appraisal_day = 1 + static_cast<int>(credit.uniform() * 28);
}

// ---- Layouts -----------------------------------------------------------------------------------

// One output column: the field it carries and its header in this layout.
struct Column {
  Field field;
  std::string_view header;
};

// Our canonical names, in canonical order, without the two date-only terms.
std::vector<Column> canonical_columns() {
  std::vector<Column> columns;
  for (std::size_t i = 0; i < kFieldCount; ++i) {
    const auto f = static_cast<Field>(i);
    if (f == Field::maturity_date || f == Field::first_payment_date) continue;
    columns.push_back({f, field_name(f)});
  }
  return columns;
}

// The invented second seller's own headers, in its own order. No seller column: the column map
// names the seller. demo-pools/sallowmere.map.json maps these back to canonical names.
std::vector<Column> seller_coded_columns() {
  return {
      {Field::loan_id, "LOAN_NO"},
      {Field::state, "PROP_ST"},
      {Field::property_type, "PROP_TYP_CD"},
      {Field::occupancy, "OCC_CD"},
      {Field::loan_purpose, "LOAN_PURP_CD"},
      {Field::original_balance, "ORIG_UPB"},
      {Field::current_balance, "CURR_UPB"},
      {Field::note_rate, "NOTE_RT"},
      {Field::servicing_fee, "SVC_FEE_RT"},
      {Field::original_term, "ORIG_TERM_MO"},
      {Field::first_payment_date, "FIRST_PMT_DT"},
      {Field::maturity_date, "MATURITY_DT"},
      {Field::amortization_type, "AMORT_CD"},
      {Field::io_months, "IO_TERM_MO"},
      {Field::balloon_month, "BALLOON_PMT_MO"},
      {Field::arm_index, "ARM_IDX_NM"},
      {Field::arm_margin, "ARM_MRGN_RT"},
      {Field::arm_first_reset, "ARM_1ST_CHG_MO"},
      {Field::arm_reset_period, "ARM_CHG_FREQ_MO"},
      {Field::arm_periodic_cap, "ARM_PER_CAP_RT"},
      {Field::arm_lifetime_cap, "ARM_LIFE_MAX_RT"},
      {Field::arm_floor, "ARM_LIFE_MIN_RT"},
      {Field::credit_score, "BORR_CR_SCORE"},
      {Field::original_ltv, "ORIG_LTV_RT"},
      {Field::combined_ltv, "ORIG_CLTV_RT"},
      {Field::dti, "BACK_END_DTI_RT"},
      {Field::property_value, "APPR_VAL_AMT"},
      {Field::property_value_date, "APPR_DT"},
      {Field::documentation, "DOC_TYP_CD"},
      {Field::delinquency, "DLQ_STAT_CD"},
  };
}

// The seller's letter codes; the map's "values" section spells each back to ours.
std::string_view seller_code(Amortization v) {
  switch (v) {
    case Amortization::fixed: return "FX";
    case Amortization::arm: return "AR";
    case Amortization::interest_only: return "IO";
    case Amortization::balloon: return "BL";
  }
  return "";
}
std::string_view seller_code(Occupancy v) {
  switch (v) {
    case Occupancy::owner: return "O";
    case Occupancy::second_home: return "S";
    case Occupancy::investor: return "I";
    case Occupancy::unknown: return "";
  }
  return "";
}
std::string_view seller_code(Purpose v) {
  switch (v) {
    case Purpose::purchase: return "P";
    case Purpose::rate_term_refi: return "R";
    case Purpose::cash_out_refi: return "C";
    case Purpose::unknown: return "";
  }
  return "";
}
std::string_view seller_code(Documentation v) {
  switch (v) {
    case Documentation::full: return "F";
    case Documentation::limited: return "L";
    case Documentation::none: return "N";
    case Documentation::unknown: return "";
  }
  return "";
}
std::string_view seller_code(PropertyType v) {
  switch (v) {
    case PropertyType::single_family: return "SF";
    case PropertyType::condo: return "CO";
    case PropertyType::pud: return "PU";
    case PropertyType::two_to_four: return "MF";
    case PropertyType::manufactured: return "MH";
    case PropertyType::coop: return "CP";
    case PropertyType::unknown: return "";
  }
  return "";
}
std::string_view seller_code(Delinquency v) {
  switch (v) {
    case Delinquency::current: return "C";
    case Delinquency::dq30: return "3";
    case Delinquency::dq60: return "6";
    case Delinquency::dq90_plus: return "9";
    case Delinquency::foreclosure: return "F";
    case Delinquency::unknown: return "";
  }
  return "";
}

// ---- Writing cells -----------------------------------------------------------------------------

struct Writer {
  bool seller_coded;
  year_month cutoff;
  std::string_view seller;
  std::string_view id_prefix;
  std::vector<Column> columns;
  std::vector<std::string> cells;  // one row, reused

  static void put_int(std::string& cell, std::int64_t value) {
    const fmt::format_int text(value);
    cell.append(text.data(), text.size());
  }

  // `value` as exactly `width` digits, leading zeros kept.
  static void put_digits(std::string& cell, std::int64_t value, int width) {
    char digits[20];
    for (int i = width - 1; i >= 0; --i) {
      digits[i] = static_cast<char>('0' + value % 10);
      value /= 10;
    }
    cell.append(digits, static_cast<std::size_t>(width));
  }

  // A rate held in integer units of 10^-scale percent: percent on our layout, decimal on the
  // seller's (two more places), written from integers so nothing depends on float printing.
  // Trailing zeros are dropped: 6.5, 0.065.
  void put_rate(std::string& cell, std::int64_t units, int scale) const {
    if (seller_coded) scale += 2;
    std::int64_t ten = 1;
    for (int i = 0; i < scale; ++i) ten *= 10;
    if (units < 0) {
      cell += '-';
      units = -units;
    }
    put_int(cell, units / ten);
    std::int64_t fraction = units % ten;
    if (fraction == 0) return;
    while (fraction % 10 == 0) {
      fraction /= 10;
      --scale;
    }
    cell += '.';
    put_digits(cell, fraction, scale);
  }

  // ISO 2026-12-01 on our layout, 12/1/2026 on the seller's.
  void put_date(std::string& cell, year_month month, int day) const {
    const int y = static_cast<int>(month.year());
    const auto m = static_cast<unsigned>(month.month());
    if (seller_coded) {
      put_int(cell, m);
      cell += '/';
      put_int(cell, day);
      cell += '/';
      put_int(cell, y);
    } else {
      put_digits(cell, y, 4);
      cell += '-';
      put_digits(cell, m, 2);
      cell += '-';
      put_digits(cell, day, 2);
    }
  }

  static void put_cents(std::string& cell, std::int64_t cents) {
    if (cents < 0) {
      cell += '-';
      cents = -cents;
    }
    put_int(cell, cents / 100);
    cell += '.';
    put_digits(cell, cents % 100, 2);
  }

  std::string loan_id(std::size_t index) const {  // BHL-000001; wider past 999,999 loans
    std::string id(id_prefix);
    const std::int64_t number = static_cast<std::int64_t>(index) + 1;
    if (number < 1000000) {
      put_digits(id, number, 6);
    } else {
      put_int(id, number);
    }
    return id;
  }

  void fill(std::size_t index, const DemoLoan& loan) {
    const bool arm = loan.amortization == Amortization::arm;
    const year_month first_payment = cutoff - months{loan.age};
    const year_month maturity = first_payment + months{loan.original_term - 1};
    for (std::size_t c = 0; c < columns.size(); ++c) {
      std::string& cell = cells[c];
      cell.clear();
      switch (columns[c].field) {
        case Field::loan_id: cell = loan_id(index); break;
        case Field::seller: cell = seller; break;
        case Field::current_balance: put_cents(cell, loan.current_cents); break;
        case Field::original_balance: put_cents(cell, loan.original_cents); break;
        case Field::note_rate: put_rate(cell, loan.rate_eighths * 125, 3); break;
        case Field::servicing_fee: put_rate(cell, loan.fee_thousandths, 3); break;
        case Field::original_term: put_int(cell, loan.original_term); break;
        case Field::remaining_term: put_int(cell, loan.original_term - loan.age); break;
        case Field::loan_age: put_int(cell, loan.age); break;
        case Field::first_payment_date: put_date(cell, first_payment, 1); break;
        case Field::maturity_date: put_date(cell, maturity, 1); break;
        case Field::amortization_type:
          cell = seller_coded ? seller_code(loan.amortization) : to_string(loan.amortization);
          break;
        case Field::io_months:
          if (loan.io_months) put_int(cell, loan.io_months);
          break;
        case Field::balloon_month:
          if (loan.balloon_month) put_int(cell, loan.balloon_month);
          break;
        case Field::arm_index:
          if (arm) cell = kArmIndex;
          break;
        case Field::arm_margin:
          if (arm) put_rate(cell, kArmMarginThousandths, 3);
          break;
        case Field::arm_first_reset:
          if (arm) put_int(cell, loan.arm_first_reset);
          break;
        case Field::arm_reset_period:
          if (arm) put_int(cell, loan.arm_reset_period);
          break;
        case Field::arm_periodic_cap:
          if (arm) put_rate(cell, kArmPeriodicCapThousandths, 3);
          break;
        case Field::arm_lifetime_cap:
          if (arm) put_rate(cell, (loan.rate_eighths + kArmLifetimeCapEighths) * 125, 3);
          break;
        case Field::arm_floor:
          if (arm) put_rate(cell, kArmMarginThousandths, 3);
          break;
        case Field::credit_score: put_int(cell, loan.credit_score); break;
        case Field::original_ltv: put_rate(cell, loan.ltv_bp, 2); break;
        case Field::combined_ltv: put_rate(cell, loan.cltv_bp, 2); break;
        case Field::dti: put_rate(cell, loan.dti_bp, 2); break;
        case Field::property_value: put_int(cell, loan.property_value); break;
        case Field::property_value_date:  // valued at origination, a month or two before
          put_date(cell, first_payment - months{2}, loan.appraisal_day);
          break;
        case Field::occupancy:
          cell = seller_coded ? seller_code(loan.occupancy) : to_string(loan.occupancy);
          break;
        case Field::property_type:
          cell = seller_coded ? seller_code(loan.property_type) : to_string(loan.property_type);
          break;
        case Field::loan_purpose:
          cell = seller_coded ? seller_code(loan.purpose) : to_string(loan.purpose);
          break;
        case Field::documentation:
          cell = seller_coded ? seller_code(loan.documentation) : to_string(loan.documentation);
          break;
        case Field::state: cell = loan.state; break;
        case Field::delinquency:
          cell = seller_coded ? seller_code(loan.delinquency) : to_string(loan.delinquency);
          break;
        case Field::count_: break;
      }
    }
  }

  std::string* cell_of(Field f) {
    for (std::size_t c = 0; c < columns.size(); ++c)
      if (columns[c].field == f) return &cells[c];
    return nullptr;
  }

  // Rewrites the term so that remaining = original - age - shift (seller's layout: the maturity
  // date moves instead).
  void shift_remaining(const DemoLoan& loan, int shift) {
    if (seller_coded) {
      std::string& cell = *cell_of(Field::maturity_date);
      cell.clear();
      const year_month first_payment = cutoff - months{loan.age};
      put_date(cell, first_payment + months{loan.original_term - 1 - shift}, 1);
    } else {
      std::string& cell = *cell_of(Field::remaining_term);
      cell.clear();
      put_int(cell, loan.original_term - loan.age - shift);
    }
  }

  // Plants problem `kind` in the current row: 0-11 reject the row, 12-13 only warn.
  // Returns the number of cells to write (a ragged row drops its last one).
  std::size_t plant(int kind, const DemoLoan& loan) {
    switch (kind) {
      case 0: {                                                          // negative balance
        std::string& cell = *cell_of(Field::current_balance);
        cell.insert(cell.begin(), '-');
        break;
      }
      case 1: *cell_of(Field::note_rate) = seller_coded ? "0.31" : "31"; break;
      case 2: *cell_of(Field::credit_score) = "910"; break;
      case 3: *cell_of(Field::state) = "XX"; break;
      case 4: *cell_of(Field::loan_id) = loan_id(0); break;              // duplicate id
      case 5: *cell_of(Field::current_balance) = "12O,000"; break;       // letter O
      case 6: shift_remaining(loan, -(loan.age + 12)); break;            // remaining > original
      case 7: cell_of(Field::loan_id)->clear(); break;
      case 8: *cell_of(Field::original_ltv) = seller_coded ? "3.5" : "350"; break;
      case 9: *cell_of(Field::dti) = seller_coded ? "1.4" : "140"; break;
      case 10: *cell_of(Field::occupancy) = "castle"; break;
      case 11: return columns.size() - 1;                                // ragged row
      case 12: shift_remaining(loan, 3); break;                          // warning: terms off by 3
      case 13: {                                                         // warning: CLTV < LTV
        std::string& cell = *cell_of(Field::combined_ltv);
        cell.clear();
        put_rate(cell, loan.ltv_bp - 500, 2);
        break;
      }
      default: break;
    }
    return columns.size();
  }
};

constexpr int kRejectKinds = 12;

// A cell as CSV: quoted (quotes doubled) when it holds a comma, a quote or a line break.
void append_csv_cell(std::string& out, std::string_view cell) {
  bool plain = true;
  for (char ch : cell) plain &= ch != ',' && ch != '"' && ch != '\n' && ch != '\r';
  if (plain) {
    out += cell;
    return;
  }
  out += '"';
  for (char ch : cell) {
    if (ch == '"') out += '"';
    out += ch;
  }
  out += '"';
}

}  // namespace

std::string_view demo_seller_name(DemoProfile profile) {
  return profile == DemoProfile::strict ? "Brindlecote Home Loans" : "Sallowmere Funding";
}

void write_demo_tape(std::ostream& out, const DemoTapeOptions& options) {
  const bool strict = options.profile == DemoProfile::strict;
  Stream deal(mix64(options.seed));
  Stream credit(mix64(mix64(options.seed) + 1 + static_cast<std::uint64_t>(options.profile)));
  const UnderwritingMix& box = strict ? kStrict : kLoose;

  Writer w;
  w.seller_coded = options.layout == DemoLayout::seller_coded;
  w.cutoff = year_month{options.cutoff.year(), options.cutoff.month()};
  w.seller = demo_seller_name(options.profile);
  w.id_prefix = strict ? "BHL-" : "SMF-";
  w.columns = w.seller_coded ? seller_coded_columns() : canonical_columns();
  w.cells.resize(w.columns.size());

  // Planted rows: `bad_rows` rejects cycling through the kinds, then two warning-only rows,
  // spread evenly over the loans after the first (so a duplicate id has an original).
  // At most loans - 1 rows are planted.
  const std::size_t n = options.loans;
  const std::size_t room = n > 0 ? n - 1 : 0;
  const std::size_t rejects = std::min(options.bad_rows, room);
  const std::size_t planted = std::min(rejects + (options.bad_rows > 0 ? 2 : 0), room);
  std::size_t next_plant = 0;
  auto plant_row = [&](std::size_t j) { return 1 + j * room / planted; };

  std::string buffer;
  buffer.reserve(std::size_t{1} << 20);
  for (std::size_t c = 0; c < w.columns.size(); ++c) {
    if (c) buffer += ',';
    buffer += w.columns[c].header;
  }
  buffer += '\n';

  const GrowthTable growth;
  DemoLoan loan;
  for (std::size_t i = 0; i < n; ++i) {
    draw_deal(deal, growth, loan);
    draw_credit(credit, box, loan);
    w.fill(i, loan);
    std::size_t width = w.columns.size();
    if (next_plant < planted && i == plant_row(next_plant)) {
      const int kind = next_plant < rejects ? static_cast<int>(next_plant % kRejectKinds)
                                            : kRejectKinds + static_cast<int>(next_plant - rejects);
      width = w.plant(kind, loan);
      ++next_plant;
    }
    for (std::size_t c = 0; c < width; ++c) {
      if (c) buffer += ',';
      append_csv_cell(buffer, w.cells[c]);
    }
    buffer += '\n';
    if (buffer.size() > (std::size_t{1} << 20) - 4096) {
      out.write(buffer.data(), static_cast<std::streamsize>(buffer.size()));
      buffer.clear();
    }
  }
  out.write(buffer.data(), static_cast<std::streamsize>(buffer.size()));
}

}  // namespace poolbid
