// Private to tape/: the pieces read_tape is built from, shared by its source files and tests:
// error text, cell parsing, header resolution, the per-row staging arrays and the row rules.
#pragma once

#include <array>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "tape/csv.h"
#include "tape/tape.h"

namespace poolbid::detail {

// ---- Errors -------------------------------------------------------------------------------------
// A TapeError whose what() reads "pool.csv row 418, column orig_ltv, value '1O5': not a number",
// leaving out the parts that are 0 or empty ("pool.csv: no data rows after the header").
TapeError tape_error(ErrorKind kind, std::string_view file, std::size_t row,
                     std::string_view column, std::string_view value, std::string_view message);

// ---- Cells --------------------------------------------------------------------------------------
inline std::string_view trim_spaces(std::string_view text) {
  while (!text.empty() && text.front() == ' ') text.remove_prefix(1);
  while (!text.empty() && text.back() == ' ') text.remove_suffix(1);
  return text;
}

// ASCII letters lower-cased, other bytes as they are (header names compare ignoring case).
inline char ascii_lower_char(char ch) {
  return ch >= 'A' && ch <= 'Z' ? static_cast<char>(ch - 'A' + 'a') : ch;
}
inline std::string ascii_lower(std::string_view text) {
  std::string out(text);
  for (char& ch : out) ch = ascii_lower_char(ch);
  return out;
}

// Long values (a whole row, a runaway field) are shown cut to this many bytes in messages.
inline constexpr std::size_t kValueShownBytes = 60;

// The first `bytes` of `text`, not cutting a UTF-8 character in two (a long value shown cut).
inline std::string_view utf8_prefix(std::string_view text, std::size_t bytes) {
  if (text.size() <= bytes) return text;
  while (bytes > 0 && (static_cast<unsigned char>(text[bytes]) & 0xC0) == 0x80) --bytes;
  return text.substr(0, bytes);
}

struct Number {
  double value;
  bool percent;  // written with a trailing '%': value is already divided by 100
};

// The common case of parse_number, done inline: digits with at most one '.', 15 significant
// digits or fewer. The integer they spell and the power of ten are exact doubles, so their
// quotient is the correctly rounded value, the same from_chars gives. False for anything else.
inline bool short_decimal(std::string_view text, double& out) {
  static constexpr double kPowersOfTen[] = {1e0, 1e1, 1e2,  1e3,  1e4,  1e5,  1e6,  1e7,
                                            1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15};
  if (text.empty() || text.size() > 16) return false;  // over 15 digits and a point
  const char* p = text.data();
  const char* const end = p + text.size();
  const auto digit = [](char ch) { return static_cast<unsigned>(ch - '0') <= 9; };
  std::uint64_t digits = 0;
  for (; p < end && digit(*p); ++p) digits = digits * 10 + static_cast<unsigned>(*p - '0');
  std::size_t decimals = 0;
  const bool point = p < end && *p == '.';
  if (point) {
    const char* const first = ++p;
    for (; p < end && digit(*p); ++p) digits = digits * 10 + static_cast<unsigned>(*p - '0');
    decimals = static_cast<std::size_t>(p - first);
  }
  const std::size_t count = text.size() - (point ? 1 : 0);  // digits, when all are read
  if (p != end || count == 0 || count > 15) return false;
  const double value = static_cast<double>(digits);
  out = decimals > 0 ? value / kPowersOfTen[decimals] : value;
  return true;
}

// A number as tapes write it: optional sign and leading '$', thousands separators in groups of
// three ("250,000.00"; "6,5" is not a number, so a decimal comma is never read as a thousand),
// a trailing '%'. `text` is trimmed. nullopt if it is not a finite number.
std::optional<Number> parse_number(std::string_view text);

// True if `value` is a whole number that fits a 32-bit month or score count.
inline bool is_whole_int32(double value) {
  return value == std::trunc(value) && value >= std::numeric_limits<std::int32_t>::min() &&
         value <= std::numeric_limits<std::int32_t>::max();
}

// Dates poolbid reads: years 1900-2200, months 1-12, days 1-31, checked as integers before a
// Date is built (std::chrono::month and day hold one byte: 257 would wrap to 1). Whether the day
// exists in its month is Date::ok()'s to say.
inline constexpr unsigned kFirstYear = 1900, kLastYear = 2200;
inline bool plausible_date(unsigned year, unsigned month, unsigned day) {
  return year >= kFirstYear && year <= kLastYear && month >= 1 && month <= 12 && day >= 1 &&
         day <= 31;
}

// parse_date, with the common YYYY-MM-DD shape read directly.
std::optional<Date> parse_cell_date(std::string_view text);

// Whole months from `from` to `to`, counting a month only once its day is reached:
// 2026-01-01 -> 2026-12-01 is 11, 2026-01-15 -> 2026-12-01 is 10.
int whole_months_between(Date from, Date to);

// Months of payments from the cut-off to maturity, both months counted, days ignored:
// cut-off 2026-12-01, maturity 2056-11-01 -> 360.
int months_to_maturity(Date cutoff, Date maturity);

// Days since 1970-01-01.
std::int32_t days_since_epoch(Date date);

// Month cells (terms, ages, interest-only and balloon months, ARM reset months) outside
// 0..kMaxMonths are rejected as read: no loan runs 100 years, and sums and differences of
// months then stay far inside an int.
inline constexpr int kMaxMonths = 1200;

// Balances (dollars): above the first a cell is not a residential loan balance (rejected, and
// left out of TapeRead::upb_rejected); above the second the loan is checked by hand (a warning).
inline constexpr double kMaxLoanBalance = 100'000'000;
inline constexpr double kLargeLoanBalance = 5'000'000;

// ---- Header -------------------------------------------------------------------------------------
inline constexpr std::size_t kNoColumn = static_cast<std::size_t>(-1);

struct ColumnIndex {
  std::array<std::size_t, kFieldCount> position;  // header position of each field, or kNoColumn
  std::vector<std::string> header;                // header cells, trimmed
  std::vector<std::string> ignored;               // header cells no field uses, in header order
  std::size_t header_row = 1;

  bool has(Field f) const { return position[static_cast<std::size_t>(f)] != kNoColumn; }
  std::size_t at(Field f) const { return position[static_cast<std::size_t>(f)]; }
  // The header cell of f's column, "" if f has none.
  std::string_view name(Field f) const { return has(f) ? std::string_view(header[at(f)]) : ""; }
};

// Matches header cells to fields. Without a map: canonical names, case-insensitive. With one:
// the first of a field's listed names found (case-insensitive), and canonical names of fields the
// map does not list. Throws TapeError duplicate_column when two cells give one field.
ColumnIndex resolve_columns(const std::vector<std::string_view>& header_cells, const ColumnMap* map,
                            std::string_view file, std::size_t header_row);

// The header names that would have been accepted for f (for a missing-column message).
std::vector<std::string> names_looked_for(Field f, const ColumnMap* map);

// ---- Staging ------------------------------------------------------------------------------------
// Every well-formed data row, accepted or not yet decided, in tape order; rejected rows are
// dropped only at the end. Rate values are as written until the column's unit is applied.
struct Staging {
  LoanArrays loans;
  std::vector<std::size_t> offset;     // byte offset of the row's record, to re-read a cell
  std::vector<std::uint64_t> given;    // bit per Field: a value was read (or derived)
  std::vector<std::uint64_t> percent;  // bit per Field: the cell had a '%' (already decimal)
  std::vector<std::uint8_t> source;    // RowSource bits
  std::vector<std::uint8_t> rejected;  // 1 once any rule rejects the row
  // Bit per Field: the cell, written without '%', disagrees with its column's unit (above the
  // decimal detection ceiling in a decimal column, at or below it in a percent column). Empty
  // when no cell of the tape disagrees.
  std::vector<std::uint64_t> off_unit;
  std::array<Unit, kFieldCount> unit{};  // each rate column's unit as read (declared or detected)
};

// Where a row's derived values came from.
enum RowSource : std::uint8_t {
  kRemainingFromMaturity = 1,  // remaining term from maturity_date and the cut-off
  kAgeFromFirstPayment = 2,    // age from first_payment_date and the cut-off
  kAgeFromTerms = 4,           // age = original term - remaining term
  kServicingFeeDefault = 8,    // servicing fee is the pool default, not a cell
};

constexpr std::uint64_t bit(Field f) { return std::uint64_t{1} << static_cast<unsigned>(f); }
static_assert(kFieldCount <= 64, "one bit per field in Staging::given");

// Calls visit(&LoanArrays::member, missing value) for every per-loan vector of LoanArrays (not
// the name tables), so adding, keeping, dropping and selecting rows cannot miss one.
template <typename Visit>
void for_each_loan_member(Visit&& visit) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  visit(&LoanArrays::loan_id, std::string());
  visit(&LoanArrays::row, std::uint32_t{0});
  visit(&LoanArrays::seller, std::uint16_t{0});
  visit(&LoanArrays::current_balance, nan);
  visit(&LoanArrays::original_balance, nan);
  visit(&LoanArrays::note_rate, nan);
  visit(&LoanArrays::servicing_fee, nan);
  visit(&LoanArrays::original_term, std::int32_t{0});
  visit(&LoanArrays::remaining_term, std::int32_t{0});
  visit(&LoanArrays::age, std::int32_t{0});
  visit(&LoanArrays::amortization, Amortization::fixed);
  visit(&LoanArrays::io_months, std::int32_t{0});
  visit(&LoanArrays::balloon_month, std::int32_t{0});
  visit(&LoanArrays::arm_index, std::uint8_t{0});
  visit(&LoanArrays::arm_margin, nan);
  visit(&LoanArrays::arm_periodic_cap, nan);
  visit(&LoanArrays::arm_lifetime_cap, nan);
  visit(&LoanArrays::arm_floor, nan);
  visit(&LoanArrays::arm_first_reset, std::int32_t{0});
  visit(&LoanArrays::arm_reset_period, std::int32_t{0});
  visit(&LoanArrays::credit_score, nan);
  visit(&LoanArrays::original_ltv, nan);
  visit(&LoanArrays::combined_ltv, nan);
  visit(&LoanArrays::dti, nan);
  visit(&LoanArrays::property_value, nan);
  visit(&LoanArrays::property_value_date, kNoDate);
  visit(&LoanArrays::occupancy, Occupancy::unknown);
  visit(&LoanArrays::property_type, PropertyType::unknown);
  visit(&LoanArrays::purpose, Purpose::unknown);
  visit(&LoanArrays::documentation, Documentation::unknown);
  visit(&LoanArrays::state, std::uint8_t{0});
  visit(&LoanArrays::delinquency, Delinquency::unknown);
}

// Calls visit(vector, missing value) for every per-loan vector of `l`.
template <typename Visit>
void for_each_loan_vector(LoanArrays& l, Visit&& visit) {
  for_each_loan_member([&](auto member, const auto& missing) { visit(l.*member, missing); });
}

// ---- Plan ---------------------------------------------------------------------------------------
// How a column's cells are read.
enum class CellKind : std::uint8_t {
  loan_id,
  seller,
  arm_index,
  money,
  rate,
  whole,
  score,
  date,
  first_payment,
  maturity,
  category,
  state,
};

// One column to read: which field, where, how, and into which vector.
struct Step {
  Field field;
  std::size_t column;
  CellKind kind;
  bool required = false;  // an empty cell rejects the row (the remaining term is checked later)
  bool number = false;    // money, rate, whole or score
  double decimal_ceiling = 0;  // rate: decimal_detection_ceiling(field)
  std::vector<double> LoanArrays::*doubles = nullptr;     // money, rate, score
  std::vector<std::int32_t> LoanArrays::*ints = nullptr;  // whole
};

// A seller's spelling of a category value, from the column map, folded.
struct Spelling {
  std::string folded;
  std::uint8_t value;
};

// What to do with each column, decided once from the header and the options.
struct Plan {
  std::vector<Step> steps;  // columns read, in header order
  std::optional<Date> cutoff;
  std::optional<Rate> default_fee;  // decimal
  std::string default_seller;
  std::array<Unit, kFieldCount> unit{};  // declared units; Unit::detect otherwise
  std::array<std::vector<Spelling>, kFieldCount> spellings;
  std::array<std::uint8_t, 26 * 26> state_by_letters{};  // state_index of "AA".."ZZ"; 0 = none
  std::vector<std::string> notes;
};

// Checks the required columns and options against the header (TapeError missing_column,
// bad_option) and decides the steps, units, spellings, defaults and file-level notes.
Plan make_plan(const ColumnIndex& columns, const ReadOptions& options, std::string_view file);

bool has_step(const Plan& plan, Field f);

// The LoanArrays vector a rate, ratio, dollar or score field is read into (credit_score for any
// field that has none).
std::vector<double> LoanArrays::*double_vector(Field f);

// state_index through the plan's table; 0 if not a state code.
std::uint8_t state_of(const Plan& plan, std::string_view code);

// ---- The pass over the text ---------------------------------------------------------------------
// Rate cells written without '%' vote on their column's unit: a value above 0 and at or below
// the field's decimal detection ceiling looks like a decimal, one above it like percent. Zero and
// negative values read the same (or are as wrong) in both units and do not vote.
struct UnitVotes {
  std::size_t decimal = 0;
  std::size_t percent = 0;
  std::size_t not_voting = 0;  // zero or below
  bool any_plain() const { return decimal + percent + not_voting > 0; }
};

struct RowsRead {
  Staging staging;                   // well-formed rows; vectors cut to size
  std::vector<RowProblem> problems;  // rejects found while reading, in row order
  std::size_t rows_read = 0;
  std::size_t rows_not_staged = 0;        // rejected whole (ragged, a repeated header)
  std::size_t ages_from_terms = 0;        // rows whose age cell was empty
  std::array<UnitVotes, kFieldCount> votes{};
};

// Reads every remaining record of `scanner` (the header already read) into staging: cells parsed,
// derived terms filled, and the rejects that need no unit (unparsable or missing cells,
// unknown spellings and states, duplicate loan ids, ragged rows, the header repeated) recorded.
RowsRead read_rows(CsvScanner& scanner, const Plan& plan, const ColumnIndex& columns);

// ---- Row rules ----------------------------------------------------------------------------------
// Fetches a staged row's cell text again from the tape (problems are rare; rows are not kept).
struct CellReader {
  std::string_view text;
  std::string_view file;
  std::size_t max_record_bytes;
  const ColumnIndex* columns;
  const Staging* staging;
  std::size_t cached_row = kNoColumn;  // staging index of the record held below
  CsvRecord record{};
  CsvScanner scanner{};

  std::string cell(std::size_t index, Field f);  // "" if f has no column
};

struct RuleOptions {
  double term_tolerance_months = 1;
};

// Applies the range and consistency rules to staged rows whose values are final (units applied,
// defaults filled), appending problems in row order and setting `rejected`. Rows already rejected
// get their remaining rejects but no warnings. A cell gets at most one problem: the problems
// already in `problems` on entry (those found while reading, in row order) count, and a cell that
// disagrees with its column's unit gets that said in its one problem (a reject in a decimal
// column, a warning in a percent column). Returns the number of rows accepted with warnings.
std::size_t check_rows(Staging& staging, CellReader& cells, const RuleOptions& options,
                       std::vector<RowProblem>& problems);

// "6.5%" for 0.065.
std::string percent_text(double decimal);

}  // namespace poolbid::detail
