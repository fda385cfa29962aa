// Reading plan: from a tape's header and the options, what to read from each column and how:
// required columns, cut-off, servicing fee default, seller, units, spellings, file-level notes.
#include <fmt/core.h>

#include <algorithm>
#include <filesystem>

#include "tape/fields.h"
#include "tape/reader.h"

namespace poolbid::detail {
namespace {

CellKind kind_of(Field f) {
  switch (f) {
    case Field::loan_id: return CellKind::loan_id;
    case Field::seller: return CellKind::seller;
    case Field::arm_index: return CellKind::arm_index;
    case Field::current_balance:
    case Field::original_balance:
    case Field::property_value: return CellKind::money;
    case Field::original_term:
    case Field::remaining_term:
    case Field::loan_age:
    case Field::io_months:
    case Field::balloon_month:
    case Field::arm_first_reset:
    case Field::arm_reset_period: return CellKind::whole;
    case Field::credit_score: return CellKind::score;
    case Field::property_value_date: return CellKind::date;
    case Field::first_payment_date: return CellKind::first_payment;
    case Field::maturity_date: return CellKind::maturity;
    case Field::state: return CellKind::state;
    default: return is_category(f) ? CellKind::category : CellKind::rate;
  }
}

}  // namespace

std::vector<double> LoanArrays::*double_vector(Field f) {
  switch (f) {
    case Field::current_balance: return &LoanArrays::current_balance;
    case Field::original_balance: return &LoanArrays::original_balance;
    case Field::property_value: return &LoanArrays::property_value;
    case Field::note_rate: return &LoanArrays::note_rate;
    case Field::servicing_fee: return &LoanArrays::servicing_fee;
    case Field::arm_margin: return &LoanArrays::arm_margin;
    case Field::arm_periodic_cap: return &LoanArrays::arm_periodic_cap;
    case Field::arm_lifetime_cap: return &LoanArrays::arm_lifetime_cap;
    case Field::arm_floor: return &LoanArrays::arm_floor;
    case Field::original_ltv: return &LoanArrays::original_ltv;
    case Field::combined_ltv: return &LoanArrays::combined_ltv;
    case Field::dti: return &LoanArrays::dti;
    default: return &LoanArrays::credit_score;
  }
}

namespace {

std::vector<std::int32_t> LoanArrays::*int_vector(Field f) {
  switch (f) {
    case Field::original_term: return &LoanArrays::original_term;
    case Field::remaining_term: return &LoanArrays::remaining_term;
    case Field::loan_age: return &LoanArrays::age;
    case Field::io_months: return &LoanArrays::io_months;
    case Field::balloon_month: return &LoanArrays::balloon_month;
    case Field::arm_first_reset: return &LoanArrays::arm_first_reset;
    default: return &LoanArrays::arm_reset_period;
  }
}

void fill_state_table(Plan& plan) {
  for (char a = 'A'; a <= 'Z'; ++a)
    for (char b = 'A'; b <= 'Z'; ++b)
      plan.state_by_letters[static_cast<std::size_t>((a - 'A') * 26 + (b - 'A'))] =
          state_index(std::string{a, b}).value_or(0);
}

[[noreturn]] void throw_missing(std::string_view file, std::string_view what,
                                const std::vector<std::string>& looked_for) {
  std::string names;
  for (const std::string& name : looked_for) names += (names.empty() ? "'" : ", '") + name + "'";
  throw tape_error(ErrorKind::missing_column, file, 0, "", "",
                   fmt::format("no column for {} (looked for {})", what, names));
}

void require_columns(const ColumnIndex& columns, const ColumnMap* map, std::string_view file) {
  for (Field f : {Field::loan_id, Field::current_balance, Field::note_rate, Field::original_term})
    if (!columns.has(f)) throw_missing(file, field_name(f), names_looked_for(f, map));
  if (!columns.has(Field::remaining_term) && !columns.has(Field::maturity_date)) {
    std::vector<std::string> names = names_looked_for(Field::remaining_term, map);
    for (std::string& name : names_looked_for(Field::maturity_date, map)) names.push_back(name);
    throw_missing(file, "remaining_term or maturity_date", names);
  }
}

// A date column that turns into months needs the cut-off. Returns whether it is read.
bool use_date_column(const ColumnIndex& columns, const std::optional<Date>& cutoff, Field date,
                     Field alternative, std::string_view file, std::vector<std::string>& notes) {
  if (!columns.has(date)) return false;
  if (cutoff) return true;
  if (!columns.has(alternative))
    throw tape_error(ErrorKind::bad_option, file, 0, columns.name(date), "",
                     fmt::format("{} gives {} only with a cut-off date: give --cutoff or the "
                                 "map's cutoff_date",
                                 field_name(date), field_name(alternative)));
  notes.push_back(fmt::format("{} not used: no cut-off date ({} is used alone)", field_name(date),
                              field_name(alternative)));
  return false;
}

std::string quoted_list(const std::vector<std::string>& names) {
  std::string out;
  for (const std::string& name : names) out += (out.empty() ? "'" : ", '") + name + "'";
  return out;
}

// One step per column a field uses, in header order; date columns not used are left out.
std::vector<Step> steps_for(const ColumnIndex& columns, const Plan& plan, bool maturity,
                            bool first_payment) {
  std::vector<Step> steps;
  for (std::size_t column = 0; column < columns.header.size(); ++column) {
    for (std::size_t i = 0; i < kFieldCount; ++i) {
      const Field f = static_cast<Field>(i);
      if (columns.at(f) != column) continue;
      if ((f == Field::maturity_date && !maturity) ||
          (f == Field::first_payment_date && !first_payment))
        continue;
      Step step{f, column, kind_of(f)};
      step.required = f == Field::loan_id || f == Field::current_balance || f == Field::note_rate ||
                      f == Field::original_term || (f == Field::servicing_fee && !plan.default_fee);
      step.number = step.kind == CellKind::money || step.kind == CellKind::rate ||
                    step.kind == CellKind::whole || step.kind == CellKind::score;
      if (step.number && step.kind != CellKind::whole) step.doubles = double_vector(f);
      if (step.kind == CellKind::whole) step.ints = int_vector(f);
      if (step.kind == CellKind::rate) step.decimal_ceiling = decimal_detection_ceiling(f);
      steps.push_back(step);
    }
  }
  return steps;
}

}  // namespace

Plan make_plan(const ColumnIndex& columns, const ReadOptions& options, std::string_view file) {
  const ColumnMap* map = options.map ? &*options.map : nullptr;
  require_columns(columns, map, file);
  Plan plan;
  fill_state_table(plan);
  plan.cutoff = options.cutoff ? options.cutoff : map ? map->cutoff : std::nullopt;
  plan.default_fee = options.default_servicing_fee ? options.default_servicing_fee
                     : map                         ? map->default_servicing_fee
                                                   : std::nullopt;
  if (!columns.has(Field::servicing_fee) && !plan.default_fee)
    throw tape_error(ErrorKind::missing_column, file, 0, "", "",
                     fmt::format("no column for servicing_fee (looked for {}) and no default: "
                                 "give --servicing-fee or the map's defaults.servicing_fee",
                                 quoted_list(names_looked_for(Field::servicing_fee, map))));
  if (!columns.ignored.empty())
    plan.notes.push_back("ignored columns: " + quoted_list(columns.ignored));
  const bool maturity = use_date_column(columns, plan.cutoff, Field::maturity_date,
                                        Field::remaining_term, file, plan.notes);
  const bool first_payment = use_date_column(columns, plan.cutoff, Field::first_payment_date,
                                             Field::loan_age, file, plan.notes);

  plan.steps = steps_for(columns, plan, maturity, first_payment);
  if (map) {
    for (const auto& [f, unit] : map->units) plan.unit[static_cast<std::size_t>(f)] = unit;
    for (const auto& [f, table] : map->values)
      for (const auto& [theirs, ours] : table)
        plan.spellings[static_cast<std::size_t>(f)].push_back(
            {fold_spelling(theirs), parse_category(f, ours).value_or(0)});
  }

  if (map && map->seller) {
    plan.default_seller = *map->seller;
  } else {
    plan.default_seller = std::filesystem::path(std::string(file)).stem().string();
    if (plan.default_seller.empty()) plan.default_seller = std::string(file);
    if (!columns.has(Field::seller))
      plan.notes.push_back(
          fmt::format("no seller column and no seller in a map: seller named '{}' after the file",
                      plan.default_seller));
  }
  if (!columns.has(Field::servicing_fee))
    plan.notes.push_back(fmt::format("no servicing_fee column: pool default {} used for every loan",
                                     percent_text(*plan.default_fee)));
  if (!columns.has(Field::delinquency))
    plan.notes.push_back("no delinquency column: every loan's delinquency status is unknown");
  if (!columns.has(Field::loan_age) && !first_payment)
    plan.notes.push_back(
        "no loan_age or first_payment_date column: loan age taken as original term - remaining "
        "term");
  return plan;
}

bool has_step(const Plan& plan, Field f) {
  return std::any_of(plan.steps.begin(), plan.steps.end(),
                     [f](const Step& s) { return s.field == f; });
}

std::uint8_t state_of(const Plan& plan, std::string_view code) {
  if (code.size() != 2) return 0;
  const auto letter = [](char ch) {
    const char upper = (ch >= 'a' && ch <= 'z') ? static_cast<char>(ch - 'a' + 'A') : ch;
    return (upper >= 'A' && upper <= 'Z') ? upper - 'A' : -1;
  };
  const int a = letter(code[0]), b = letter(code[1]);
  if (a < 0 || b < 0) return 0;
  return plan.state_by_letters[static_cast<std::size_t>(a * 26 + b)];
}

}  // namespace poolbid::detail
