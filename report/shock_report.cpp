// `poolbid shock` reports: a held pool before and after a shock -- value, P&L, expected loss,
// defaults, WAL, duration, Z-spread -- as text and JSON, and each loan's P&L as CSV. Units: JSON
// rates and spreads decimals, prices percent of cut-off UPB, money dollars, _pct keys percent.
#include <cmath>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include <fmt/core.h>

#include "cashflow/cashflow.h"
#include "curves/curves.h"
#include "pricing/pricing.h"
#include "report/compare_parts.h"
#include "report/format.h"
#include "report/model_parts.h"
#include "report/report.h"
#include "tape/tape.h"

namespace poolbid {
namespace {

using detail::Align;
using detail::CsvBuffer;
using detail::Json;
using detail::number_or_null;

constexpr int kPriceDecimals = 3;    // percent of UPB
constexpr int kRateDecimals = 3;     // percent
constexpr int kBpDecimals = 1;
constexpr int kYearsDecimals = 2;
constexpr int kPctDecimals = 4;      // defaults and losses, percent of UPB
constexpr int kCsvPriceDecimals = 6;

// x with a sign: "+1.250", "-0.500", "0.000" when it rounds to zero; "-" when not finite.
std::string signed_fixed(double x, int decimals) {
  const std::string text = detail::fixed_or_dash(x, decimals);
  if (text == "-" || text.front() == '-') return text;
  return text.find_first_not_of("0.") == std::string::npos ? text : "+" + text;
}
std::string signed_dollars(double x) {
  const std::string text = detail::dollars(x);
  if (text == "-" || text.front() == '-' || text == "$0.00") return text;
  return "+" + text;
}

double accrued_pct(const BidResult& r) {
  return r.cutoff_balance > 0 ? 100 * r.accrued / r.cutoff_balance : std::nan("");
}

// The pricing cut-off; the tape's, when it has one, must be the same day.
Date cutoff_of(const TapeRead& tape, const ShockRequest& request) {
  const Date cutoff = request.held.settlement.cutoff;
  if (!cutoff.ok())
    throw std::invalid_argument("shock report: the settlement has no valid cut-off date");
  if (tape.cutoff && *tape.cutoff != cutoff)
    throw std::invalid_argument(fmt::format(
        "shock report: the tape's cut-off {} differs from the settlement's cut-off {}",
        detail::iso_date(*tape.cutoff), detail::iso_date(cutoff)));
  return cutoff;
}

void check_model(const ShockRequest& request) {
  if (!request.held.model)
    throw std::invalid_argument("shock report: the held pool was not valued with the model");
}

std::string curve_text(const YieldCurve& curve) {
  detail::TextTable table{{}, {Align::left, Align::left}, {}};
  table.rows.push_back({"source", detail::display_text(curve.source, 200)});
  table.rows.push_back({"as of", detail::iso_date(curve.as_of)});
  if (!curve.description.empty())
    table.rows.push_back({"description", detail::display_text(curve.description, 200)});
  table.rows.push_back(
      {"rates", curve.flat ? fmt::format("flat {}% (continuous zero rate, Actual/365 Fixed)",
                                         detail::fixed_or_dash(100 * curve.flat_rate,
                                                               kRateDecimals))
                           : detail::count_of(curve.quotes.size(), "quote", "quotes")});
  return detail::render(table);
}

std::string scenario_lines(std::string_view role, const Scenario& s) {
  std::string out = fmt::format("{} {}: {}\n", role, detail::display_text(s.name, 64),
                                detail::scenario_text(s));
  if (!s.description.empty()) out += fmt::format("  {}\n", detail::display_text(s.description, 200));
  return out;
}

std::string comparison_table(const ShockResult& r, const ShockRequest& request) {
  const BidResult& b = r.before;
  const BidResult& a = r.after;
  detail::TextTable table{
      {"", fmt::format("before ({})", detail::display_text(request.held.scenario.name, 32)),
       fmt::format("after ({})", detail::display_text(request.shocked.name, 32)), "change"},
      {Align::left, Align::right, Align::right, Align::right},
      {}};
  auto row = [&](std::string label, double before, double after, int decimals, double scale) {
    table.rows.push_back({std::move(label), detail::fixed_or_dash(scale * before, decimals),
                          detail::fixed_or_dash(scale * after, decimals),
                          signed_fixed(scale * (after - before), decimals)});
  };
  auto money = [&](std::string label, double before, double after) {
    table.rows.push_back({std::move(label), detail::dollars(before), detail::dollars(after),
                          signed_dollars(after - before)});
  };
  row("clean price (% of cut-off UPB)", b.clean_price, a.clean_price, kPriceDecimals, 1);
  money("clean value", b.clean_value, a.clean_value);
  row("accrued interest (% of cut-off UPB)", accrued_pct(b), accrued_pct(a), kPriceDecimals, 1);
  money("dirty value", b.dirty_value, a.dirty_value);
  row("loss-adjusted Z-spread (bp)", b.loss_adjusted.z_spread, a.loss_adjusted.z_spread,
      kBpDecimals, 1e4);
  row("loss-adjusted yield, BEY (%)", b.loss_adjusted.bey, a.loss_adjusted.bey, kRateDecimals,
      100);
  row("WAL (years)", b.loss_adjusted.wal_years, a.loss_adjusted.wal_years, kYearsDecimals, 1);
  row("effective duration", b.effective_duration, a.effective_duration, kYearsDecimals, 1);
  row("lifetime defaults (% of cut-off UPB)", b.cum_default_pct, a.cum_default_pct,
      kPctDecimals, 1);
  row("loss severity (%)", b.severity_pct, a.severity_pct, 2, 1);
  money("expected lifetime loss", b.expected_loss, a.expected_loss);
  row("expected lifetime loss (% of cut-off UPB)", b.expected_loss_pct, a.expected_loss_pct,
      kPctDecimals, 1);
  return detail::render(table);
}

// One view as JSON.
Json view_json(const BidResult& r) {
  return Json{
      {"scenario", r.scenario},
      {"clean_price", number_or_null(r.clean_price)},
      {"dirty_price", number_or_null(r.dirty_price)},
      {"clean_value", number_or_null(r.clean_value)},
      {"dirty_value", number_or_null(r.dirty_value)},
      {"accrued", number_or_null(r.accrued)},
      {"z_spread", number_or_null(r.loss_adjusted.z_spread)},
      {"cash_flow_yield", number_or_null(r.loss_adjusted.cfy)},
      {"bey", number_or_null(r.loss_adjusted.bey)},
      {"wal_years", number_or_null(r.loss_adjusted.wal_years)},
      {"modified_duration", number_or_null(r.loss_adjusted.modified_duration)},
      {"effective_duration", number_or_null(r.effective_duration)},
      {"effective_convexity", number_or_null(r.effective_convexity)},
      {"dv01", number_or_null(r.dv01)},
      {"cum_default_pct", number_or_null(r.cum_default_pct)},
      {"severity_pct", number_or_null(r.severity_pct)},
      {"expected_loss", number_or_null(r.expected_loss)},
      {"expected_loss_pct", number_or_null(r.expected_loss_pct)},
      {"curve_parallel_shift_bp", number_or_null(r.curve.parallel_shift_bp)},
  };
}

void check_sizes(const LoanArrays& loans, const ShockResult& r) {
  const LoanFlows& before = r.before.flows.loans;
  const LoanFlows& after = r.after.flows.loans;
  if (r.loan_pnl.size() != loans.size() || before.present_value.size() != loans.size() ||
      after.present_value.size() != loans.size())
    throw std::invalid_argument(
        "shock loans: no loan values; reprice the pool with loan values requested");
  detail::check_loan_columns("shock loans", loans,
                             {&before.present_value, &after.present_value, &r.loan_pnl,
                              &before.loss, &after.loss});
}

void put_rows(CsvBuffer& out, const LoanArrays& loans, const ShockResult& r,
              const std::vector<std::string>& sellers, std::size_t first, std::size_t last) {
  const LoanFlows& before = r.before.flows.loans;
  const LoanFlows& after = r.after.flows.loans;
  for (std::size_t i = first; i < last; ++i) {
    const double balance = loans.current_balance[i];
    detail::put_loan_cells(out, loans, sellers, i);
    out.push_back(',');
    detail::put_money(out, balance);
    out.push_back(',');
    detail::put_money(out, before.present_value[i]);
    out.push_back(',');
    detail::put_money(out, after.present_value[i]);
    out.push_back(',');
    detail::put_money(out, r.loan_pnl[i]);
    out.push_back(',');
    detail::put_fixed(out, 100 * before.present_value[i] / balance, kCsvPriceDecimals);
    out.push_back(',');
    detail::put_fixed(out, 100 * after.present_value[i] / balance, kCsvPriceDecimals);
    out.push_back(',');
    detail::put_money(out, before.loss[i]);
    out.push_back(',');
    detail::put_money(out, after.loss[i]);
    out.push_back('\n');
  }
}

}  // namespace

std::string shock_text(const TapeRead& tape, const YieldCurve& curve, const ShockRequest& request,
                       const ShockResult& result, const ModelNote& model) {
  check_model(request);
  const Date cutoff = cutoff_of(tape, request);
  const BidRequest& held = request.held;
  const BidResult& before = result.before;
  const int delay = held.settlement.delay_days;
  std::string out = fmt::format("poolbid shock: {}\n", detail::display_text(tape.file, 200));
  out += fmt::format("loans held: {} (UPB {}), net coupon {}%\n",
                     detail::count_text(tape.rows_accepted()),
                     detail::dollars(before.cutoff_balance),
                     detail::fixed_or_dash(100 * before.net_coupon, kRateDecimals));
  out += fmt::format("cut-off date: {}\nsettlement date: {}\n", detail::iso_date(cutoff),
                     detail::iso_date(held.settlement.settle));
  out += fmt::format("payment delay: {} (month 1 paid {})\n",
                     detail::count_of(static_cast<std::size_t>(std::max(delay, 0)), "day",
                                      "days"),
                     detail::iso_date(payment_date(cutoff, 1, delay)));
  out += "\ncurve (each scenario's rate shock moves it)\n";
  out += curve_text(curve);

  ModelNote tables = model;
  tables.scenario = nullptr;
  tables.explanation = nullptr;
  out += "\n";
  out += detail::model_section(tables, held.assumptions);

  out += fmt::format("\nheld at clean price {} under the base scenario; the shocked scenario is "
                     "valued at the same\nloss-adjusted Z-spread ({} bp) on its own curve\n",
                     detail::fixed_or_dash(held.value, kPriceDecimals),
                     detail::fixed_or_dash(1e4 * before.loss_adjusted.z_spread, kBpDecimals));
  out += scenario_lines("base scenario", held.scenario);
  out += scenario_lines("shocked scenario", request.shocked);

  out += "\nbefore and after the shock\n";
  out += comparison_table(result, request);
  out += fmt::format("\nP&L: {} ({} points of cut-off UPB)\n", signed_dollars(result.pnl),
                     signed_fixed(result.pnl_points, kPriceDecimals));
  out += fmt::format("change in expected lifetime loss: {} ({}% of cut-off UPB)\n",
                     signed_dollars(result.expected_loss_change),
                     signed_fixed(result.expected_loss_change_pct, kPctDecimals));

  out += detail::rejects_and_caution(tape, "repriced");
  return out;
}

std::string shock_json(const TapeRead& tape, const YieldCurve& curve, const ShockRequest& request,
                       const ShockResult& result, const ModelNote& model) {
  check_model(request);
  const Date cutoff = cutoff_of(tape, request);
  const BidRequest& held = request.held;
  const BidResult& before = result.before;
  Json document = {
      {"file", tape.file},
      {"cutoff_date", detail::iso_date(cutoff)},
      {"settlement_date", detail::iso_date(held.settlement.settle)},
      {"payment_delay_days", held.settlement.delay_days},
      {"curve", Json{{"source", curve.source},
                     {"as_of", detail::iso_date(curve.as_of)},
                     {"description", curve.description},
                     {"flat", curve.flat},
                     {"flat_rate", curve.flat ? number_or_null(curve.flat_rate) : Json(nullptr)}}},
      {"model", Json{{"tables", model.tables},
                     {"scenarios", model.scenarios.empty() ? Json(nullptr)
                                                           : Json(model.scenarios)}}},
      {"advancing", std::string(to_string(held.assumptions.advancing))},
      {"held_price", number_or_null(held.value)},
      {"base_scenario", detail::scenario_json(held.scenario)},
      {"shocked_scenario", detail::scenario_json(request.shocked)},
      {"before", view_json(result.before)},
      {"after", view_json(result.after)},
      {"pnl", Json{{"dollars", number_or_null(result.pnl)},
                   {"points", number_or_null(result.pnl_points)}}},
      {"expected_loss_change", Json{{"dollars", number_or_null(result.expected_loss_change)},
                                    {"pct_of_upb",
                                     number_or_null(result.expected_loss_change_pct)}}},
      {"loans_priced", Json{{"loans", tape.rows_accepted()},
                            {"cutoff_balance", number_or_null(before.cutoff_balance)},
                            {"net_coupon", number_or_null(before.net_coupon)},
                            {"rows_read", tape.rows_read},
                            {"rows_rejected", tape.rows_rejected},
                            {"upb_rejected", number_or_null(tape.upb_rejected)}}},
      {"rejected", detail::rejected_json(tape)},
      {"caution", std::string(caution_text())},
  };
  return detail::dump_json(document);
}

std::string shock_loans_csv(const LoanArrays& loans, const ShockResult& result) {
  check_sizes(loans, result);
  const std::vector<std::string> sellers = detail::csv_seller_names(loans);
  return detail::csv_document(kShockLoansCsvHeader, loans.size(),
                              [&](CsvBuffer& out, std::size_t first, std::size_t last) {
                                put_rows(out, loans, result, sellers, first, last);
                              });
}

void write_shock_loans_csv(std::ostream& stream, const LoanArrays& loans,
                           const ShockResult& result) {
  check_sizes(loans, result);
  const std::vector<std::string> sellers = detail::csv_seller_names(loans);
  detail::write_csv_document(stream, kShockLoansCsvHeader, loans.size(),
                             [&](CsvBuffer& out, std::size_t first, std::size_t last) {
                               put_rows(out, loans, result, sellers, first, last);
                             });
}

}  // namespace poolbid
