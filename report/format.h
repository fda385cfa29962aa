// Private to report/: what the reports print the same way: numbers with thousands separators,
// dates, cell text made safe for a terminal, aligned text tables, JSON pieces, CSV cells, and the
// parts the cash-flow and price reports share (assumptions, rejected rows).
#pragma once

#include <cstddef>
#include <functional>
#include <iosfwd>
#include <optional>
#include <initializer_list>
#include <string>
#include <string_view>
#include <vector>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "tape/tape.h"

namespace poolbid {
struct Assumptions;
struct PoolView;
}  // namespace poolbid

namespace poolbid::detail {

// ---- Text ---------------------------------------------------------------------------------------
// 1234567.891 with 2 decimals -> "1,234,567.89"; "-" when x is NaN or infinite.
std::string with_thousands(double x, int decimals);
// "$1,234,567.89" (cents); "-" when x is NaN or infinite.
std::string dollars(double x);
// x to `decimals` places, no separators; "-" when x is NaN or infinite.
std::string fixed_or_dash(double x, int decimals);
// x to at most 4 decimals with trailing zeros dropped ("1.5", "-0.25", "+2" with `sign`); "-"
// when x is NaN or infinite.
std::string short_number(double x, bool sign = false);
// "2026-12-01".
std::string iso_date(const Date& date);
// 1234567 -> "1,234,567".
std::string count_text(std::size_t n);
// "2026-12-01", or "not given".
std::string cutoff_text(const std::optional<Date>& cutoff);
// "1 row" / "3 rows".
std::string count_of(std::size_t n, std::string_view singular, std::string_view plural);

// Cell text safe to print on a terminal and to align: valid UTF-8 is kept; each byte that is not
// valid UTF-8 becomes U+FFFD; control characters become \n, \r, \t or \xNN (so a cell cannot move
// the cursor or recolour the screen); text longer than `max_width` code points is cut and ends
// in "...". Empty text becomes `if_empty`.
std::string display_text(std::string_view text, std::size_t max_width,
                         std::string_view if_empty = "");
// Loan ids and cell values longer than these are cut ("...") in text tables.
inline constexpr std::size_t kLoanIdWidth = 24;
inline constexpr std::size_t kValueWidth = 32;

// Plain English for a category code in text tables: "cash_out_refi" -> "cash-out refi",
// "two_to_four" -> "2-4 unit", "30" -> "30 days", "unknown" -> "missing". Other text unchanged.
// JSON keeps the codes.
std::string_view plain_label(std::string_view code);

// Code points in valid UTF-8 text (what display_text returns): the width used for alignment.
std::size_t display_width(std::string_view text);

enum class Align { left, right };

// Rows of cells already formatted. Columns are padded to their widest cell and set two spaces
// apart; each line starts with `indent`. No header line when `headers` is empty.
struct TextTable {
  std::vector<std::string> headers;
  std::vector<Align> align;                 // one per column
  std::vector<std::vector<std::string>> rows;
};
std::string render(const TextTable& table, std::string_view indent = "  ");

// The assumption rows both the cash-flow and the price report show: prepayment, default,
// severity, liquidation lag, advancing, delinquent default (label, value).
std::vector<std::vector<std::string>> assumption_rows(const Assumptions& a);
// The rejected rows, one line per rejecting problem: row, loan id, column, value, reason.
std::string rejects_table(const TapeRead& tape);
// "2 rows rejected (UPB $250,000.00) not <done>", `done` what became of the accepted loans:
// "projected", "priced".
std::string rejects_heading(const TapeRead& tape, std::string_view done);
// The end of a report on accepted loans: a blank line, the rejected rows (or "none"), a line on
// accepted rows with warnings if any, a blank line and the caution.
std::string rejects_and_caution(const TapeRead& tape, std::string_view done);

// ---- JSON ---------------------------------------------------------------------------------------
// Objects keep their keys in the order written, so documents read in the order they are described.
using Json = nlohmann::ordered_json;

// "2026-12-01", or null.
Json cutoff_json(const std::optional<Date>& cutoff);
// A number, or null when NaN or infinite.
Json number_or_null(double x);
// {"cash_flow_yield","bey","z_spread","par_yield_at_wal","spread_at_wal","wal_years",
// "modified_duration"} of one view of a bid (loss-adjusted or no-loss).
Json pool_view_json(const PoolView& view);
// {"row","loan_id","field","column","value","reason","severity": "reject" | "warning"};
// field is the canonical name, or null for a problem with the whole row.
Json problem_json(const RowProblem& problem);
// Two-space indent, one newline at the end; bytes that are not valid UTF-8 become U+FFFD
// instead of throwing.
std::string dump_json(const Json& document);
// {"prepay","default","severity" (canonical text forms),"lag_months","advancing",
// "delinquent_default"}: reads back as an assumptions file.
Json assumptions_json(const Assumptions& a);
// [{"row","loan_id","field","column","value","reason"}] for each rejecting problem, in tape order.
Json rejected_json(const TapeRead& tape);

// ---- CSV ----------------------------------------------------------------------------------------
// The loans CSVs are built in memory: a million lines of cells appended without a string each.
using CsvBuffer = fmt::memory_buffer;

// Throws std::invalid_argument ("<what>: ...") unless every column in `columns` and the tape's
// loan_id, row, seller and note_rate have one entry per loan.
void check_loan_columns(std::string_view what, const LoanArrays& loans,
                        std::initializer_list<const std::vector<double>*> columns);

// x to `decimals` places (0 to 12); a value that rounds to zero is "0.00", never "-0.00"; an
// empty cell when x is NaN or infinite (a spreadsheet shows a blank, pandas reads NaN).
void put_fixed(CsvBuffer& out, double x, int decimals);
// Dollars to the cent, as whole cents rounded half away from zero (integer formatting is several
// times faster than fixed-point); an empty cell when x is NaN or infinite.
void put_money(CsvBuffer& out, double x);
// A CSV cell as RFC 4180 writes it: quoted, with quotes doubled, when it holds a comma, a quote
// or a line break; as is otherwise.
void put_csv_text(CsvBuffer& out, std::string_view text);
// Each of loans.seller_names as a CSV cell, in the same order (LoanArrays::seller indexes it).
std::vector<std::string> csv_seller_names(const LoanArrays& loans);
// The cells a loans CSV line starts with, "loan_id,row,seller" (no comma after), for loan i;
// `sellers` from csv_seller_names (an unknown seller is an empty cell).
void put_loan_cells(CsvBuffer& out, const LoanArrays& loans,
                    const std::vector<std::string>& sellers, std::size_t i);

// Appends rows [first, last) of a CSV, one line each.
using PutRows = std::function<void(CsvBuffer& out, std::size_t first, std::size_t last)>;
// The header line, then `rows` rows, as one string.
std::string csv_document(std::string_view header, std::size_t rows, const PutRows& put_rows);
// The same document written to `stream` in pieces of about 1 MiB, so memory stays flat however
// many rows there are. Stops at the first piece the stream refuses; the caller sees its state.
void write_csv_document(std::ostream& stream, std::string_view header, std::size_t rows,
                        const PutRows& put_rows);

}  // namespace poolbid::detail
