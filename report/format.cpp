// Shared formatting for the reports: thousands separators, dates, terminal-safe text, tables,
// JSON pieces, CSV cells, and the assumptions and rejected rows the cash-flow and price reports
// both show.
#include "report/format.h"

#include <algorithm>
#include <array>
#include <chrono>
#include <cmath>
#include <cstdint>
#include <iterator>
#include <ostream>

#include <fmt/compile.h>
#include <fmt/core.h>
#include <fmt/format.h>

#include "curves/curves.h"
#include "pricing/pricing.h"
#include "report/report.h"

namespace poolbid::detail {
namespace {

constexpr std::string_view kReplacement = "\xEF\xBF\xBD";  // U+FFFD in UTF-8

// Length of the valid UTF-8 sequence starting at text[i], or 0 if the bytes there are not one
// (overlong forms, UTF-16 surrogates and code points above U+10FFFF are not valid).
std::size_t utf8_sequence_length(std::string_view text, std::size_t i) {
  const auto byte = [&](std::size_t k) { return static_cast<unsigned char>(text[k]); };
  const unsigned char lead = byte(i);
  if (lead < 0x80) return 1;
  std::size_t length = 0;
  unsigned char low = 0x80, high = 0xBF;  // allowed range of the second byte
  if (lead >= 0xC2 && lead <= 0xDF) {
    length = 2;
  } else if (lead >= 0xE0 && lead <= 0xEF) {
    length = 3;
    if (lead == 0xE0) low = 0xA0;
    if (lead == 0xED) high = 0x9F;
  } else if (lead >= 0xF0 && lead <= 0xF4) {
    length = 4;
    if (lead == 0xF0) low = 0x90;
    if (lead == 0xF4) high = 0x8F;
  } else {
    return 0;
  }
  if (i + length > text.size()) return 0;
  if (byte(i + 1) < low || byte(i + 1) > high) return 0;
  for (std::size_t k = 2; k < length; ++k)
    if (byte(i + k) < 0x80 || byte(i + k) > 0xBF) return 0;
  return length;
}

// Thousands separators in the integer part of a formatted non-negative number: "1234.50".
std::string group_thousands(const std::string& digits) {
  const std::size_t point = std::min(digits.find('.'), digits.size());
  std::string out;
  out.reserve(digits.size() + point / 3);
  for (std::size_t i = 0; i < point; ++i) {
    if (i > 0 && (point - i) % 3 == 0) out.push_back(',');
    out.push_back(digits[i]);
  }
  out.append(digits, point, std::string::npos);
  return out;
}

// True when a formatted magnitude is all zeros ("0.00"), so "-0.00" is printed as "0.00".
bool all_zero(const std::string& digits) {
  return digits.find_first_not_of("0.") == std::string::npos;
}

}  // namespace

std::string with_thousands(double x, int decimals) {
  if (!std::isfinite(x)) return "-";
  const std::string digits = fmt::format("{:.{}f}", std::fabs(x), decimals);
  const bool negative = x < 0 && !all_zero(digits);
  return (negative ? "-" : "") + group_thousands(digits);
}

std::string dollars(double x) {
  if (!std::isfinite(x)) return "-";
  const std::string digits = fmt::format("{:.2f}", std::fabs(x));
  const bool negative = x < 0 && !all_zero(digits);
  return (negative ? "-$" : "$") + group_thousands(digits);
}

std::string fixed_or_dash(double x, int decimals) {
  if (!std::isfinite(x)) return "-";
  const std::string digits = fmt::format("{:.{}f}", std::fabs(x), decimals);
  return (x < 0 && !all_zero(digits) ? "-" : "") + digits;
}

std::string short_number(double x, bool sign) {
  if (!std::isfinite(x)) return "-";
  std::string text = sign ? fmt::format("{:+.4f}", x) : fmt::format("{:.4f}", x);
  text.erase(text.find_last_not_of('0') + 1);
  if (text.back() == '.') text.pop_back();
  if (text == "-0" || text == "+0") text = sign ? "+0" : "0";
  return text;
}

std::string iso_date(const Date& date) {
  return fmt::format("{:04d}-{:02d}-{:02d}", static_cast<int>(date.year()),
                     static_cast<unsigned>(date.month()), static_cast<unsigned>(date.day()));
}

std::string count_text(std::size_t n) { return with_thousands(static_cast<double>(n), 0); }

std::string cutoff_text(const std::optional<Date>& cutoff) {
  return cutoff ? iso_date(*cutoff) : std::string("not given");
}

std::string_view plain_label(std::string_view code) {
  struct Label {
    std::string_view code, plain;
  };
  static constexpr Label kLabels[] = {
      {"unknown", "missing"},           {"second_home", "second home"},
      {"rate_term_refi", "rate/term refi"}, {"cash_out_refi", "cash-out refi"},
      {"single_family", "single family"}, {"pud", "PUD"},
      {"two_to_four", "2-4 unit"},      {"coop", "co-op"},
      {"arm", "ARM"},                   {"interest_only", "interest-only"},
      {"30", "30 days"},                {"60", "60 days"},
      {"90+", "90+ days"},
  };
  for (const Label& label : kLabels)
    if (label.code == code) return label.plain;
  return code;
}

std::string count_of(std::size_t n, std::string_view singular, std::string_view plural) {
  return fmt::format("{} {}", with_thousands(static_cast<double>(n), 0),
                     n == 1 ? singular : plural);
}

std::string display_text(std::string_view text, std::size_t max_width,
                         std::string_view if_empty) {
  if (text.empty()) return std::string(if_empty);
  const bool plain = std::all_of(text.begin(), text.end(), [](char ch) {
    return ch >= 0x20 && ch < 0x7F;  // printable ASCII: one byte, one column
  });
  if (plain && text.size() <= max_width) return std::string(text);
  // Each piece is one displayed unit: a code point, U+FFFD, or an escape such as "\n".
  std::vector<std::string> pieces;
  for (std::size_t i = 0; i < text.size();) {
    const std::size_t length = utf8_sequence_length(text, i);
    const auto lead = static_cast<unsigned char>(text[i]);
    if (length == 0) {
      pieces.emplace_back(kReplacement);
      i += 1;
      continue;
    }
    if (length == 1 && (lead < 0x20 || lead == 0x7F)) {
      pieces.emplace_back(lead == '\n'   ? "\\n"
                          : lead == '\r' ? "\\r"
                          : lead == '\t' ? "\\t"
                                         : fmt::format("\\x{:02X}", lead));
    } else if (length == 2 && lead == 0xC2 && static_cast<unsigned char>(text[i + 1]) < 0xA0) {
      // C1 control characters (U+0080..U+009F): some terminals act on them.
      pieces.emplace_back(fmt::format("\\u{:04X}", static_cast<unsigned char>(text[i + 1])));
    } else {
      pieces.emplace_back(text.substr(i, length));
    }
    i += length;
  }
  std::size_t width = 0;
  for (const std::string& p : pieces) width += display_width(p);
  std::string out;
  if (width <= max_width) {
    for (const std::string& p : pieces) out += p;
    return out;
  }
  const std::size_t keep = max_width > 3 ? max_width - 3 : 0;
  std::size_t used = 0;
  for (const std::string& p : pieces) {
    const std::size_t w = display_width(p);
    if (used + w > keep) break;
    out += p;
    used += w;
  }
  return out + "...";
}

std::size_t display_width(std::string_view text) {
  std::size_t width = 0;
  for (char ch : text)
    if ((static_cast<unsigned char>(ch) & 0xC0) != 0x80) ++width;  // not a continuation byte
  return width;
}

std::string render(const TextTable& table, std::string_view indent) {
  const std::size_t columns = table.align.size();
  std::vector<std::size_t> widths(columns, 0);
  auto measure = [&](const std::vector<std::string>& cells) {
    for (std::size_t c = 0; c < columns && c < cells.size(); ++c)
      widths[c] = std::max(widths[c], display_width(cells[c]));
  };
  if (!table.headers.empty()) measure(table.headers);
  for (const auto& row : table.rows) measure(row);

  std::string out;
  auto write_line = [&](const std::vector<std::string>& cells) {
    std::string line(indent);
    for (std::size_t c = 0; c < columns; ++c) {
      const std::string empty;
      const std::string& cell = c < cells.size() ? cells[c] : empty;
      const std::size_t pad = widths[c] - display_width(cell);
      if (c > 0) line += "  ";
      if (table.align[c] == Align::right) line.append(pad, ' ');
      line += cell;
      if (table.align[c] == Align::left && c + 1 < columns) line.append(pad, ' ');
    }
    while (!line.empty() && line.back() == ' ') line.pop_back();
    out += line;
    out += '\n';
  };
  if (!table.headers.empty()) write_line(table.headers);
  for (const auto& row : table.rows) write_line(row);
  return out;
}

std::vector<std::vector<std::string>> assumption_rows(const Assumptions& a) {
  return {
      {"prepayment (CPR)", prepay_text(a.prepay)},
      {"default (CDR)", default_text(a.default_rate)},
      {"loss severity (% of defaulted balance)", severity_text(a.severity)},
      {"liquidation lag", count_of(static_cast<std::size_t>(std::max(a.lag_months, 0)),
                                   "month after default", "months after default")},
      {"advancing", std::string(to_string(a.advancing))},
      {"delinquent loans default in month 1",
       a.delinquent_default ? "yes (90+ days delinquent or in foreclosure at cut-off)"
                            : "no (they follow the curves)"},
  };
}

std::string rejects_table(const TapeRead& tape) {
  TextTable table{{"row", "loan id", "column", "value", "reason"},
                  {Align::right, Align::left, Align::left, Align::left, Align::left},
                  {}};
  for (const RowProblem& p : tape.problems) {
    if (!p.reject) continue;
    table.rows.push_back({count_text(p.row), display_text(p.loan_id, kLoanIdWidth, "(blank)"),
                          display_text(p.column, kValueWidth, "(whole row)"),
                          display_text(p.value, kValueWidth, "(blank)"),
                          display_text(p.reason, 400)});
  }
  return render(table);
}

std::string rejects_heading(const TapeRead& tape, std::string_view done) {
  return fmt::format("{} (UPB {}) not {}",
                     count_of(tape.rows_rejected, "row rejected", "rows rejected"),
                     dollars(tape.upb_rejected), done);
}

std::string rejects_and_caution(const TapeRead& tape, std::string_view done) {
  std::string out = "\n";
  if (tape.rows_rejected == 0) {
    out += tape.rows_read == 1
               ? fmt::format("rejected rows: none; the 1 row read is {}.\n", done)
               : fmt::format("rejected rows: none; all {} read are {}.\n",
                             count_of(tape.rows_read, "row", "rows"), done);
  } else {
    out += fmt::format("rejected rows: {}:\n", rejects_heading(tape, done));
    out += rejects_table(tape);
  }
  if (tape.rows_with_warnings > 0)
    out += fmt::format("{} with warnings {} {} as read; `poolbid check` lists the warnings.\n",
                       count_of(tape.rows_with_warnings, "accepted row", "accepted rows"),
                       tape.rows_with_warnings == 1 ? "is" : "are", done);
  out += fmt::format("\n{}\n", caution_text());
  return out;
}

Json cutoff_json(const std::optional<Date>& cutoff) {
  return cutoff ? Json(iso_date(*cutoff)) : Json(nullptr);
}

Json number_or_null(double x) {
  if (!std::isfinite(x)) return nullptr;
  return x;
}

Json pool_view_json(const PoolView& v) {
  return Json{
      {"cash_flow_yield", number_or_null(v.cfy)},
      {"bey", number_or_null(v.bey)},
      {"z_spread", number_or_null(v.z_spread)},
      {"par_yield_at_wal", number_or_null(v.par_yield_at_wal)},
      {"spread_at_wal", number_or_null(v.spread_at_wal)},
      {"wal_years", number_or_null(v.wal_years)},
      {"modified_duration", number_or_null(v.modified_duration)},
  };
}

Json problem_json(const RowProblem& problem) {
  return Json{
      {"row", problem.row},
      {"loan_id", problem.loan_id},
      {"field", problem.field ? Json(std::string(field_name(*problem.field)))
                              : Json(nullptr)},
      {"column", problem.column},
      {"value", problem.value},
      {"reason", problem.reason},
      {"severity", problem.reject ? "reject" : "warning"},
  };
}

std::string dump_json(const Json& document) {
  return document.dump(2, ' ', false, Json::error_handler_t::replace) + "\n";
}

Json assumptions_json(const Assumptions& a) {
  return Json{
      {"prepay", prepay_text(a.prepay)},
      {"default", default_text(a.default_rate)},
      {"severity", severity_text(a.severity)},
      {"lag_months", a.lag_months},
      {"advancing", std::string(to_string(a.advancing))},
      {"delinquent_default", a.delinquent_default},
  };
}

Json rejected_json(const TapeRead& tape) {
  Json rejected = Json::array();
  for (const RowProblem& p : tape.problems) {
    if (!p.reject) continue;
    rejected.push_back(Json{
        {"row", p.row},
        {"loan_id", p.loan_id},
        {"field", p.field ? Json(std::string(field_name(*p.field))) : Json(nullptr)},
        {"column", p.column},
        {"value", p.value},
        {"reason", p.reason},
    });
  }
  return rejected;
}

void put_fixed(CsvBuffer& out, double x, int decimals) {
  static constexpr std::array<double, 13> kHalfUnit = {
      0.5, 0.05, 5e-3, 5e-4, 5e-5, 5e-6, 5e-7, 5e-8, 5e-9, 5e-10, 5e-11, 5e-12, 5e-13};
  if (!std::isfinite(x)) return;
  if (std::fabs(x) < kHalfUnit[static_cast<std::size_t>(decimals)]) x = 0.0;
  fmt::format_to(std::back_inserter(out), FMT_COMPILE("{:.{}f}"), x, decimals);
}

void put_money(CsvBuffer& out, double x) {
  if (!std::isfinite(x)) return;
  if (!(std::fabs(x) < 1e15)) {  // beyond exact cents in a double; never a loan's
    put_fixed(out, x, 2);
    return;
  }
  const long long cents = std::llround(x * 100);
  if (cents < 0) out.push_back('-');
  const unsigned long long magnitude =
      cents < 0 ? 0ULL - static_cast<unsigned long long>(cents)
                : static_cast<unsigned long long>(cents);
  fmt::format_to(std::back_inserter(out), FMT_COMPILE("{}.{:02}"), magnitude / 100,
                 magnitude % 100);
}

void put_csv_text(CsvBuffer& out, std::string_view text) {
  if (text.find_first_of(",\"\r\n") == std::string_view::npos) {
    out.append(text);
    return;
  }
  out.push_back('"');
  for (char ch : text) {
    if (ch == '"') out.push_back('"');
    out.push_back(ch);
  }
  out.push_back('"');
}

std::vector<std::string> csv_seller_names(const LoanArrays& loans) {
  std::vector<std::string> names;
  names.reserve(loans.seller_names.size());
  for (const std::string& name : loans.seller_names) {
    CsvBuffer cell;
    put_csv_text(cell, name);
    names.push_back(fmt::to_string(cell));
  }
  return names;
}

void check_loan_columns(std::string_view what, const LoanArrays& loans,
                        std::initializer_list<const std::vector<double>*> columns) {
  const std::size_t n = loans.size();
  for (const std::vector<double>* v : columns)
    if (v->size() != n)
      throw std::invalid_argument(fmt::format("{}: a column has {} loans, the tape {}", what,
                                              v->size(), n));
  if (loans.loan_id.size() != n || loans.row.size() != n || loans.seller.size() != n ||
      loans.note_rate.size() != n)
    throw std::invalid_argument(fmt::format("{}: tape columns of different lengths", what));
}

void put_loan_cells(CsvBuffer& out, const LoanArrays& loans,
                    const std::vector<std::string>& sellers, std::size_t i) {
  put_csv_text(out, loans.loan_id[i]);
  fmt::format_to(std::back_inserter(out), FMT_COMPILE(",{},"), loans.row[i]);
  const std::size_t s = loans.seller[i];
  if (s < sellers.size()) out.append(sellers[s]);
}

std::string csv_document(std::string_view header, std::size_t rows, const PutRows& put_rows) {
  CsvBuffer out;
  out.append(header);
  out.push_back('\n');
  put_rows(out, 0, rows);
  return fmt::to_string(out);
}

void write_csv_document(std::ostream& stream, std::string_view header, std::size_t rows,
                        const PutRows& put_rows) {
  constexpr std::size_t kRowsPerPiece = 4096;
  constexpr std::size_t kStreamChunkBytes = std::size_t{1} << 20;
  CsvBuffer out;
  out.append(header);
  out.push_back('\n');
  for (std::size_t first = 0; first < rows; first += kRowsPerPiece) {
    put_rows(out, first, std::min(first + kRowsPerPiece, rows));
    if (out.size() >= kStreamChunkBytes) {
      stream.write(out.data(), static_cast<std::streamsize>(out.size()));
      out.clear();
      if (!stream) return;  // the caller sees the stream's state
    }
  }
  stream.write(out.data(), static_cast<std::streamsize>(out.size()));
}

}  // namespace poolbid::detail
