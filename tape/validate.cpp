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
constexpr double kMinScore = 300, kMaxScore = 850;  // the FICO score range
constexpr double kMaxDti = 1.00;                    // 0-100%

// Warning thresholds: unusual enough to look at, not enough to reject.
constexpr double kLowNoteRate = 0.005;      // 0.5%: likely a decimal in a percent column
constexpr double kHighServicingFee = 0.02;  // 2%: servicing fees are a fraction of a percent
constexpr int kLongOriginalTerm = 480;      // months: 40 years

std::string money_text(double dollars) { return fmt::format("{:.2f}", dollars); }

// One staged row under check: its values, and the problems found so far.
struct RowCheck {
  Staging& staging;
  CellReader& cells;
  std::vector<RowProblem>& problems;
  std::size_t i;
  bool warned = false;

  const LoanArrays& loans() const { return staging.loans; }
  bool has(Field f) const { return (staging.given[i] & bit(f)) != 0; }
  bool from(RowSource s) const { return (staging.source[i] & s) != 0; }
  bool rejected() const { return staging.rejected[i] != 0; }

  // The field whose cell a problem with f points at: a derived value points at its source.
  Field cell_field(Field f) const {
    if (f == Field::remaining_term && from(kRemainingFromMaturity)) return Field::maturity_date;
    if (f == Field::loan_age && from(kAgeFromFirstPayment)) return Field::first_payment_date;
    if (f == Field::loan_age && from(kAgeFromTerms)) return cell_field(Field::remaining_term);
    return f;
  }

  void add(Field f, std::string reason, bool reject) {
    const Field shown = cell_field(f);
    problems.push_back({loans().row[i], loans().loan_id[i], shown,
                        std::string(cells.columns->name(shown)), cells.cell(i, shown),
                        std::move(reason), reject});
    if (reject)
      staging.rejected[i] = 1;
    else
      warned = true;
  }
  void reject(Field f, std::string reason) { add(f, std::move(reason), true); }
  void warn(Field f, std::string reason) { add(f, std::move(reason), false); }
};

void check_balances(RowCheck& c) {
  const LoanArrays& l = c.loans();
  if (c.has(Field::current_balance) && !(l.current_balance[c.i] > 0))
    c.reject(Field::current_balance,
             fmt::format("current balance {} not above 0", money_text(l.current_balance[c.i])));
  if (c.has(Field::original_balance) && !(l.original_balance[c.i] > 0))
    c.reject(Field::original_balance,
             fmt::format("original balance {} not above 0", money_text(l.original_balance[c.i])));
}

void check_rates(RowCheck& c) {
  const LoanArrays& l = c.loans();
  const std::size_t i = c.i;
  const bool rate_in_range =
      c.has(Field::note_rate) && l.note_rate[i] >= 0 && l.note_rate[i] <= kMaxNoteRate;
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
    if (l.note_rate[i] < kLowNoteRate) {
      // A tiny note rate is the likelier fault (a decimal in a percent column): name it.
      c.reject(Field::note_rate,
               fmt::format("note rate {} below 0.5%: a decimal in a percent column? (the "
                           "servicing fee {} is not below it)",
                           percent_text(l.note_rate[i]), fee_text));
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

// Terms that an ARM, interest-only or balloon loan cannot do without.
void check_amortization(RowCheck& c) {
  const LoanArrays& l = c.loans();
  const std::size_t i = c.i;
  switch (l.amortization[i]) {
    case Amortization::fixed: return;
    case Amortization::arm:
      if (!c.has(Field::arm_margin)) c.reject(Field::arm_margin, "ARM without a margin");
      if (!(c.has(Field::arm_first_reset) && l.arm_first_reset[i] > 0))
        c.reject(Field::arm_first_reset, "ARM without a first reset month above 0");
      if (!(c.has(Field::arm_reset_period) && l.arm_reset_period[i] > 0))
        c.reject(Field::arm_reset_period, "ARM without a reset period above 0");
      return;
    case Amortization::interest_only:
      if (!(c.has(Field::io_months) && l.io_months[i] > 0))
        c.reject(Field::io_months, "interest-only loan without io_months above 0");
      return;
    case Amortization::balloon: {
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
      return;
    }
  }
}

void check_warnings(RowCheck& c, const RuleOptions& options) {
  const LoanArrays& l = c.loans();
  const std::size_t i = c.i;
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
  if (c.has(Field::original_balance) && l.current_balance[i] > l.original_balance[i])
    c.warn(Field::current_balance,
           fmt::format("current balance {} above original balance {}",
                       money_text(l.current_balance[i]), money_text(l.original_balance[i])));
  if (l.note_rate[i] < kLowNoteRate)
    c.warn(Field::note_rate, fmt::format("note rate {} below 0.5%: a decimal in a percent column?",
                                         percent_text(l.note_rate[i])));
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
  for (std::size_t i = 0; i < staging.rejected.size(); ++i) {
    RowCheck c{staging, cells, problems, i};
    check_balances(c);
    check_rates(c);
    check_terms(c);
    check_credit(c);
    check_amortization(c);
    if (c.rejected()) continue;  // its rejects are enough to act on
    check_warnings(c, options);
    if (c.warned) ++warned_rows;
  }
  return warned_rows;
}

}  // namespace poolbid::detail
