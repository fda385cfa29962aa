// `poolbid cashflows` reports: the monthly pool table as CSV, per-loan lifetime totals as CSV, and
// a terminal text report and a JSON document carrying the assumptions, totals, months and rejects.
// Units: dollars; smm and mdr decimals per month; cpr, cdr and cum_loss_pct percent. CSV rounds
// dollars to the cent; JSON gives numbers unrounded.
#include <algorithm>
#include <iterator>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include <fmt/compile.h>
#include <fmt/core.h>
#include <fmt/format.h>

#include "cashflow/cashflow.h"
#include "curves/curves.h"
#include "report/format.h"
#include "report/model_parts.h"
#include "report/report.h"
#include "tape/tape.h"

namespace poolbid {
namespace {

using detail::Align;
using detail::Json;

using detail::count_text;
using detail::CsvBuffer;
using detail::put_fixed;
using detail::put_money;

constexpr int kMonthlyDecimals = 10;  // smm, mdr: decimals per month
constexpr int kPercentDecimals = 6;   // cpr, cdr, cum_loss_pct: percent
constexpr int kWalDecimals = 4;       // years

void check_sizes(const PoolFlows& pool) {
  const auto n = static_cast<std::size_t>(std::max(pool.months, 0));
  for (const std::vector<double>* v :
       {&pool.begin_balance, &pool.sched_principal, &pool.prepayment, &pool.defaults, &pool.loss,
        &pool.recovery, &pool.gross_interest, &pool.servicing, &pool.net_interest,
        &pool.total_principal, &pool.cash_flow, &pool.end_balance, &pool.smm, &pool.mdr,
        &pool.cpr, &pool.cdr, &pool.cum_loss_pct}) {
    if (v->size() < n)
      throw std::invalid_argument(
          fmt::format("pool flows: a column has {} months, fewer than the {} stated", v->size(),
                      n));
  }
}

Date cutoff_of(const TapeRead& tape) {
  if (!tape.cutoff)
    throw std::invalid_argument("cash-flow report: the tape has no cut-off date");
  return *tape.cutoff;
}

// ---- Pool totals --------------------------------------------------------------------------------

double total(const std::vector<double>& by_month, int months) {
  double sum = 0;
  for (int t = 0; t < months; ++t) sum += by_month[static_cast<std::size_t>(t)];
  return sum;
}

struct PoolTotals {
  double sched_principal, prepayment, defaults, loss, recovery, gross_interest, servicing,
      net_interest, advanced_interest, total_principal, cash_flow, cum_loss_pct;
};

PoolTotals totals(const PoolFlows& p) {
  const int n = p.months;
  const bool advanced = p.advanced_interest.size() >= static_cast<std::size_t>(std::max(n, 0));
  return PoolTotals{
      total(p.sched_principal, n),
      total(p.prepayment, n),
      total(p.defaults, n),
      total(p.loss, n),
      total(p.recovery, n),
      total(p.gross_interest, n),
      total(p.servicing, n),
      total(p.net_interest, n),
      advanced ? total(p.advanced_interest, n) : 0.0,
      total(p.total_principal, n),
      total(p.cash_flow, n),
      n > 0 ? p.cum_loss_pct[static_cast<std::size_t>(n - 1)] : 0.0,
  };
}

// ---- Text report --------------------------------------------------------------------------------

// With the model, its section stands in for the pool-wide curves (only advancing is read).
std::string assumptions_text(const Assumptions& a, Date cutoff, int delay_days,
                             const YieldCurve* arm_curve, const ModelNote* model) {
  detail::TextTable table{{}, {Align::left, Align::left},
                          model ? std::vector<std::vector<std::string>>{}
                                : detail::assumption_rows(a)};
  table.rows.push_back(
      {"ARM coupons",
       arm_curve ? fmt::format("reset on the index forwards of {} (as of {})",
                               detail::display_text(arm_curve->source, 120),
                               detail::iso_date(arm_curve->as_of))
                 : std::string("held at the cut-off note rate (no --curve)")});
  table.rows.push_back(
      {"payment delay",
       fmt::format("{} (month 1 paid {})",
                   detail::count_of(static_cast<std::size_t>(delay_days), "day", "days"),
                   detail::iso_date(payment_date(cutoff, 1, delay_days)))});
  return (model ? detail::model_section(*model, a) : std::string()) + detail::render(table);
}

std::string percent_of_upb(double amount, double upb) {
  if (!(upb > 0)) return "";
  return fmt::format("({}% of cut-off UPB)", detail::fixed_or_dash(100 * amount / upb, 4));
}

std::string summary_text(const TapeRead& tape, const PoolFlows& pool, const Assumptions& a,
                         Date cutoff, int delay_days) {
  const PoolTotals t = totals(pool);
  detail::TextTable table{{}, {Align::left, Align::right, Align::left}, {}};
  auto money = [&](std::string label, double x, std::string note = {}) {
    table.rows.push_back({std::move(label), detail::dollars(x), std::move(note)});
  };
  table.rows.push_back({"loans projected", count_text(tape.rows_accepted()), ""});
  money("cut-off UPB", pool.cutoff_balance);
  table.rows.push_back(
      {"months", count_text(static_cast<std::size_t>(std::max(pool.months, 0))),
       pool.months > 0
           ? fmt::format("(last month paid {})",
                         detail::iso_date(payment_date(cutoff, pool.months, delay_days)))
           : std::string()});
  money("scheduled principal", t.sched_principal);
  money("prepayment", t.prepayment, percent_of_upb(t.prepayment, pool.cutoff_balance));
  money("defaults", t.defaults, percent_of_upb(t.defaults, pool.cutoff_balance));
  money("loss", t.loss, percent_of_upb(t.loss, pool.cutoff_balance));
  money("recovery", t.recovery);
  money("total principal", t.total_principal);
  money("gross interest", t.gross_interest);
  money("servicing", t.servicing);
  money("net interest", t.net_interest,
        a.advancing == Advancing::interest ? "(with advanced interest)" : "");
  if (a.advancing == Advancing::interest) money("advanced interest", t.advanced_interest);
  money("total cash flow", t.cash_flow);
  table.rows.push_back({"cumulative loss", detail::fixed_or_dash(t.cum_loss_pct, 4) + "%",
                        "(of cut-off UPB)"});
  return detail::render(table);
}

// Months 1-12, then every 12th month, then the last.
std::vector<int> months_shown(int months) {
  std::vector<int> shown;
  for (int t = 1; t <= months; ++t)
    if (t <= 12 || t % 12 == 0 || t == months) shown.push_back(t);
  return shown;
}

std::string months_text(const PoolFlows& p, Date cutoff, int delay_days) {
  detail::TextTable table{
      {"month", "paid", "begin balance", "sched principal", "prepayment", "default", "loss",
       "recovery", "net interest", "cash flow", "CPR %", "CDR %", "cum loss %"},
      {Align::right, Align::left, Align::right, Align::right, Align::right, Align::right,
       Align::right, Align::right, Align::right, Align::right, Align::right, Align::right,
       Align::right},
      {}};
  auto whole = [](double x) { return detail::with_thousands(x, 0); };
  for (int t : months_shown(p.months)) {
    const auto i = static_cast<std::size_t>(t - 1);
    table.rows.push_back({
        std::to_string(t),
        detail::iso_date(payment_date(cutoff, t, delay_days)),
        whole(p.begin_balance[i]),
        whole(p.sched_principal[i]),
        whole(p.prepayment[i]),
        whole(p.defaults[i]),
        whole(p.loss[i]),
        whole(p.recovery[i]),
        whole(p.net_interest[i]),
        whole(p.cash_flow[i]),
        detail::fixed_or_dash(p.cpr[i], 3),
        detail::fixed_or_dash(p.cdr[i], 3),
        detail::fixed_or_dash(p.cum_loss_pct[i], 4),
    });
  }
  return detail::render(table);
}

// ---- JSON ---------------------------------------------------------------------------------------

Json month_json(const PoolFlows& p, int t, Date cutoff, int delay_days) {
  const auto i = static_cast<std::size_t>(t - 1);
  using detail::number_or_null;
  return Json{
      {"month", t},
      {"date", detail::iso_date(payment_date(cutoff, t, delay_days))},
      {"begin_balance", number_or_null(p.begin_balance[i])},
      {"sched_principal", number_or_null(p.sched_principal[i])},
      {"prepayment", number_or_null(p.prepayment[i])},
      {"default", number_or_null(p.defaults[i])},
      {"loss", number_or_null(p.loss[i])},
      {"recovery", number_or_null(p.recovery[i])},
      {"gross_interest", number_or_null(p.gross_interest[i])},
      {"servicing", number_or_null(p.servicing[i])},
      {"net_interest", number_or_null(p.net_interest[i])},
      {"total_principal", number_or_null(p.total_principal[i])},
      {"cash_flow", number_or_null(p.cash_flow[i])},
      {"end_balance", number_or_null(p.end_balance[i])},
      {"smm", number_or_null(p.smm[i])},
      {"mdr", number_or_null(p.mdr[i])},
      {"cpr", number_or_null(p.cpr[i])},
      {"cdr", number_or_null(p.cdr[i])},
      {"cum_loss_pct", number_or_null(p.cum_loss_pct[i])},
      {"advanced_interest", number_or_null(p.advanced_interest[i])},
  };
}

// ---- Loans CSV ----------------------------------------------------------------------------------

void check_sizes(const LoanArrays& loans, const LoanFlows& f) {
  detail::check_loan_columns(
      "loan flows (was loan_totals set?)", loans,
      {&f.sched_principal, &f.prepayment, &f.defaults, &f.loss, &f.recovery, &f.gross_interest,
       &f.servicing, &f.net_interest, &f.advanced_interest, &f.cash_flow, &f.wal_years});
  if (f.last_month.size() != loans.size())
    throw std::invalid_argument("loan flows: columns of different lengths");
}

// Loans [first, last) appended to `out`, one line each.
void put_loan_rows(CsvBuffer& out, const LoanArrays& loans, const LoanFlows& f,
                   const std::vector<std::string>& sellers, std::size_t first, std::size_t last) {
  for (std::size_t i = first; i < last; ++i) {
    detail::put_loan_cells(out, loans, sellers, i);
    for (double x : {loans.current_balance[i], f.sched_principal[i], f.prepayment[i],
                     f.defaults[i], f.loss[i], f.recovery[i], f.gross_interest[i],
                     f.servicing[i], f.net_interest[i], f.advanced_interest[i], f.cash_flow[i]}) {
      out.push_back(',');
      put_money(out, x);
    }
    out.push_back(',');
    put_fixed(out, f.wal_years[i], kWalDecimals);
    fmt::format_to(std::back_inserter(out), FMT_COMPILE(",{}\n"), f.last_month[i]);
  }
}

}  // namespace

std::string cashflow_csv(const PoolFlows& p, Date cutoff, int delay_days) {
  check_sizes(p);
  CsvBuffer out;
  out.append(kCashflowCsvHeader);
  out.push_back('\n');
  for (int t = 1; t <= p.months; ++t) {
    const auto i = static_cast<std::size_t>(t - 1);
    fmt::format_to(std::back_inserter(out), "{},{}", t,
                   detail::iso_date(payment_date(cutoff, t, delay_days)));
    for (double x : {p.begin_balance[i], p.sched_principal[i], p.prepayment[i], p.defaults[i],
                     p.loss[i], p.recovery[i], p.gross_interest[i], p.servicing[i],
                     p.net_interest[i], p.total_principal[i], p.cash_flow[i], p.end_balance[i]}) {
      out.push_back(',');
      put_money(out, x);
    }
    for (double x : {p.smm[i], p.mdr[i]}) {
      out.push_back(',');
      put_fixed(out, x, kMonthlyDecimals);
    }
    for (double x : {p.cpr[i], p.cdr[i], p.cum_loss_pct[i]}) {
      out.push_back(',');
      put_fixed(out, x, kPercentDecimals);
    }
    out.push_back('\n');
  }
  return fmt::to_string(out);
}

std::string loan_flows_csv(const LoanArrays& loans, const LoanFlows& flows) {
  check_sizes(loans, flows);
  const std::vector<std::string> sellers = detail::csv_seller_names(loans);
  return detail::csv_document(kLoanFlowsCsvHeader, loans.size(),
                              [&](CsvBuffer& out, std::size_t first, std::size_t last) {
                                put_loan_rows(out, loans, flows, sellers, first, last);
                              });
}

void write_loan_flows_csv(std::ostream& stream, const LoanArrays& loans, const LoanFlows& flows) {
  check_sizes(loans, flows);
  const std::vector<std::string> sellers = detail::csv_seller_names(loans);
  detail::write_csv_document(stream, kLoanFlowsCsvHeader, loans.size(),
                             [&](CsvBuffer& out, std::size_t first, std::size_t last) {
                               put_loan_rows(out, loans, flows, sellers, first, last);
                             });
}

std::string cashflow_text(const TapeRead& tape, const Assumptions& assumptions,
                          const PoolFlows& pool, int delay_days, const YieldCurve* arm_curve,
                          const ModelNote* model) {
  const Date cutoff = cutoff_of(tape);
  check_sizes(pool);
  std::string out = fmt::format("poolbid cashflows: {}\ncut-off date: {}\n\nassumptions\n",
                                detail::display_text(tape.file, 200), detail::iso_date(cutoff));
  out += assumptions_text(assumptions, cutoff, delay_days, arm_curve, model);
  if (model) out += detail::explanation_section(*model);
  out += "\npool\n";
  out += summary_text(tape, pool, assumptions, cutoff, delay_days);

  out += '\n';
  if (pool.months <= 0) {
    out += "No cash flows: no loan was projected.\n";
  } else {
    out += fmt::format(
        "by month, in dollars: months 1-12, then every 12th month{}; `--csv FILE` writes all "
        "{}\n",
        pool.months > 12 && pool.months % 12 != 0 ? " and the last" : "",
        detail::count_of(static_cast<std::size_t>(pool.months), "month", "months"));
    out += months_text(pool, cutoff, delay_days);
  }

  out += detail::rejects_and_caution(tape, "projected");
  return out;
}

std::string cashflow_json(const TapeRead& tape, const Assumptions& assumptions,
                          const PoolFlows& pool, int delay_days, const YieldCurve* arm_curve,
                          const ModelNote* model) {
  const Date cutoff = cutoff_of(tape);
  check_sizes(pool);
  const PoolTotals t = totals(pool);
  using detail::number_or_null;
  Json summary = {
      {"rows_read", tape.rows_read},
      {"rows_accepted", tape.rows_accepted()},
      {"rows_rejected", tape.rows_rejected},
      {"upb_rejected", number_or_null(tape.upb_rejected)},
      {"loans", tape.rows_accepted()},
      {"cutoff_balance", number_or_null(pool.cutoff_balance)},
      {"months", std::max(pool.months, 0)},
      {"last_payment_date",
       pool.months > 0 ? Json(detail::iso_date(payment_date(cutoff, pool.months, delay_days)))
                       : Json(nullptr)},
      {"sched_principal", number_or_null(t.sched_principal)},
      {"prepayment", number_or_null(t.prepayment)},
      {"default", number_or_null(t.defaults)},
      {"loss", number_or_null(t.loss)},
      {"recovery", number_or_null(t.recovery)},
      {"gross_interest", number_or_null(t.gross_interest)},
      {"servicing", number_or_null(t.servicing)},
      {"net_interest", number_or_null(t.net_interest)},
      {"advanced_interest", number_or_null(t.advanced_interest)},
      {"total_principal", number_or_null(t.total_principal)},
      {"cash_flow", number_or_null(t.cash_flow)},
      {"cum_loss_pct", number_or_null(t.cum_loss_pct)},
  };
  Json months = Json::array();
  for (int m = 1; m <= pool.months; ++m) months.push_back(month_json(pool, m, cutoff, delay_days));
  Json document = {
      {"file", tape.file},
      {"cutoff_date", detail::iso_date(cutoff)},
      {"payment_delay_days", delay_days},
      {"assumptions", model ? detail::model_assumptions_json(assumptions)
                            : detail::assumptions_json(assumptions)},
      {"arm_curve", arm_curve ? Json{{"source", arm_curve->source},
                                     {"as_of", detail::iso_date(arm_curve->as_of)}}
                              : Json(nullptr)},
      {"summary", std::move(summary)},
      {"months", std::move(months)},
      {"rejected", detail::rejected_json(tape)},
      {"caution", std::string(caution_text())},
  };
  if (model) document = detail::insert_after(document, "assumptions", "model",
                                             detail::model_json(*model));
  return detail::dump_json(document);
}

std::string rejected_rows_text(const TapeRead& tape) {
  if (tape.rows_rejected == 0) return "";
  return fmt::format("poolbid: {}; each rejecting problem:\n{}",
                     detail::rejects_heading(tape, "projected"), detail::rejects_table(tape));
}

}  // namespace poolbid
