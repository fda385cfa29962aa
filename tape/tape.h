// Loan tape: read a seller's CSV through a column map into loans held as structure-of-arrays,
// validate every row (accepted, possibly with warnings, or rejected with reasons), and stratify.
// Nothing is lost: rows read = rows accepted + rows rejected, always. Not thread-safe per call;
// separate calls share nothing.
#pragma once

#include <chrono>
#include <cstddef>
#include <cstdint>
#include <iosfwd>
#include <map>
#include <optional>
#include <span>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace poolbid {

using Rate = double;                 // decimal per year: 0.065
using Date = std::chrono::year_month_day;

// ---- Canonical fields ---------------------------------------------------------------------------
// The names a tape uses when it has no column map; a map renames a seller's headers to these.
enum class Field : std::uint8_t {
  loan_id, seller,
  current_balance, original_balance, note_rate, servicing_fee,
  original_term, remaining_term, maturity_date, loan_age, first_payment_date,
  amortization_type, io_months, balloon_month,
  arm_index, arm_margin, arm_first_reset, arm_reset_period, arm_periodic_cap, arm_lifetime_cap,
  arm_floor,
  credit_score, original_ltv, combined_ltv, property_value, property_value_date, dti,
  occupancy, property_type, loan_purpose, documentation, state, delinquency,
  count_  // number of fields; not a field
};
inline constexpr std::size_t kFieldCount = static_cast<std::size_t>(Field::count_);

std::string_view field_name(Field f);                  // "current_balance"
std::optional<Field> field_from_name(std::string_view name);  // exact canonical name

// A date written ISO (2026-03-01) or month/day/year (3/1/2026) with a year from 1900 to 2200;
// nullopt if neither, or not a day of the calendar (month 13, 2024-02-30, day 257).
std::optional<Date> parse_date(std::string_view text);

// How a rate or ratio column is written on the tape.
enum class Unit : std::uint8_t { detect, percent, decimal };

// ---- Enumerations (0 = not given on the tape) ---------------------------------------------------
enum class Amortization : std::uint8_t { fixed, arm, interest_only, balloon };
enum class Occupancy : std::uint8_t { unknown, owner, second_home, investor };
enum class Purpose : std::uint8_t { unknown, purchase, rate_term_refi, cash_out_refi };
enum class Documentation : std::uint8_t { unknown, full, limited, none };
enum class PropertyType : std::uint8_t {
  unknown, single_family, condo, pud, two_to_four, manufactured, coop
};
enum class Delinquency : std::uint8_t { unknown, current, dq30, dq60, dq90_plus, foreclosure };

std::string_view to_string(Amortization v);   // "fixed", "arm", "interest_only", "balloon"
std::string_view to_string(Occupancy v);      // "owner", "second_home", "investor", "unknown"
std::string_view to_string(Purpose v);        // "purchase", "rate_term_refi", "cash_out_refi"
std::string_view to_string(Documentation v);  // "full", "limited", "none"
std::string_view to_string(PropertyType v);   // "single_family", "condo", "pud", ...
std::string_view to_string(Delinquency v);    // "current", "30", "60", "90+", "foreclosure"

// US state and territory postal codes (USPS), index 0 = not given.
std::string_view state_code(std::uint8_t index);       // "CA"
std::optional<std::uint8_t> state_index(std::string_view code);  // case-insensitive

// ---- Loans --------------------------------------------------------------------------------------
// One slot per accepted loan, the same index in every vector. Missing optional numbers are NaN,
// missing optional counts are 0, missing dates are kNoDate, missing categories are `unknown`.
inline constexpr std::int32_t kNoDate = INT32_MIN;  // days since 1970-01-01 otherwise

struct LoanArrays {
  // Identity.
  std::vector<std::string> loan_id;
  std::vector<std::uint32_t> row;           // tape row number (header: row 1, unless after blanks)
  std::vector<std::uint16_t> seller;        // index into seller_names
  std::vector<std::string> seller_names;

  // Balance, rate and term.
  std::vector<double> current_balance;      // dollars, > 0
  std::vector<double> original_balance;     // dollars; NaN if not given
  std::vector<Rate> note_rate;              // decimal per year
  std::vector<Rate> servicing_fee;          // decimal per year (column or pool default)
  std::vector<std::int32_t> original_term;  // months
  std::vector<std::int32_t> remaining_term; // months, 1..original_term
  std::vector<std::int32_t> age;            // months since first payment at cut-off (>= 0)

  // Amortisation.
  std::vector<Amortization> amortization;
  std::vector<std::int32_t> io_months;      // interest-only months from first payment; 0 = none
  std::vector<std::int32_t> balloon_month;  // loan month the balloon is paid; 0 = none

  // ARM terms (fixed-rate loans: index 0, NaN rates, 0 months).
  std::vector<std::uint8_t> arm_index;      // index into arm_index_names; 0 = none
  std::vector<std::string> arm_index_names; // [0] = "" (none)
  // Margin over the index and the most one reset may move the rate; lifetime cap and floor are
  // the highest and lowest note rate the loan allows (absolute rates, not spreads). Decimal.
  std::vector<Rate> arm_margin, arm_periodic_cap, arm_lifetime_cap, arm_floor;
  std::vector<std::int32_t> arm_first_reset;   // loan month of the first rate change
  std::vector<std::int32_t> arm_reset_period;  // months between later changes

  // Credit.
  std::vector<double> credit_score;         // 300..850; NaN if not given
  std::vector<double> original_ltv;         // decimal (0.80); NaN if not given
  std::vector<double> combined_ltv;         // decimal; NaN if not given
  std::vector<double> dti;                  // decimal (0.36); NaN if not given
  std::vector<double> property_value;       // dollars; NaN if not given
  std::vector<std::int32_t> property_value_date;  // days since 1970-01-01; kNoDate if not given
  std::vector<Occupancy> occupancy;
  std::vector<PropertyType> property_type;
  std::vector<Purpose> purpose;
  std::vector<Documentation> documentation;
  std::vector<std::uint8_t> state;          // state_code(index); 0 = not given
  std::vector<Delinquency> delinquency;

  std::size_t size() const { return current_balance.size(); }
};

// The loans at `indexes` (each < loans.size(); any order, repeats allowed), in that order, with
// the name tables copied whole so seller and ARM index numbers keep their meaning.
LoanArrays select_loans(const LoanArrays& loans, std::span<const std::uint32_t> indexes);

// ---- Column map ---------------------------------------------------------------------------------
// A seller's header names, units and spellings, read from JSON (format in DEVELOPERS.md):
// {"columns": {"current_balance": "CURR_UPB", ...}, "units": {"note_rate": "decimal"},
//  "values": {"occupancy": {"O": "owner"}}, "defaults": {"servicing_fee": 0.25},
//  "cutoff_date": "2026-12-01", "seller": "..."}
struct ColumnMap {
  std::string source;                                   // file it came from, for messages
  std::map<Field, std::vector<std::string>> columns;    // header names tried in order
  std::map<Field, Unit> units;                          // unlisted rate/ratio columns: detect
  std::map<Field, std::map<std::string, std::string>> values;  // seller spelling -> ours
  std::optional<Rate> default_servicing_fee;            // decimal per year
  std::optional<Date> cutoff;
  std::optional<std::string> seller;                    // used when the tape has no seller column
};

// Throws TapeError (kind bad_map) naming the file and the key at fault.
ColumnMap load_column_map(const std::string& path);
ColumnMap parse_column_map(std::string_view json_text, std::string_view source_name);

// ---- Errors -------------------------------------------------------------------------------------
// A file that cannot be read as a tape at all. Rows with problems are not errors: see RowProblem.
enum class ErrorKind : std::uint8_t {
  cannot_open,        // missing, unreadable, a directory
  empty,              // zero bytes (or only a byte-order mark / blank lines)
  binary,             // NUL bytes in the first 64 KiB or the header (a later one rejects its row)
  no_data_rows,       // a header and nothing else
  wrong_delimiter,    // header has one column but ';', tab or '|' in it
  record_too_long,    // one row larger than ReadOptions::max_record_bytes; also a tape past
                      // what poolbid reads at all (rows numbered past 4,294,967,295, or over
                      // 64 GiB from a pipe or device)
  unterminated_quote, // a quoted field still open at end of file, or one spanning lines with
                      // text after its closing quote (a quote left open swallowing rows)
  missing_column,     // a required field has no column and no default
  duplicate_column,   // two header cells resolve to the same field
  bad_map,            // column map file unreadable or invalid
  bad_option,         // an option value that cannot be used (e.g. cut-off date)
};
std::string_view to_string(ErrorKind kind);

struct TapeError : std::runtime_error {
  TapeError(ErrorKind kind, std::string file, std::size_t row, std::string column,
            std::string value, const std::string& message);
  ErrorKind kind;
  std::string file;
  std::size_t row;      // 0 when the problem is not on one row
  std::string column;   // "" when not about one column
  std::string value;
};

// ---- Reading and validating --------------------------------------------------------------------
struct ReadOptions {
  std::optional<ColumnMap> map;                   // none: headers are the canonical names
  std::optional<Date> cutoff;                     // overrides the map's; needed for date terms
  std::optional<Rate> default_servicing_fee;      // overrides the map's; decimal per year
  std::size_t max_record_bytes = std::size_t{1} << 20;  // longer row: the file is unusable
  double term_tolerance_months = 1;               // age + remaining vs original: warn beyond
};

// One problem on one row. A rejected row has one or more with `reject` set; warnings only never
// reject a row. `column` is the tape's header; `field` the canonical name it maps to.
struct RowProblem {
  std::size_t row;          // tape row number (header: row 1, unless after blank lines)
  std::string loan_id;      // as read, may be empty
  std::optional<Field> field;
  std::string column;       // header cell, "" for a whole-row problem (ragged row)
  std::string value;        // the cell text as read
  std::string reason;       // "not a number", "note rate 31% outside 0-25%", ...
  bool reject;
};

struct TapeRead {
  std::string file;
  std::optional<Date> cutoff;                     // as used
  LoanArrays loans;                               // accepted rows, in tape order
  std::vector<RowProblem> problems;               // rejects and warnings, in row order
  std::vector<std::string> notes;                 // file-level warnings (unit detected, ...)
  std::size_t rows_read = 0;                      // data rows (blank lines are not rows)
  std::size_t rows_rejected = 0;
  std::size_t rows_with_warnings = 0;             // accepted rows with at least one warning
  std::size_t blank_lines = 0;                    // skipped, reported; with rows of only
                                                  // commas or spaces
  double upb_accepted = 0;                        // dollars
  double upb_rejected = 0;                        // dollars, rejected rows whose balance parsed
                                                  // and is a loan's (at most $100,000,000)
  std::size_t rows_accepted() const { return loans.size(); }
};

// Reads and validates a tape. Throws TapeError when the file is unusable as a whole; otherwise
// every data row is either in `loans` or has a rejecting RowProblem.
TapeRead read_tape(const std::string& path, const ReadOptions& options = {});
// The same on text in memory; `name` stands for the file name in messages.
TapeRead read_tape_text(std::string_view text, std::string_view name,
                        const ReadOptions& options = {});

// ---- Strats -------------------------------------------------------------------------------------
// UPB-weighted averages leave out loans missing that field; `missing` counts them.
struct WeightedAverage {
  double value;             // NaN when no loan has the field
  std::size_t missing;      // loans without the field
};

struct StratRow {
  std::string label;        // "740-779", "owner", "CA"
  std::size_t count;
  double upb;               // dollars
  double upb_share;         // decimal of pool UPB
  double wac;               // decimal
  double wa_score;          // NaN when no loan in the row has a score
  double wa_ltv;            // decimal; NaN when none has an LTV
};

struct StratTable {
  std::string title;        // "credit score", "state (top 10 by UPB)"
  std::vector<StratRow> rows;
};

struct Strats {
  std::size_t loans = 0;
  double upb = 0, average_upb = 0;   // dollars
  WeightedAverage wac, wam, wala;    // decimal, months, months
  WeightedAverage credit_score, original_ltv, combined_ltv, dti;  // ratios decimal
  std::vector<StratTable> tables;
};

Strats stratify(const LoanArrays& loans);

// ---- Demo tapes ---------------------------------------------------------------------------------
// Invented loans from invented sellers, deterministic for a seed. Same coupon/term/balance mix
// for every profile at one seed; only underwriting differs.
enum class DemoProfile : std::uint8_t { strict, loose };
enum class DemoLayout : std::uint8_t {
  canonical,    // our header names, percent units, loan age and remaining term
  seller_coded  // another seller's headers, decimal rates, m/d/y dates, letter codes: needs a map
};
struct DemoTapeOptions {
  std::size_t loans = 2000;
  DemoProfile profile = DemoProfile::strict;
  std::uint64_t seed = 1;
  DemoLayout layout = DemoLayout::canonical;
  std::size_t bad_rows = 0;                 // rows made invalid on purpose, to show `check`
  Date cutoff = Date{std::chrono::year{2026}, std::chrono::month{12}, std::chrono::day{1}};
};
void write_demo_tape(std::ostream& out, const DemoTapeOptions& options);
std::string_view demo_seller_name(DemoProfile profile);

}  // namespace poolbid
