// The loan-level model in reports: the model and scenario line, the "model" JSON object, and why
// the model treats one loan as it does (`--explain`), as text and JSON.
#include <cmath>
#include <string>
#include <utility>
#include <vector>

#include <fmt/core.h>

#include "cashflow/cashflow.h"
#include "curves/curves.h"
#include "report/compare_parts.h"
#include "report/format.h"
#include "report/model_parts.h"
#include "report/report.h"

namespace poolbid {
namespace {

using detail::Align;
using detail::Json;
using detail::number_or_null;

// A decimal as percent with `decimals` places: 0.0125 -> "1.25"; "-" when not finite.
std::string pct(double x, int decimals) { return detail::fixed_or_dash(100 * x, decimals); }

// A multiplier: 1.25 -> "1.250".
std::string times(double x) { return detail::fixed_or_dash(x, 3); }

std::string delinquency_text(const LoanExplanation& e) {
  const std::string status = e.delinquency.empty() || e.delinquency == "unknown"
                                 ? std::string("not given")
                                 : detail::display_text(e.delinquency, detail::kValueWidth);
  if (e.roll_months <= 0) return status;
  return fmt::format("{}: {}% of the balance rolls to default over {} months", status,
                     pct(e.roll_share, 1), e.roll_months);
}

}  // namespace

std::string model_line(const ModelNote& note) {
  std::string out = fmt::format(
      "Model: loan-level ({} tables)",
      note.tables == "built-in" ? std::string("built-in")
                                : detail::display_text(note.tables, 200));
  if (note.scenario)
    out += fmt::format(", scenario {}: {}", detail::display_text(note.scenario->name, 64),
                       detail::scenario_text(*note.scenario));
  return out;
}

std::string explain_text(const LoanExplanation& e) {
  std::string out = fmt::format("explanation of loan {} (row {})\n",
                                detail::display_text(e.loan_id, detail::kLoanIdWidth, "(no id)"),
                                e.row);
  detail::TextTable factors{{"factor", "value", "band", "default x", "refinance x"},
                            {Align::left, Align::left, Align::left, Align::right, Align::right},
                            {}};
  for (const FactorLine& f : e.factors)
    factors.rows.push_back({detail::display_text(f.factor, detail::kValueWidth),
                            detail::display_text(f.value, detail::kValueWidth),
                            detail::display_text(f.band, 64), times(f.default_multiplier),
                            times(f.prepay_multiplier)});
  out += detail::render(factors);

  detail::TextTable month1{{}, {Align::left, Align::right, Align::left}, {}};
  month1.rows = {
      {"property value at cut-off", detail::dollars(e.property_value), ""},
      {"junior liens", detail::dollars(e.junior_liens), "held"},
      {"updated LTV at cut-off", pct(e.updated_ltv, 1) + "%",
       "(balance + junior liens) / property value"},
      {"default multiplier", times(e.default_multiplier), "every factor and the scenario"},
      {"base CDR, month 1", pct(e.base_cdr_month1, 4) + "%", "the reference borrower"},
      {"CDR, month 1", pct(e.cdr_month1, 4) + "%", "this loan"},
      {"delinquency", "", delinquency_text(e)},
      {"refinance incentive, month 1", pct(e.incentive_month1, 3) + "%",
       "note rate less the market mortgage rate"},
      {"turnover CPR, month 1", pct(e.turnover_cpr_month1, 3) + "%", ""},
      {"refinance CPR, month 1", pct(e.refi_cpr_month1, 3) + "%", ""},
      {"CPR, month 1", pct(e.cpr_month1, 3) + "%", "turnover and refinance together"},
      {"severity if it defaulted in month 1", pct(e.severity_month1, 2) + "%",
       "lost interest included"},
      {"liquidation timeline", detail::count_of(static_cast<std::size_t>(std::max(
                                                    e.timeline_months, 0)),
                                                "month", "months"),
       "the state's foreclosure timeline"},
  };
  out += detail::render(month1);
  return out;
}

std::string explain_json(const LoanExplanation& e) {
  return detail::dump_json(detail::explanation_json(e));
}

namespace detail {

Json explanation_json(const LoanExplanation& e) {
  Json factors = Json::array();
  for (const FactorLine& f : e.factors)
    factors.push_back(Json{{"factor", f.factor},
                           {"value", f.value},
                           {"band", f.band},
                           {"default_multiplier", number_or_null(f.default_multiplier)},
                           {"prepay_multiplier", number_or_null(f.prepay_multiplier)}});
  return Json{
      {"loan_id", e.loan_id},
      {"row", e.row},
      {"factors", std::move(factors)},
      {"property_value", number_or_null(e.property_value)},
      {"junior_liens", number_or_null(e.junior_liens)},
      {"updated_ltv", number_or_null(e.updated_ltv)},
      {"default_multiplier", number_or_null(e.default_multiplier)},
      {"base_cdr_month1", number_or_null(e.base_cdr_month1)},
      {"cdr_month1", number_or_null(e.cdr_month1)},
      {"delinquency", e.delinquency},
      {"roll_share", number_or_null(e.roll_share)},
      {"roll_months", e.roll_months},
      {"incentive_month1", number_or_null(e.incentive_month1)},
      {"turnover_cpr_month1", number_or_null(e.turnover_cpr_month1)},
      {"refi_cpr_month1", number_or_null(e.refi_cpr_month1)},
      {"cpr_month1", number_or_null(e.cpr_month1)},
      {"severity_month1", number_or_null(e.severity_month1)},
      {"timeline_months", e.timeline_months},
  };
}

std::string model_section(const ModelNote& note, const Assumptions& assumptions) {
  std::string out = model_line(note) + "\n";
  if (note.scenario && !note.scenario->description.empty())
    out += fmt::format("  {}\n", display_text(note.scenario->description, 200));
  out += fmt::format("  tables: {}",
                     note.tables == "built-in"
                         ? std::string("built-in, illustrative (README: Loan-level model)")
                         : display_text(note.tables, 200));
  if (!note.scenarios.empty())
    out += fmt::format("; scenarios: {}", note.scenarios == "built-in"
                                              ? std::string("built-in set")
                                              : display_text(note.scenarios, 200));
  out += '\n';
  out += fmt::format("  advancing: {} (the model sets prepayment, default, severity and the "
                     "liquidation lag)\n",
                     to_string(assumptions.advancing));
  return out;
}

std::string explanation_section(const ModelNote& note) {
  return note.explanation ? "\n" + explain_text(*note.explanation) : std::string();
}

Json model_json(const ModelNote& note) {
  return Json{
      {"tables", note.tables},
      {"scenarios", note.scenarios.empty() ? Json(nullptr) : Json(note.scenarios)},
      {"scenario", note.scenario ? scenario_json(*note.scenario) : Json(nullptr)},
      {"explanation", note.explanation ? explanation_json(*note.explanation) : Json(nullptr)},
  };
}

Json model_assumptions_json(const Assumptions& assumptions) {
  return Json{{"advancing", std::string(to_string(assumptions.advancing))}};
}

Json insert_after(const Json& document, std::string_view after, std::string_view key, Json value) {
  Json out = Json::object();
  bool placed = false;
  for (auto it = document.begin(); it != document.end(); ++it) {
    out[it.key()] = it.value();
    if (!placed && it.key() == after) {
      out[std::string(key)] = value;
      placed = true;
    }
  }
  if (!placed) out[std::string(key)] = std::move(value);
  return out;
}

std::string tables_name(const CreditModel& model) {
  return model == default_credit_model() ? "built-in" : "custom";
}

}  // namespace detail
}  // namespace poolbid
