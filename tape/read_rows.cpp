// The pass over a tape's text: each record's cells into the staging arrays, with the rejects
// found on the way (unparsable or missing cells, unknown spellings, duplicate ids, ragged rows,
// the header repeated).
// Nothing per field is allocated; loan ids are checked for duplicates in a table sized up front.
#include <fmt/core.h>

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstring>
#include <functional>
#include <limits>
#include <unordered_map>

#include "tape/fields.h"
#include "tape/reader.h"

namespace poolbid::detail {
namespace {

constexpr std::size_t kCategoryCacheSize = 64;  // distinct spellings remembered per column

// Loan ids seen so far: open addressing over staging indexes, each slot (hash << 32 | index + 1),
// 0 when empty; keys are compared with the staged ids themselves, so nothing else is stored.
struct IdTable {
  std::vector<std::uint64_t> slots;
  std::size_t used = 0;
};

std::uint32_t id_hash(std::string_view id) {
  return static_cast<std::uint32_t>(std::hash<std::string_view>{}(id));
}

void place(std::vector<std::uint64_t>& slots, std::uint64_t entry) {
  const std::size_t mask = slots.size() - 1;
  for (std::size_t at = (entry >> 32) & mask;; at = (at + 1) & mask) {
    if (slots[at] == 0) {
      slots[at] = entry;
      return;
    }
  }
}

void size_id_table(IdTable& table, std::size_t rows) {
  std::size_t size = 16;
  while (size < 2 * rows) size *= 2;
  if (size <= table.slots.size()) return;
  std::vector<std::uint64_t> old(size, 0);
  old.swap(table.slots);
  for (std::uint64_t entry : old)
    if (entry != 0) place(table.slots, entry);
}

// The slot an id hashes to, asked for early so the lookup at the end of its row finds it cached.
const std::uint64_t* id_slot(const IdTable& table, std::uint32_t hash) {
  return table.slots.data() + (hash & (table.slots.size() - 1));
}

// The staging index of an earlier row with the id staged at `index` (whose hash is `hash`);
// otherwise records `index` under it.
std::optional<std::size_t> find_or_add_id(IdTable& table, const std::vector<std::string>& ids,
                                          std::size_t index, std::uint32_t hash) {
  if (2 * (table.used + 1) > table.slots.size()) size_id_table(table, table.used + 1);
  const std::string_view id = ids[index];
  const std::size_t mask = table.slots.size() - 1;
  for (std::size_t at = hash & mask;; at = (at + 1) & mask) {
    const std::uint64_t entry = table.slots[at];
    if (entry == 0) {
      table.slots[at] = (std::uint64_t{hash} << 32) | (index + 1);
      ++table.used;
      return std::nullopt;
    }
    const std::size_t other = static_cast<std::size_t>(entry & 0xFFFFFFFFu) - 1;
    if ((entry >> 32) == hash && ids[other] == id) return other;
  }
}

// A category column's cell texts seen so far and what they meant: columns have few spellings.
struct CategoryCache {
  std::vector<std::pair<std::string, int>> seen;  // trimmed cell -> value, or kUnknownSpelling
};

constexpr int kUnknownSpelling = -1;

// Seller or ARM index names: each cell's name to its index in the names vector, the index
// found for the previous cell tried first (a tape lists one seller's loans together).
struct NameTable {
  struct Hash {
    using is_transparent = void;
    std::size_t operator()(std::string_view name) const {
      return std::hash<std::string_view>{}(name);
    }
  };
  std::vector<std::string>* names = nullptr;
  std::unordered_map<std::string, std::size_t, Hash, std::equal_to<>> index;
  std::size_t last = 0;
  std::size_t limit = 0;  // names at most

  NameTable(std::vector<std::string>& names_, std::size_t limit_) : names(&names_), limit(limit_) {
    for (std::size_t i = 0; i < names->size(); ++i) index.emplace((*names)[i], i);
  }
};

// Index of `name` in the table's names, added at the end if new; nullopt past its limit.
std::optional<std::size_t> name_index(NameTable& table, std::string_view name) {
  std::vector<std::string>& names = *table.names;
  if (table.last < names.size() && names[table.last] == name) return table.last;
  if (const auto found = table.index.find(name); found != table.index.end())
    return table.last = found->second;
  if (names.size() >= table.limit) return std::nullopt;
  names.emplace_back(name);
  table.index.emplace(names.back(), names.size() - 1);
  return table.last = names.size() - 1;
}

// The pass's state: what it produces, and what it keeps to produce it.
struct Reading {
  explicit Reading(RowsRead&& start)
      : out(std::move(start)),
        sellers(out.staging.loans.seller_names, UINT16_MAX + std::size_t{1}),
        arm_indexes(out.staging.loans.arm_index_names, UINT8_MAX + std::size_t{1}) {}

  std::string_view text;
  std::string_view file;
  const Plan* plan;
  const ColumnIndex* columns;
  RowsRead out;
  std::size_t staged = 0;  // rows in staging; its vectors may be longer
  IdTable ids;
  std::array<CategoryCache, kFieldCount> categories;
  std::vector<std::string> lowered_header;  // header cells, lower case, to spot it repeated
  NameTable sellers, arm_indexes;
  bool age_column = false;  // the tape has a loan age or first payment date column
  std::size_t next_nul = std::string_view::npos;  // offset of the next NUL byte in the text
};

// What one row has read so far, beyond the staging arrays.
struct RowContext {
  const CsvRecord* record;
  std::size_t index;      // staging index
  std::string_view id{};  // trimmed loan id cell
  std::uint32_t id_hash = 0;
  std::uint64_t bad = 0;  // bit per Field: the cell was rejected
  std::optional<int> remaining_from_maturity{};
  std::optional<int> age_from_first_payment{};
};

void reject_cell(Reading& r, RowContext& row, Field f, std::string_view cell, std::string reason) {
  r.out.problems.push_back({row.record->row, std::string(row.id), f,
                            std::string(r.columns->name(f)), std::string(cell), std::move(reason),
                            true});
  r.out.staging.rejected[row.index] = 1;
  row.bad |= bit(f);
}

// The enum value a category cell spells (the map's spellings first, then ours), or
// kUnknownSpelling. An int, not an optional: this runs for every category cell.
int category_value(Reading& r, Field f, std::string_view text) {
  CategoryCache& cache = r.categories[static_cast<std::size_t>(f)];
  for (const auto& [seen, value] : cache.seen)
    if (seen == text) return value;
  int value = kUnknownSpelling;
  const std::vector<Spelling>& theirs = r.plan->spellings[static_cast<std::size_t>(f)];
  if (!theirs.empty()) {
    const std::string folded = fold_spelling(text);
    for (const Spelling& s : theirs)
      if (s.folded == folded) value = s.value;
  }
  if (value == kUnknownSpelling) {
    if (const std::optional<std::uint8_t> ours = parse_category(f, text)) value = *ours;
  }
  if (cache.seen.size() < kCategoryCacheSize) cache.seen.emplace_back(std::string(text), value);
  return value;
}

void store_category(LoanArrays& l, Field f, std::size_t i, std::uint8_t value) {
  switch (f) {
    case Field::amortization_type: l.amortization[i] = static_cast<Amortization>(value); break;
    case Field::occupancy: l.occupancy[i] = static_cast<Occupancy>(value); break;
    case Field::property_type: l.property_type[i] = static_cast<PropertyType>(value); break;
    case Field::loan_purpose: l.purpose[i] = static_cast<Purpose>(value); break;
    case Field::documentation: l.documentation[i] = static_cast<Documentation>(value); break;
    default: l.delinquency[i] = static_cast<Delinquency>(value); break;
  }
}

// A money, rate, whole-number or score cell (most of a tape's cells: kept small to inline).
void read_number_cell(Reading& r, RowContext& row, const Step& step, std::string_view cell) {
  const Field f = step.field;
  const std::string_view text = trim_spaces(cell);
  if (text.empty()) {
    if (step.required) reject_cell(r, row, f, cell, "required field missing");
    return;
  }
  double value = 0;
  bool percent = false;
  if (!short_decimal(text, value)) {
    // Thousands separators belong to dollar amounts; elsewhere a comma is likelier a decimal
    // comma ("7,125" for a 7.125% note rate), so it is not read as 7125.
    if (step.kind != CellKind::money && text.find(',') != std::string_view::npos)
      return reject_cell(r, row, f, cell,
                         "not a number (a comma is a thousands separator only in dollar amounts)");
    // "1e5" is a number to a program, but a seller writes dollars out; an exponent in a dollar
    // amount is a spreadsheet's display of a cell, not the amount.
    if (step.kind == CellKind::money && text.find_first_of("eE") != std::string_view::npos)
      return reject_cell(r, row, f, cell,
                         "not a number (dollar amounts are not read in exponent notation)");
    // '$' and '%' belong to dollar amounts and to rates and ratios: "$360" is no term.
    if (step.kind != CellKind::money && text.find('$') != std::string_view::npos)
      return reject_cell(r, row, f, cell, "not a number");
    const std::optional<Number> number = parse_number(text);
    if (!number || (number->percent && step.kind != CellKind::rate))
      return reject_cell(r, row, f, cell, "not a number");
    value = number->value;
    percent = number->percent;
  }
  LoanArrays& l = r.out.staging.loans;
  const std::size_t i = row.index;
  if (step.kind == CellKind::whole) {
    // Month counts are bounded here, before any sum or difference of them can overflow.
    if (value != std::trunc(value)) return reject_cell(r, row, f, cell, "not a whole number");
    if (!(value >= 0 && value <= kMaxMonths))
      return reject_cell(r, row, f, cell,
                         fmt::format("{} months outside 0-{}", value, kMaxMonths));
  }
  if (step.kind == CellKind::whole || step.kind == CellKind::score) {
    if (!is_whole_int32(value)) return reject_cell(r, row, f, cell, "not a whole number");
    if (step.kind == CellKind::whole)
      (l.*step.ints)[i] = static_cast<std::int32_t>(value);
    else
      (l.*step.doubles)[i] = value;
  } else {
    (l.*step.doubles)[i] = value;
  }
  if (step.kind == CellKind::rate) {
    if (percent) {
      r.out.staging.percent[i] |= bit(f);
    } else {
      UnitVotes& votes = r.out.votes[static_cast<std::size_t>(f)];
      if (value > step.decimal_ceiling)
        ++votes.percent;
      else if (value > 0)
        ++votes.decimal;
      else
        ++votes.not_voting;
    }
  }
  r.out.staging.given[i] |= bit(f);
}

// Any other cell: ids, names, dates, categories, states.
void read_other_cell(Reading& r, RowContext& row, const Step& step, std::string_view cell) {
  const Field f = step.field;
  const std::string_view text = trim_spaces(cell);
  if (text.empty()) {
    if (step.required) reject_cell(r, row, f, cell, "required field missing");
    return;
  }
  LoanArrays& l = r.out.staging.loans;
  const std::size_t i = row.index;
  std::uint64_t& given = r.out.staging.given[i];
  switch (step.kind) {
    case CellKind::loan_id:
      l.loan_id[i].assign(text);
      given |= bit(f);
      return;
    case CellKind::seller: {
      const auto index = name_index(r.sellers, text);
      if (!index) return reject_cell(r, row, f, cell, "more than 65,536 sellers on one tape");
      l.seller[i] = static_cast<std::uint16_t>(*index);
      given |= bit(f);
      return;
    }
    case CellKind::arm_index: {
      const auto index = name_index(r.arm_indexes, text);
      if (!index) return reject_cell(r, row, f, cell, "more than 255 ARM index names on one tape");
      l.arm_index[i] = static_cast<std::uint8_t>(*index);
      given |= bit(f);
      return;
    }
    case CellKind::money:
    case CellKind::rate:
    case CellKind::whole:
    case CellKind::score: return read_number_cell(r, row, step, cell);
    case CellKind::date:
    case CellKind::first_payment:
    case CellKind::maturity: {
      const std::optional<Date> date = parse_cell_date(text);
      if (!date) return reject_cell(r, row, f, cell, "not a date (YYYY-MM-DD or M/D/YYYY)");
      if (step.kind == CellKind::date) l.property_value_date[i] = days_since_epoch(*date);
      if (step.kind == CellKind::first_payment)
        row.age_from_first_payment = whole_months_between(*date, *r.plan->cutoff);
      if (step.kind == CellKind::maturity)
        row.remaining_from_maturity = months_to_maturity(*r.plan->cutoff, *date);
      given |= bit(f);
      return;
    }
    case CellKind::category: {
      const int value = category_value(r, f, text);
      if (value == kUnknownSpelling)
        return reject_cell(r, row, f, cell,
                           fmt::format("unknown {} '{}': expected {} (a column map's \"values\" "
                                       "can add this seller's spellings)",
                                       field_name(f), text, category_spellings(f)));
      store_category(l, f, i, static_cast<std::uint8_t>(value));
      given |= bit(f);
      return;
    }
    case CellKind::state: {
      const std::uint8_t index = state_of(*r.plan, text);
      if (index == 0)
        return reject_cell(r, row, f, cell, "unknown state code (two-letter USPS code expected)");
      l.state[i] = index;
      given |= bit(f);
      return;
    }
  }
}

// Remaining term from the maturity date when its own cell is empty; age from the first payment
// date, or else from the terms, when its cell is empty.
void derive_terms(Reading& r, RowContext& row) {
  LoanArrays& l = r.out.staging.loans;
  const std::size_t i = row.index;
  std::uint64_t& given = r.out.staging.given[i];
  if (!(given & bit(Field::remaining_term))) {
    if (row.remaining_from_maturity) {
      l.remaining_term[i] = *row.remaining_from_maturity;
      given |= bit(Field::remaining_term);
      r.out.staging.source[i] |= kRemainingFromMaturity;
    } else if (!(row.bad & (bit(Field::remaining_term) | bit(Field::maturity_date)))) {
      const Field f =
          r.columns->has(Field::remaining_term) ? Field::remaining_term : Field::maturity_date;
      reject_cell(r, row, f, row.record->fields[r.columns->at(f)], "required field missing");
    }
  }
  if (!(given & bit(Field::loan_age))) {
    if (row.age_from_first_payment) {
      l.age[i] = *row.age_from_first_payment;
      given |= bit(Field::loan_age);
      r.out.staging.source[i] |= kAgeFromFirstPayment;
    } else if (!(row.bad & (bit(Field::loan_age) | bit(Field::first_payment_date))) &&
               (given & bit(Field::original_term)) && (given & bit(Field::remaining_term))) {
      l.age[i] = l.original_term[i] - l.remaining_term[i];
      given |= bit(Field::loan_age);
      r.out.staging.source[i] |= kAgeFromTerms;
      if (r.age_column) ++r.out.ages_from_terms;
    }
  }
}

void check_duplicate_id(Reading& r, RowContext& row) {
  if (!(r.out.staging.given[row.index] & bit(Field::loan_id))) return;
  const std::optional<std::size_t> first =
      find_or_add_id(r.ids, r.out.staging.loans.loan_id, row.index, row.id_hash);
  if (first)
    reject_cell(r, row, Field::loan_id, row.record->fields[r.columns->at(Field::loan_id)],
                fmt::format("duplicate loan id, first at row {}", r.out.staging.loans.row[*first]));
}

// A whole-row reject: the row is not staged, and its first bytes stand for its value.
void reject_whole_row(Reading& r, const CsvRecord& record, std::string_view loan_id,
                      std::string reason) {
  r.out.problems.push_back({record.row, std::string(loan_id), std::nullopt, "",
                            std::string(utf8_prefix(record.raw, kValueShownBytes)),
                            std::move(reason), true});
  ++r.out.rows_not_staged;
}

void reject_ragged_row(Reading& r, const CsvRecord& record) {
  const std::size_t id_column = r.columns->at(Field::loan_id);
  const std::string_view id =
      id_column < record.fields.size() ? trim_spaces(record.fields[id_column]) : "";
  const std::size_t fields = record.fields.size();
  reject_whole_row(r, record, id,
                   fmt::format("row has {} field{}, header has {}", fields, fields == 1 ? "" : "s",
                               r.columns->header.size()));
}

// `cell` equals the lower-cased header cell `lowered`, ignoring case, surrounding spaces and a
// byte-order mark (a second file pasted on starts with its own).
bool same_as_header_cell(std::string_view cell, std::string_view lowered) {
  cell = trim_spaces(cell);
  if (cell.size() != lowered.size()) {
    if (cell.size() <= lowered.size() || cell.substr(0, kByteOrderMark.size()) != kByteOrderMark)
      return false;
    cell = trim_spaces(cell.substr(kByteOrderMark.size()));
    if (cell.size() != lowered.size()) return false;
  }
  for (std::size_t i = 0; i < cell.size(); ++i)
    if (ascii_lower_char(cell[i]) != lowered[i])
      return false;
  return true;
}

// A record of the header's width whose every cell is the header's (two tapes pasted together).
// The loan id cell is compared first: for a loan it differs, mostly in its length.
bool repeats_header(const Reading& r, const CsvRecord& record) {
  const std::size_t id_column = r.columns->at(Field::loan_id);
  if (!same_as_header_cell(record.fields[id_column], r.lowered_header[id_column])) return false;
  for (std::size_t c = 0; c < record.fields.size(); ++c)
    if (!same_as_header_cell(record.fields[c], r.lowered_header[c])) return false;
  return true;
}

// Staging vectors are grown (filled with missing values) ahead of use and cut to size after the
// pass over the text; rows are written in place.
void resize_staging(Staging& staging, std::size_t rows) {
  for_each_loan_vector(staging.loans,
                       [rows](auto& vector, const auto& missing) { vector.resize(rows, missing); });
  staging.offset.resize(rows, 0);
  staging.given.resize(rows, 0);
  staging.percent.resize(rows, 0);
  staging.source.resize(rows, 0);
  staging.rejected.resize(rows, 0);
}

// Offset of the first NUL byte in `text` at or after `from`, or npos.
std::size_t find_nul(std::string_view text, std::size_t from) {
  if (from >= text.size()) return std::string_view::npos;
  const void* at = std::memchr(text.data() + from, '\0', text.size() - from);
  return at ? static_cast<std::size_t>(static_cast<const char*>(at) - text.data())
            : std::string_view::npos;
}

// A NUL byte past the start of the file (where one makes the whole file binary): the record
// holding it is rejected whole, its value cut before the NUL.
bool reject_if_nul(Reading& r, const CsvRecord& record) {
  while (r.next_nul < record.offset) r.next_nul = find_nul(r.text, r.next_nul + 1);
  if (r.next_nul >= record.offset + record.raw.size()) return false;
  const std::size_t id_column = r.columns->at(Field::loan_id);
  std::string_view id =
      id_column < record.fields.size() ? trim_spaces(record.fields[id_column]) : "";
  if (id.find('\0') != std::string_view::npos) id = "";
  const std::string_view before_nul = record.raw.substr(0, r.next_nul - record.offset);
  r.out.problems.push_back({record.row, std::string(id), std::nullopt, "",
                            std::string(utf8_prefix(before_nul, kValueShownBytes)),
                            "contains a NUL byte", true});
  ++r.out.rows_not_staged;
  return true;
}

// Staging is full: grow it to the rows the whole text will hold at the rate rows have come so
// far (one step for an even tape), and by half at least. Bounded like estimated_rows: a staged
// row takes at least as many bytes as the header has fields.
std::size_t rows_to_stage(const Reading& r, const CsvRecord& record) {
  const double bytes_so_far = static_cast<double>(record.offset + record.raw.size()) + 1;
  const double rows_per_byte = static_cast<double>(r.staged) / bytes_so_far;
  const auto projected =
      static_cast<std::size_t>(rows_per_byte * static_cast<double>(r.text.size()) * 1.02);
  return std::max({std::size_t{1024}, r.staged + r.staged / 2, projected});
}

void read_row(Reading& r, const CsvRecord& record) {
  // Rows are numbered in 32 bits (LoanArrays::row). The tape's size limit is this row count,
  // reported as record_too_long: the kind for a file larger than poolbid reads.
  if (record.row > std::numeric_limits<std::uint32_t>::max())
    throw tape_error(ErrorKind::record_too_long, r.file, 0, "", "",
                     "more rows than poolbid reads (4,294,967,295)");
  ++r.out.rows_read;
  if (reject_if_nul(r, record)) return;
  if (record.fields.size() != r.columns->header.size()) return reject_ragged_row(r, record);
  if (repeats_header(r, record))
    return reject_whole_row(r, record, "", "repeats the header row (two tapes pasted together?)");
  if (r.staged == r.out.staging.offset.size()) {
    const std::size_t rows = rows_to_stage(r, record);
    resize_staging(r.out.staging, rows);
    size_id_table(r.ids, rows);
  }
  RowContext row{&record, r.staged++};
  r.out.staging.offset[row.index] = record.offset;
  r.out.staging.loans.row[row.index] = static_cast<std::uint32_t>(record.row);
  row.id = trim_spaces(record.fields[r.columns->at(Field::loan_id)]);
  row.id_hash = id_hash(row.id);
  // Written here, not in a helper: GCC drops a call to a function that only prefetches.
  if (!r.ids.slots.empty()) __builtin_prefetch(id_slot(r.ids, row.id_hash));
  for (const Step& step : r.plan->steps) {
    const std::string_view cell = record.fields[step.column];
    if (cell.empty() && !step.required) continue;  // the many empty optional cells: done
    if (step.number)
      read_number_cell(r, row, step, cell);
    else
      read_other_cell(r, row, step, cell);
  }
  derive_terms(r, row);
  check_duplicate_id(r, row);
}

// Rows to size staging for before reading: a row of n fields takes at least n bytes with its
// line end, and lines bound it too. Capped: a file of blank lines or ragged rows stages nothing,
// so above the cap staging grows (doubling) with the rows actually staged.
constexpr std::size_t kMaxRowsSizedUpFront = std::size_t{1} << 16;
std::size_t estimated_rows(std::string_view text, std::size_t header_fields) {
  const std::size_t by_size = text.size() / std::max<std::size_t>(header_fields, 1) + 1;
  if (by_size <= kMaxRowsSizedUpFront) return std::min(by_size, count_byte(text, '\n') + 1);
  return kMaxRowsSizedUpFront;
}

}  // namespace

RowsRead read_rows(CsvScanner& scanner, const Plan& plan, const ColumnIndex& columns) {
  RowsRead start;
  start.staging.loans.seller_names = {plan.default_seller};
  start.staging.loans.arm_index_names = {""};
  Reading r(std::move(start));
  r.text = scanner.text;
  r.file = scanner.file;
  r.plan = &plan;
  r.columns = &columns;
  r.next_nul = find_nul(r.text, scanner.pos);
  r.age_column = columns.has(Field::loan_age) || has_step(plan, Field::first_payment_date);
  for (const std::string& cell : columns.header) r.lowered_header.push_back(ascii_lower(cell));
  const std::size_t expected_rows = estimated_rows(scanner.text, columns.header.size());
  resize_staging(r.out.staging, expected_rows);
  size_id_table(r.ids, expected_rows);
  CsvRecord record;
  while (next_record(scanner, record)) read_row(r, record);
  resize_staging(r.out.staging, r.staged);
  return std::move(r.out);
}

}  // namespace poolbid::detail
