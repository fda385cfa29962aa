// Private to report/: what the reports print the same way: numbers with thousands separators,
// dates, cell text made safe for a terminal, aligned text tables, and JSON pieces.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include <nlohmann/json.hpp>

#include "tape/tape.h"

namespace poolbid::detail {

// ---- Text ---------------------------------------------------------------------------------------
// 1234567.891 with 2 decimals -> "1,234,567.89"; "-" when x is NaN or infinite.
std::string with_thousands(double x, int decimals);
// "$1,234,567.89" (cents); "-" when x is NaN or infinite.
std::string dollars(double x);
// x to `decimals` places, no separators; "-" when x is NaN or infinite.
std::string fixed_or_dash(double x, int decimals);
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

// ---- JSON ---------------------------------------------------------------------------------------
// Objects keep their keys in the order written, so documents read in the order they are described.
using Json = nlohmann::ordered_json;

// "2026-12-01", or null.
Json cutoff_json(const std::optional<Date>& cutoff);
// A number, or null when NaN or infinite.
Json number_or_null(double x);
// {"row","loan_id","field","column","value","reason","severity": "reject" | "warning"};
// field is the canonical name, or null for a problem with the whole row.
Json problem_json(const RowProblem& problem);
// Two-space indent, one newline at the end; bytes that are not valid UTF-8 become U+FFFD
// instead of throwing.
std::string dump_json(const Json& document);

}  // namespace poolbid::detail
