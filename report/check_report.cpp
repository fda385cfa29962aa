// `poolbid check` reports: what was read, what was accepted, and every problem found, as text or
// JSON; and the caution every report ends with.
// JSON units: dollars for UPB; rows are tape row numbers (the header is row 1).
#include <string>
#include <utility>

#include <fmt/core.h>

#include "report/format.h"
#include "report/report.h"
#include "tape/tape.h"

namespace poolbid {
namespace {

using detail::Align;
using detail::Json;

using detail::count_text;
using detail::kLoanIdWidth;
using detail::kValueWidth;

}  // namespace

std::string_view caution_text() {
  return "Results are estimates under stated assumptions, not investment advice. Consult "
         "licensed professionals before acting on them, and follow the laws and regulations "
         "that apply to you.";
}

std::string check_text(const TapeRead& tape) {
  std::string out = fmt::format("poolbid check: {}\ncut-off date: {}\n\n",
                                detail::display_text(tape.file, 200),
                                detail::cutoff_text(tape.cutoff));

  detail::TextTable counts{{}, {Align::left, Align::right}, {}};
  counts.rows = {
      {"rows read", count_text(tape.rows_read)},
      {"rows accepted", count_text(tape.rows_accepted())},
      {"rows rejected", count_text(tape.rows_rejected)},
      {"rows with warnings", count_text(tape.rows_with_warnings)},
      {"blank lines skipped", count_text(tape.blank_lines)},
      {"UPB accepted", detail::dollars(tape.upb_accepted)},
      {"UPB rejected", detail::dollars(tape.upb_rejected)},
  };
  out += detail::render(counts);

  out += "\nnotes:";
  if (tape.notes.empty()) out += " none";
  out += '\n';
  for (const std::string& note : tape.notes)
    out += fmt::format("  - {}\n", detail::display_text(note, 400));

  std::size_t rejects = 0, warnings = 0;
  for (const RowProblem& p : tape.problems) ++(p.reject ? rejects : warnings);
  out += "\nproblems: ";
  if (tape.problems.empty())
    out += "none";
  else
    out += fmt::format("{}, {}", detail::count_of(rejects, "reject", "rejects"),
                       detail::count_of(warnings, "warning", "warnings"));
  out += '\n';
  if (!tape.problems.empty()) {
    detail::TextTable table{{"row", "loan id", "column", "value", "result", "reason"},
                            {Align::right, Align::left, Align::left, Align::left, Align::left,
                             Align::left},
                            {}};
    table.rows.reserve(tape.problems.size());
    for (const RowProblem& p : tape.problems) {
      table.rows.push_back({
          count_text(p.row),
          detail::display_text(p.loan_id, kLoanIdWidth, "(blank)"),
          detail::display_text(p.column, kValueWidth, "(whole row)"),
          detail::display_text(p.value, kValueWidth, "(blank)"),
          p.reject ? "REJECT" : "warn",
          detail::display_text(p.reason, 400),
      });
    }
    out += detail::render(table);
    out += "  REJECT: the row is left out of the loans; warn: the row is kept as read.\n";
  }
  out += fmt::format("\n{}\n", caution_text());
  return out;
}

std::string check_json(const TapeRead& tape) {
  Json problems = Json::array();
  for (const RowProblem& p : tape.problems) problems.push_back(detail::problem_json(p));
  Json document = {
      {"file", tape.file},
      {"cutoff_date", detail::cutoff_json(tape.cutoff)},
      {"rows_read", tape.rows_read},
      {"rows_accepted", tape.rows_accepted()},
      {"rows_rejected", tape.rows_rejected},
      {"rows_with_warnings", tape.rows_with_warnings},
      {"blank_lines", tape.blank_lines},
      {"upb_accepted", detail::number_or_null(tape.upb_accepted)},
      {"upb_rejected", detail::number_or_null(tape.upb_rejected)},
      {"notes", tape.notes},
      {"problems", std::move(problems)},
      {"caution", std::string(caution_text())},
  };
  return detail::dump_json(document);
}

}  // namespace poolbid
