// Row rules: the range and consistency checks that reject a row or warn about it, applied to
// staged rows once units are applied and defaults filled. Values here are decimals and months.
#include <fmt/core.h>

#include <cmath>

#include "tape/reader.h"

namespace poolbid::detail {
namespace {

// Reject bounds (rates and ratios as decimals): values outside them are mistakes, not loans.
constexpr double kMaxNoteRate = 0.25;               // 0-25%
constexpr double kMinLtv = 0.01, kMaxLtv = 3.00;    // 1-300%, original and combined
constexpr double kMinScore = 300, kMaxScore = 850;  // credit score range (common practice)
constexpr double kMaxDti = 1.00;                    // 0-100%
// ARM terms (common practice: margins run 1.5%-5%, periodic caps 1%-2%, resets every 6 or 12
// months); the bounds are wide, to catch mistakes rather than judge the loan.
constexpr double kMaxArmMargin = 0.15;       // 0-15%
constexpr double kMaxArmPeriodicCap = 0.15;  // above 0, at most 15%
constexpr int kMaxArmResetPeriod = 120;      // months: ten years

// Warning thresholds: unusual enough to look at, not enough to reject.
constexpr double kHighServicingFee = 0.02;  // 2%: servicing fees are a fraction of a percent
constexpr int kLongOriginalTerm = 480;      // months: 40 years

std::string money_text(double dollars) { return fmt::format("{:.2f}", dollars); }

// How a rate or ratio field is named in a reason, and its value in a row.
std::string_view rate_name(Field f) {
  switch (f) {
    case Field::note_rate: return "note rate";
    case Field::servicing_fee: return "servicing fee";
    case Field::arm_margin: return "ARM margin";
    case Field::arm_periodic_cap: return "ARM periodic cap";
    case Field::arm_lifetime_cap: return "ARM lifetime cap";
    case Field::arm_floor: return "ARM floor";
    case Field::original_ltv: return "original LTV";
    case Field::combined_ltv: return "combined LTV";
    default: return "DTI";
  }
}

double rate_value(const LoanArrays& l, Field f, std::size_t i) {
  return (l.*double_vector(f))[i];
}

// One staged row under check: its values, and the problems found so far.
struct RowCheck {
  Staging& staging;
  CellReader& cells;
  std::vector<RowProblem>& problems;
  std::size_t i;
  std::uint64_t reported = 0;  // bit per Field: the cell has its one problem
  bool warned = false;

  const LoanArrays& loans() const { return staging.loans; }
  bool has(Field f) const { return (staging.given[i] & bit(f)) != 0; }
  bool from(RowSource s) const { return (staging.source[i] & s) != 0; }
  bool rejected() const { return staging.rejected[i] != 0; }
  bool off_unit(Field f) const {
    return !staging.off_unit.empty() && (staging.off_unit[i] & bit(f)) != 0;
  }
  Unit unit(Field f) const { return staging.unit[static_cast<std::size_t>(f)]; }

  // The field whose cell a problem with f points at: a derived value points at its source.
  Field cell_field(Field f) const {
    if (f == Field::remaining_term && from(kRemainingFromMaturity)) return Field::maturity_date;
    if (f == Field::loan_age && from(kAgeFromFirstPayment)) return Field::first_payment_date;
    if (f == Field::loan_age && from(kAgeFromTerms)) return cell_field(Field::remaining_term);
    return f;
  }

  // A problem on f's cell, unless that cell has one already (the first found stands: rejects are
  // checked before warnings). A reason on a cell that disagrees with its column's unit says so,
  // unless `says_unit`.
  void add(Field f, std::string reason, bool reject, bool says_unit = false) {
    const Field shown = cell_field(f);
    if (reported & bit(shown)) return;
    reported |= bit(shown);
    if (off_unit(shown) && !says_unit)
      reason += unit(shown) == Unit::decimal ? " (column read as decimal)"
                                             : " (looks like a decimal in a percent column)";
    problems.push_back({loans().row[i], loans().loan_id[i], shown,
                        std::string(cells.columns->name(shown)), cells.cell(i, shown),
                        std::move(reason), reject});
    if (reject)
      staging.rejected[i] = 1;
    else
      warned = true;
  }
  void reject(Field f, std::string reason, bool says_unit = false) {
    add(f, std::move(reason), true, says_unit);
  }
  void warn(Field f, std::string reason, bool says_unit = false) {
    add(f, std::move(reason), false, says_unit);
  }
};

// A balance not above 0, or above kMaxLoanBalance (rare: apart from the per-row checks).
void reject_balance(RowCheck& c, Field f, double value, std::string_view name) {
  if (!(value > 0))
    c.reject(f, fmt::format("{} {} not above 0", name, money_text(value)));
  else
    c.reject(f, fmt::format("{} {} above $100,000,000: not a residential loan balance", name,
                            money_text(value)));
}

void check_balances(RowCheck& c) {
  const LoanArrays& l = c.loans();
  const double current = l.current_balance[c.i], original = l.original_balance[c.i];
  if (c.has(Field::current_balance) && !(current > 0 && current <= kMaxLoanBalance))
    reject_balance(c, Field::current_balance, current, "current balance");
  if (c.has(Field::original_balance) && !(original > 0 && original <= kMaxLoanBalance))
    reject_balance(c, Field::original_balance, original, "original balance");
}

bool note_rate_in_range(const RowCheck& c) {
  const double rate = c.loans().note_rate[c.i];
  return c.has(Field::note_rate) && rate >= 0 && rate <= kMaxNoteRate;
}

void check_rates(RowCheck& c) {
  const LoanArrays& l = c.loans();
  const std::size_t i = c.i;
  const bool rate_in_range = note_rate_in_range(c);
  if (c.has(Field::note_rate) && !rate_in_range)
    c.reject(Field::note_rate,
             fmt::format("note rate {} outside 0-25%", percent_text(l.note_rate[i])));
  if (!c.has(Field::servicing_fee)) return;
  const double fee = l.servicing_fee[i];
  if (!(fee >= 0)) {
    c.reject(Field::servicing_fee, fmt::format("servicing fee {} below 0", percent_text(fee)));
  } else if (rate_in_range && fee >= l.note_rate[i]) {
    const bool pooled = c.from(kServicingFeeDefault);
    const std::string fee_text = percent_text(fee) + (pooled ? " (pool default)" : "");
    if (c.off_unit(Field::note_rate) && c.unit(Field::note_rate) == Unit::percent) {
      // A decimal in a percent column is the likelier fault than the fee beside it: name it.
      c.reject(Field::note_rate,
               fmt::format("note rate {} looks like a decimal in a percent column (the servicing "
                           "fee {} is not below it)",
                           percent_text(l.note_rate[i]), fee_text),
               /*says_unit=*/true);
    } else {
      // A pool default has no cell: point at the note rate instead.
      c.reject(pooled ? Field::note_rate : Field::servicing_fee,
               fmt::format("servicing fee {} not below note rate {}", fee_text,
                           percent_text(l.note_rate[i])));
    }
  }
}

void check_terms(RowCheck& c) {
  const LoanArrays& l = c.loans();
  const std::size_t i = c.i;
  const bool original = c.has(Field::original_term) && l.original_term[i] > 0;
  if (c.has(Field::original_term) && !original)
    c.reject(Field::original_term,
             fmt::format("original term {} months not above 0", l.original_term[i]));
  if (c.has(Field::remaining_term)) {
    const int remaining = l.remaining_term[i];
    if (remaining <= 0)
      c.reject(Field::remaining_term,
               fmt::format("remaining term {} months not above 0", remaining));
    else if (original && remaining > l.original_term[i])
      c.reject(Field::remaining_term,
               fmt::format("remaining term {} months above the original term {}", remaining,
                           l.original_term[i]));
  }
  // An age taken from the terms is below 0 only when remaining > original, rejected above.
  if (c.has(Field::loan_age) && !c.from(kAgeFromTerms) && l.age[i] < 0)
    c.reject(Field::loan_age, fmt::format("loan age {} months below 0", l.age[i]));
}

void check_credit(RowCheck& c) {
  const LoanArrays& l = c.loans();
  const std::size_t i = c.i;
  auto ltv = [&](Field f, double value, std::string_view name) {
    if (c.has(f) && !(value >= kMinLtv && value <= kMaxLtv))
      c.reject(f, fmt::format("{} {} outside 1-300%", name, percent_text(value)));
  };
  ltv(Field::original_ltv, l.original_ltv[i], "original LTV");
  ltv(Field::combined_ltv, l.combined_ltv[i], "combined LTV");
  if (c.has(Field::credit_score) &&
      !(l.credit_score[i] >= kMinScore && l.credit_score[i] <= kMaxScore))
    c.reject(Field::credit_score,
             fmt::format("credit score {} outside 300-850", l.credit_score[i]));
  if (c.has(Field::dti) && !(l.dti[i] >= 0 && l.dti[i] <= kMaxDti))
    c.reject(Field::dti, fmt::format("DTI {} outside 0-100%", percent_text(l.dti[i])));
}

// An ARM's terms: present where the loan cannot do without them, and each in its range. The
// lifetime cap and floor are absolute rates, so the note rate must lie between them. Checked on
// ARMs only: sellers often fill a fixed-rate loan's ARM columns with zeros.
void check_arm(RowCheck& c) {
  const LoanArrays& l = c.loans();
  const std::size_t i = c.i;
  if (!c.has(Field::arm_index) || l.arm_index[i] == 0)
    c.reject(Field::arm_index, "ARM without an index (its coupon follows the index)");
  if (!c.has(Field::arm_margin)) {
    c.reject(Field::arm_margin, "ARM without a margin");
  } else if (const double margin = l.arm_margin[i]; !(margin >= 0 && margin <= kMaxArmMargin)) {
    c.reject(Field::arm_margin, fmt::format("ARM margin {} outside 0-15%", percent_text(margin)));
  }
  if (c.has(Field::arm_periodic_cap)) {
    const double cap = l.arm_periodic_cap[i];
    if (!(cap > 0))
      c.reject(Field::arm_periodic_cap,
               fmt::format("ARM periodic cap {} not above 0", percent_text(cap)));
    else if (cap > kMaxArmPeriodicCap)
      c.reject(Field::arm_periodic_cap,
               fmt::format("ARM periodic cap {} above 15%", percent_text(cap)));
  }
  const bool rate = note_rate_in_range(c);
  const double note = l.note_rate[i];
  const bool lifetime_cap = c.has(Field::arm_lifetime_cap);
  const double cap = l.arm_lifetime_cap[i];
  if (lifetime_cap && rate && note > cap)
    c.reject(Field::arm_lifetime_cap,
             fmt::format("ARM lifetime cap {} below the note rate {}", percent_text(cap),
                         percent_text(note)));
  if (c.has(Field::arm_floor)) {
    const double floor = l.arm_floor[i];
    if (!(floor >= 0))
      c.reject(Field::arm_floor, fmt::format("ARM floor {} below 0", percent_text(floor)));
    else if (lifetime_cap && floor > cap)
      c.reject(Field::arm_floor, fmt::format("ARM floor {} above the lifetime cap {}",
                                             percent_text(floor), percent_text(cap)));
    else if (rate && note < floor)
      c.reject(Field::arm_floor, fmt::format("ARM floor {} above the note rate {}",
                                             percent_text(floor), percent_text(note)));
  }
  const int first = l.arm_first_reset[i];
  if (!c.has(Field::arm_first_reset))
    c.reject(Field::arm_first_reset, "ARM without a first reset month");
  else if (first <= 0)
    c.reject(Field::arm_first_reset, fmt::format("ARM first reset month {} not above 0", first));
  else if (c.has(Field::original_term) && l.original_term[i] > 0 && first > l.original_term[i])
    c.reject(Field::arm_first_reset,
             fmt::format("ARM first reset month {} beyond the original term {}", first,
                         l.original_term[i]));
  const int period = l.arm_reset_period[i];
  if (!c.has(Field::arm_reset_period))
    c.reject(Field::arm_reset_period, "ARM without a reset period");
  else if (period <= 0)
    c.reject(Field::arm_reset_period,
             fmt::format("ARM reset period {} months not above 0", period));
  else if (period > kMaxArmResetPeriod)
    c.reject(Field::arm_reset_period,
             fmt::format("ARM reset period {} months above 120", period));
}

// A balloon month, on whatever type of loan carries one, must fall after the loan age and within
// the original term: the projection pays the balance off in that month.
void check_balloon_month(RowCheck& c) {
  const LoanArrays& l = c.loans();
  const std::size_t i = c.i;
  const bool known = c.has(Field::loan_age) && c.has(Field::original_term);
  const int month = l.balloon_month[i];
  const bool ok = c.has(Field::balloon_month) &&
                  (known ? month > l.age[i] && month <= l.original_term[i] : month > 0);
  if (!ok)
    c.reject(Field::balloon_month,
             known ? fmt::format("balloon loan without a balloon month after the loan age "
                                 "({}) and within the original term ({})",
                                 l.age[i], l.original_term[i])
                   : std::string("balloon loan without a balloon month"));
}

// Terms that an ARM, interest-only or balloon loan cannot do without. Interest-only months and a
// balloon month are projected on any loan that has them (interest-only ARMs are common); on a loan
// whose type does not say so, a warning says how it will be projected.
void check_amortization(RowCheck& c) {
  const LoanArrays& l = c.loans();
  const std::size_t i = c.i;
  const Amortization type = l.amortization[i];
  if (type == Amortization::arm) check_arm(c);
  if (type == Amortization::interest_only && !(c.has(Field::io_months) && l.io_months[i] > 0))
    c.reject(Field::io_months, "interest-only loan without io_months above 0");
  const bool has_balloon = c.has(Field::balloon_month) && l.balloon_month[i] > 0;
  if (type == Amortization::balloon || has_balloon) check_balloon_month(c);
  if (c.rejected()) return;
  if (type != Amortization::balloon && has_balloon)
    c.warn(Field::balloon_month,
           fmt::format("balloon month {} on a loan typed {}: projected as a balloon",
                       l.balloon_month[i], to_string(type)));
  if (type == Amortization::fixed && c.has(Field::io_months) && l.io_months[i] > 0)
    c.warn(Field::io_months,
           fmt::format("{} interest-only months on a loan typed fixed: projected as "
                       "interest-only for them",
                       l.io_months[i]));
}

// Cells (`bits`, one per Field) that disagree with their column's unit and have no problem yet:
// no range rule caught them. In a decimal column the cell is rejected: read as decimal it is
// likely 100 times what was meant, and reading it as percent would be a guess. In a percent
// column it is a warning (on the `warnings` pass), as a small percent may be meant.
void report_off_unit(RowCheck& c, std::uint64_t bits, bool warnings) {
  for (; bits != 0; bits &= bits - 1) {
    const Field f = static_cast<Field>(__builtin_ctzll(bits));
    const std::string value = percent_text(rate_value(c.loans(), f, c.i));
    if (c.unit(f) == Unit::decimal && !warnings)
      c.reject(f, fmt::format("{} {}: looks like percent in a column read as decimal",
                              rate_name(f), value),
               /*says_unit=*/true);
    else if (c.unit(f) == Unit::percent && warnings)
      c.warn(f, fmt::format("{} {} looks like a decimal in a percent column", rate_name(f), value),
             /*says_unit=*/true);
  }
}

void check_units(RowCheck& c, bool warnings) {
  if (c.staging.off_unit.empty()) return;  // no cell of the tape disagrees: the usual case
  const std::uint64_t bits = c.staging.off_unit[c.i] & ~c.reported;
  if (bits != 0) report_off_unit(c, bits, warnings);
}

void check_warnings(RowCheck& c, const RuleOptions& options) {
  const LoanArrays& l = c.loans();
  const std::size_t i = c.i;
  check_units(c, /*warnings=*/true);
  if (c.has(Field::loan_age) && !c.from(kAgeFromTerms) && c.has(Field::remaining_term)) {
    const int sum = l.age[i] + l.remaining_term[i];
    if (std::abs(sum - l.original_term[i]) > options.term_tolerance_months)
      c.warn(Field::remaining_term,
             fmt::format("loan age {} + remaining term {} = {} months, original term {}", l.age[i],
                         l.remaining_term[i], sum, l.original_term[i]));
  }
  if (c.has(Field::combined_ltv) && c.has(Field::original_ltv) &&
      l.combined_ltv[i] < l.original_ltv[i])
    c.warn(Field::combined_ltv,
           fmt::format("combined LTV {} below original LTV {}", percent_text(l.combined_ltv[i]),
                       percent_text(l.original_ltv[i])));
  // One warning for a loan this large, on the current balance if it is, else the original.
  if (l.current_balance[i] > kLargeLoanBalance)
    c.warn(Field::current_balance, fmt::format("current balance {} above $5,000,000 (jumbo: "
                                               "check it)",
                                               money_text(l.current_balance[i])));
  else if (c.has(Field::original_balance) && l.original_balance[i] > kLargeLoanBalance)
    c.warn(Field::original_balance, fmt::format("original balance {} above $5,000,000 (jumbo: "
                                                "check it)",
                                                money_text(l.original_balance[i])));
  if (c.has(Field::original_balance) && l.current_balance[i] > l.original_balance[i])
    c.warn(Field::current_balance,
           fmt::format("current balance {} above original balance {}",
                       money_text(l.current_balance[i]), money_text(l.original_balance[i])));
  if (!c.from(kServicingFeeDefault) && l.servicing_fee[i] > kHighServicingFee)
    c.warn(Field::servicing_fee,
           fmt::format("servicing fee {} above 2%", percent_text(l.servicing_fee[i])));
  if (l.original_term[i] > kLongOriginalTerm)
    c.warn(Field::original_term,
           fmt::format("original term {} months above 480", l.original_term[i]));
}

}  // namespace

std::string percent_text(double decimal) { return fmt::format("{:g}%", decimal * 100); }

std::string CellReader::cell(std::size_t index, Field f) {
  if (!columns->has(f)) return "";
  if (cached_row != index) {
    // The record was read once already, so reading it again cannot fail.
    scanner = start_csv_at(text, std::string(file), max_record_bytes, staging->offset[index],
                           staging->loans.row[index]);
    next_record(scanner, record);
    cached_row = index;
  }
  return std::string(record.fields[columns->at(f)]);
}

std::size_t check_rows(Staging& staging, CellReader& cells, const RuleOptions& options,
                       std::vector<RowProblem>& problems) {
  std::size_t warned_rows = 0;
  const std::size_t found_reading = problems.size();  // in row order; rows are checked in order
  std::size_t next = 0;
  for (std::size_t i = 0; i < staging.rejected.size(); ++i) {
    RowCheck c{staging, cells, problems, i};
    const std::size_t row = staging.loans.row[i];
    while (next < found_reading && problems[next].row < row) ++next;
    for (; next < found_reading && problems[next].row == row; ++next)
      if (problems[next].field) c.reported |= bit(*problems[next].field);
    check_balances(c);
    check_rates(c);
    check_terms(c);
    check_credit(c);
    check_amortization(c);
    check_units(c, /*warnings=*/false);
    if (c.rejected()) continue;  // its rejects are enough to act on
    check_warnings(c, options);
    if (c.warned) ++warned_rows;
  }
  return warned_rows;
}

}  // namespace poolbid::detail
