// `poolbid strats` reports: pool summary, weighted averages, stratification tables and a short
// account of rejected rows, as text or JSON.
// Units in JSON are decimals (rates and ratios: 0.065, 0.80), dollars (UPB) and months (WAM,
// WALA); credit scores are points. A value no loan has is null. Text shows rates and ratios in
// percent and a value no loan has as "-".
#include <map>
#include <string>
#include <utility>
#include <vector>

#include <fmt/core.h>

#include "report/format.h"
#include "report/report.h"
#include "tape/tape.h"

namespace poolbid {
namespace {

using detail::Align;
using detail::Json;

constexpr std::size_t kRejectsShown = 20;
using detail::count_text;
using detail::kLoanIdWidth;

std::string percent(double ratio, int decimals) {
  return detail::fixed_or_dash(ratio * 100, decimals);
}

// One rejected row: its number, loan id and every rejecting reason, "; "-joined.
struct RejectedRow {
  std::string loan_id;
  std::string reasons;
};

std::map<std::size_t, RejectedRow> rejected_rows(const TapeRead& tape) {
  std::map<std::size_t, RejectedRow> rows;
  for (const RowProblem& p : tape.problems) {
    if (!p.reject) continue;
    auto [it, added] = rows.try_emplace(p.row, RejectedRow{p.loan_id, p.reason});
    if (!added) it->second.reasons += "; " + p.reason;
  }
  return rows;
}

std::string summary_text(const Strats& s) {
  detail::TextTable table{{}, {Align::left, Align::right, Align::left}, {}};
  auto average = [&](std::string label, const WeightedAverage& wa, std::string value) {
    table.rows.push_back({std::move(label), std::move(value),
                          wa.missing > 0 ? fmt::format("({} missing)", count_text(wa.missing))
                                         : std::string()});
  };
  table.rows.push_back({"loans", count_text(s.loans), ""});
  table.rows.push_back({"UPB", detail::dollars(s.upb), ""});
  table.rows.push_back({"average UPB", detail::dollars(s.average_upb), ""});
  average("WAC", s.wac, percent(s.wac.value, 3) + "%");
  average("WAM", s.wam, detail::fixed_or_dash(s.wam.value, 0) + " months");
  average("WALA", s.wala, detail::fixed_or_dash(s.wala.value, 0) + " months");
  average("WA credit score", s.credit_score, detail::fixed_or_dash(s.credit_score.value, 0));
  average("WA original LTV", s.original_ltv, percent(s.original_ltv.value, 1) + "%");
  average("WA combined LTV", s.combined_ltv, percent(s.combined_ltv.value, 1) + "%");
  average("WA DTI", s.dti, percent(s.dti.value, 1) + "%");
  return detail::render(table);
}

std::vector<std::string> row_cells(std::string label, std::size_t count, double upb, double share,
                                   double wac, double score, double ltv) {
  return {std::move(label),       count_text(count),   detail::with_thousands(upb, 0),
          percent(share, 2),      percent(wac, 3),     detail::fixed_or_dash(score, 0),
          percent(ltv, 1)};
}

// One table: the title heads the label column; a total line closes it.
std::string table_text(const StratTable& t, const Strats& s) {
  detail::TextTable table{
      {t.title, "loans", "UPB ($)", "% UPB", "WAC %", "WA score", "WA orig LTV %"},
      {Align::left, Align::right, Align::right, Align::right, Align::right, Align::right,
       Align::right},
      {}};
  for (const StratRow& r : t.rows)
    table.rows.push_back(row_cells(detail::display_text(detail::plain_label(r.label), 40),
                                   r.count, r.upb, r.upb_share, r.wac, r.wa_score, r.wa_ltv));
  if (t.rows.empty()) {
    table.rows.push_back({"(no loans)", "", "", "", "", "", ""});
  } else {
    table.rows.push_back(row_cells("total", s.loans, s.upb, 1.0, s.wac.value,
                                   s.credit_score.value, s.original_ltv.value));
  }
  return detail::render(table);
}

std::string rejects_text(const TapeRead& tape) {
  std::string out;
  if (tape.rows_rejected == 0) {
    out = fmt::format("No rows rejected: all {} read are in these strats.\n",
                      detail::count_of(tape.rows_read, "row", "rows"));
  } else {
    const bool one = tape.rows_rejected == 1;
    out = fmt::format("{} (UPB {}) {} not in these strats; `poolbid check` lists {}.\n",
                      detail::count_of(tape.rows_rejected, "row rejected", "rows rejected"),
                      detail::dollars(tape.upb_rejected), one ? "is" : "are",
                      one ? "it" : "them");
  }
  const std::map<std::size_t, RejectedRow> rows = rejected_rows(tape);
  if (!rows.empty()) {
    detail::TextTable table{{"row", "loan id", "reason"},
                            {Align::right, Align::left, Align::left},
                            {}};
    for (const auto& [row, rejected] : rows) {
      if (table.rows.size() == kRejectsShown) break;
      table.rows.push_back({count_text(row),
                            detail::display_text(rejected.loan_id, kLoanIdWidth, "(blank)"),
                            detail::display_text(rejected.reasons, 400)});
    }
    out += detail::render(table);
    if (rows.size() > kRejectsShown)
      out += fmt::format("  ... and {} more\n", count_text(rows.size() - kRejectsShown));
  }
  if (tape.rows_with_warnings > 0)
    out += fmt::format("{} with warnings {} in these strats; `poolbid check` lists the warnings.\n",
                       detail::count_of(tape.rows_with_warnings, "accepted row", "accepted rows"),
                       tape.rows_with_warnings == 1 ? "is" : "are");
  return out;
}

Json average_json(const WeightedAverage& wa) {
  return Json{{"value", detail::number_or_null(wa.value)}, {"missing", wa.missing}};
}

}  // namespace

std::string strats_text(const TapeRead& tape, const Strats& strats) {
  std::string out = fmt::format(
      "poolbid strats: {}\ncut-off date: {}\n\npool\n", detail::display_text(tape.file, 200),
      detail::cutoff_text(tape.cutoff));
  out += summary_text(strats);
  for (const StratTable& t : strats.tables) {
    out += '\n';
    out += table_text(t, strats);
  }
  out += '\n';
  out += rejects_text(tape);
  out += fmt::format("\n{}\n", caution_text());
  return out;
}

std::string strats_json(const TapeRead& tape, const Strats& strats) {
  Json tables = Json::array();
  for (const StratTable& t : strats.tables) {
    Json rows = Json::array();
    for (const StratRow& r : t.rows) {
      rows.push_back(Json{
          {"label", r.label},
          {"count", r.count},
          {"upb", detail::number_or_null(r.upb)},
          {"upb_share", detail::number_or_null(r.upb_share)},
          {"wac", detail::number_or_null(r.wac)},
          {"wa_score", detail::number_or_null(r.wa_score)},
          {"wa_ltv", detail::number_or_null(r.wa_ltv)},
      });
    }
    tables.push_back(Json{{"title", t.title}, {"rows", std::move(rows)}});
  }
  Json rejects = Json::array();
  for (const RowProblem& p : tape.problems)
    if (p.reject) rejects.push_back(detail::problem_json(p));

  Json document = {
      {"file", tape.file},
      {"cutoff_date", detail::cutoff_json(tape.cutoff)},
      {"loans", strats.loans},
      {"upb", detail::number_or_null(strats.upb)},
      {"average_upb", detail::number_or_null(strats.average_upb)},
      {"wac", average_json(strats.wac)},
      {"wam", average_json(strats.wam)},
      {"wala", average_json(strats.wala)},
      {"credit_score", average_json(strats.credit_score)},
      {"original_ltv", average_json(strats.original_ltv)},
      {"combined_ltv", average_json(strats.combined_ltv)},
      {"dti", average_json(strats.dti)},
      {"tables", std::move(tables)},
      {"rows_read", tape.rows_read},
      {"rows_accepted", tape.rows_accepted()},
      {"rows_rejected", tape.rows_rejected},
      {"upb_rejected", detail::number_or_null(tape.upb_rejected)},
      {"rejects", std::move(rejects)},
      {"caution", std::string(caution_text())},
  };
  return detail::dump_json(document);
}

}  // namespace poolbid
