// Reading a tape: file -> CSV records -> staged rows -> units applied -> row rules -> LoanArrays.
// One pass over the text reads every cell into staging arrays (a rate column's unit may depend on
// the whole column); the later passes run over those arrays. Rejected rows are dropped last.
#include <fcntl.h>
#include <fmt/core.h>
#include <sys/mman.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <memory>
#include <system_error>

#include "tape/csv.h"
#include "tape/fields.h"
#include "tape/reader.h"

namespace poolbid {
namespace {

using namespace detail;

constexpr std::size_t kBinaryProbeBytes = 64 * 1024;  // NUL bytes here: not a text file
// A pipe or device read past this is not a tape (the largest tapes are a few GiB).
constexpr std::size_t kMaxStreamBytes = std::size_t{64} << 30;

// Options that cannot be used. Messages name the command-line option where there is one; the
// error's column stays empty: the fault is not in a column of the tape.
void check_options(const ReadOptions& options, std::string_view file) {
  auto bad = [&](const std::string& message) {
    throw tape_error(ErrorKind::bad_option, file, 0, "", "", message);
  };
  if (options.max_record_bytes == 0) bad("max_record_bytes must be above 0");
  if (!(options.term_tolerance_months >= 0)) bad("term_tolerance_months must be 0 or more");
  if (options.cutoff && !options.cutoff->ok()) bad("the cut-off date (--cutoff) is not a date");
  if (options.cutoff && options.cutoff->day() != std::chrono::day{1})  // DESIGN.md section 5
    bad(fmt::format("the cut-off date (--cutoff) {:04d}-{:02d}-{:02d} must be the first day of a "
                    "month",
                    static_cast<int>(options.cutoff->year()),
                    static_cast<unsigned>(options.cutoff->month()),
                    static_cast<unsigned>(options.cutoff->day())));
  if (options.default_servicing_fee &&
      !(*options.default_servicing_fee >= 0 && *options.default_servicing_fee < 0.25))
    bad(fmt::format("the default servicing fee (--servicing-fee) {} must be from 0% to below 25%",
                    percent_text(*options.default_servicing_fee)));
}

// The header's one cell, if the file looks delimited by something other than commas.
void reject_other_delimiter(const CsvRecord& header, std::string_view file) {
  if (header.fields.size() != 1) return;
  struct Candidate {
    char ch;
    std::string_view shown;  // in the message
    std::string_view name;
  };
  const Candidate candidates[] = {
      {';', "';'", "semicolon"}, {'\t', "tab", "tab"}, {'|', "'|'", "pipe"}};
  const Candidate* best = nullptr;
  std::ptrdiff_t best_count = 0;
  for (const Candidate& c : candidates) {
    const std::ptrdiff_t n = std::count(header.raw.begin(), header.raw.end(), c.ch);
    if (n > best_count) best = &c, best_count = n;
  }
  if (best)
    throw tape_error(ErrorKind::wrong_delimiter, file, 0, "", "",
                     fmt::format("the header is a single column with {} {} characters in it: "
                                 "the file looks {}-delimited; tapes must be comma-separated",
                                 best_count, best->shown, best->name));
}

// Lines ending in a lone CR (an old Mac export) make the whole file one line: say so, when the
// bytes [from, to) of the text hold a CR with no LF after it.
void reject_cr_line_ends(std::string_view text, std::size_t from, std::size_t to,
                         std::string_view file) {
  for (std::size_t cr = text.find('\r', from); cr < to; cr = text.find('\r', cr + 1))
    if (cr + 1 == text.size() || text[cr + 1] != '\n')
      throw tape_error(ErrorKind::wrong_delimiter, file, 0, "", "",
                       "lines end in a lone CR (old Mac line ends), so the file reads as one "
                       "line: save it with LF or CRLF line ends");
}

// The header record, or false if the text has none. A lone-CR file larger than the row limit is
// one record too long to read; it is told from a runaway row by its first line end, a CR with
// no LF before or after it (looked for only on this error, so the search may cover the file).
bool read_header(CsvScanner& scanner, CsvRecord& header, std::string_view file) {
  const std::size_t start = scanner.pos;
  try {
    if (!next_record(scanner, header)) return false;
  } catch (const TapeError& e) {
    if (e.kind == ErrorKind::record_too_long) {
      const std::string_view text = scanner.text;
      const std::size_t cr = text.find('\r', start);
      if (cr != std::string_view::npos && text.find('\n', start) > cr)
        reject_cr_line_ends(text, cr, cr + 1, file);
    }
    throw;
  }
  return true;
}

// 2000 -> "2,000".
std::string grouped(std::size_t n) {
  std::string digits = std::to_string(n), out;
  for (std::size_t i = 0; i < digits.size(); ++i) {
    if (i > 0 && (digits.size() - i) % 3 == 0) out += ',';
    out += digits[i];
  }
  return out;
}

// Rate columns: the declared unit, else the unit most of the column's cells look like (the
// UnitVotes of its cells written without '%'; a tie reads as percent). Values become decimals,
// detected units go in one note saying how many cells disagreed, and each cell that disagrees
// with its column's unit, detected or declared, is marked in Staging::off_unit for the row rules
// to report on that cell.
// DESIGN.md section 2 says unanimity; majority chosen so one stray cell cannot flip a column.
void apply_units(RowsRead& rows, const Plan& plan, std::vector<std::string>& notes) {
  Staging& s = rows.staging;
  std::string detected;
  for (const Step& step : plan.steps) {
    if (step.kind != CellKind::rate) continue;
    const std::size_t k = static_cast<std::size_t>(step.field);
    const UnitVotes& votes = rows.votes[k];
    if (!votes.any_plain()) continue;  // every value had '%', or none was given
    const bool declared = plan.unit[k] != Unit::detect;
    const Unit unit = declared                         ? plan.unit[k]
                      : votes.decimal > votes.percent ? Unit::decimal
                                                       : Unit::percent;
    s.unit[k] = unit;
    const bool decimal = unit == Unit::decimal;
    const std::size_t disagreeing = decimal ? votes.percent : votes.decimal;
    if (!declared) {
      detected += fmt::format("{}{} {}", detected.empty() ? "" : ", ", field_name(step.field),
                              decimal ? "decimal" : "percent");
      if (disagreeing > 0)
        detected += fmt::format(" ({} of {} cells look{} like {})", grouped(disagreeing),
                                grouped(votes.decimal + votes.percent),
                                disagreeing == 1 ? "s" : "", decimal ? "percent" : "decimal");
    }
    std::vector<double>& values = s.loans.*step.doubles;
    const std::uint64_t b = bit(step.field);
    if (disagreeing == 0) {  // the usual case: convert a percent column, nothing to mark
      if (!decimal)
        for (std::size_t i = 0; i < values.size(); ++i)
          if ((s.given[i] & b) && !(s.percent[i] & b)) values[i] /= 100;
      continue;
    }
    const double ceiling = step.decimal_ceiling;
    if (s.off_unit.empty()) s.off_unit.assign(values.size(), 0);
    for (std::size_t i = 0; i < values.size(); ++i) {
      if (!(s.given[i] & b) || (s.percent[i] & b)) continue;
      const double value = values[i];
      if (decimal ? value > ceiling : value > 0 && value <= ceiling) s.off_unit[i] |= b;
      if (!decimal) values[i] = value / 100;
    }
  }
  if (!detected.empty())
    notes.push_back("units detected (declare them in the column map to silence this): " + detected);
}

// The pool default servicing fee for rows without one. Returns how many rows had an empty fee
// cell (when the tape has the column).
std::size_t fill_default_fee(Staging& s, const Plan& plan, const ColumnIndex& columns) {
  if (!plan.default_fee) return 0;
  const bool column = columns.has(Field::servicing_fee);
  std::size_t filled = 0;
  for (std::size_t i = 0; i < s.given.size(); ++i) {
    if (s.given[i] & bit(Field::servicing_fee)) continue;
    if (column && s.rejected[i]) continue;  // the cell may be bad rather than empty
    s.loans.servicing_fee[i] = *plan.default_fee;
    s.given[i] |= bit(Field::servicing_fee);
    s.source[i] |= kServicingFeeDefault;
    if (column) ++filled;
  }
  return filled;
}

template <typename T>
void keep_accepted(std::vector<T>& values, const std::vector<std::uint8_t>& rejected) {
  std::size_t kept = 0;
  for (std::size_t i = 0; i < values.size(); ++i) {
    if (rejected[i]) continue;
    if (kept != i) values[kept] = std::move(values[i]);
    ++kept;
  }
  values.resize(kept);
}

// Renumbers `indexes` into `names` in first-seen order, dropping names no index uses.
// `fixed` leading names (the empty ARM index name) keep their place.
template <typename Index>
void renumber_names(std::vector<Index>& indexes, std::vector<std::string>& names,
                    std::size_t fixed) {
  std::vector<std::size_t> new_index(names.size(), kNoColumn);
  std::vector<std::string> kept(names.begin(), names.begin() + fixed);
  for (std::size_t i = 0; i < fixed; ++i) new_index[i] = i;
  for (Index& index : indexes) {
    if (new_index[index] == kNoColumn) {
      new_index[index] = kept.size();
      kept.push_back(std::move(names[index]));
    }
    index = static_cast<Index>(new_index[index]);
  }
  names = std::move(kept);
}

// Counts and sums, then the accepted rows into `out.loans`. A balance above kMaxLoanBalance is
// not a loan's, so it is not added to the UPB rejected.
void finish(RowsRead& rows, TapeRead& out) {
  Staging& s = rows.staging;
  for (std::size_t i = 0; i < s.rejected.size(); ++i)
    if (s.rejected[i] && (s.given[i] & bit(Field::current_balance)) &&
        s.loans.current_balance[i] > 0 && s.loans.current_balance[i] <= kMaxLoanBalance)
      out.upb_rejected += s.loans.current_balance[i];
  out.rows_read = rows.rows_read;
  out.rows_rejected = rows.rows_not_staged +
                      static_cast<std::size_t>(std::count(s.rejected.begin(), s.rejected.end(), 1));
  if (out.rows_rejected > rows.rows_not_staged)
    for_each_loan_vector(s.loans,
                         [&](auto& vector, const auto&) { keep_accepted(vector, s.rejected); });
  renumber_names(s.loans.seller, s.loans.seller_names, 0);
  renumber_names(s.loans.arm_index, s.loans.arm_index_names, 1);
  out.loans = std::move(s.loans);
  for (double balance : out.loans.current_balance) out.upb_accepted += balance;
}

// A tape file's bytes: mapped read-only when it is a regular file (no copy; pages read ahead),
// read into memory otherwise (a pipe, or where mapping fails). A mapped file must not be cut
// short by another program while it is read: the system would stop this one (SIGBUS).
struct FileBytes {
  const char* data = nullptr;
  std::size_t size = 0;
  void* mapped = nullptr;         // munmap'ed on destruction
  std::unique_ptr<char[]> owned;  // or read into this

  FileBytes() = default;
  FileBytes(const FileBytes&) = delete;
  FileBytes& operator=(const FileBytes&) = delete;
  ~FileBytes() {
    if (mapped) ::munmap(mapped, size);
  }
  std::string_view text() const { return {data, size}; }
};

[[noreturn]] void throw_cannot_open(const std::string& path, std::string_view what, int error) {
  throw tape_error(ErrorKind::cannot_open, path, 0, "", "",
                   fmt::format("{}: {}", what, std::generic_category().message(error)));
}

[[noreturn]] void throw_binary(const std::string& path) {
  throw tape_error(ErrorKind::binary, path, 0, "", "",
                   "not a text file (NUL bytes near the start: a spreadsheet or UTF-16 file?)");
}

// Reads what is left of `fd` into `bytes`, growing the buffer as needed. A stream that is not a
// tape (a device such as /dev/zero) is stopped early: NUL bytes in its first kBinaryProbeBytes
// are checked as they arrive, and no more than kMaxStreamBytes are read.
void read_to_end(int fd, const std::string& path, std::size_t expected, FileBytes& bytes) {
  std::size_t capacity = std::max<std::size_t>(expected + 1, std::size_t{1} << 16);
  bytes.owned = std::make_unique_for_overwrite<char[]>(capacity);
  for (;;) {
    if (bytes.size >= kMaxStreamBytes)
      throw tape_error(ErrorKind::record_too_long, path, 0, "", "",
                       "more than 64 GiB read without an end: not a tape poolbid can read");
    if (bytes.size == capacity) {
      auto larger = std::make_unique_for_overwrite<char[]>(capacity * 2);
      std::memcpy(larger.get(), bytes.owned.get(), bytes.size);
      bytes.owned = std::move(larger);
      capacity *= 2;
    }
    const ::ssize_t n = ::read(fd, bytes.owned.get() + bytes.size, capacity - bytes.size);
    if (n < 0 && errno == EINTR) continue;
    if (n < 0) throw_cannot_open(path, "cannot read", errno);
    if (n == 0) break;
    const std::size_t before = bytes.size;
    bytes.size += static_cast<std::size_t>(n);
    if (before < kBinaryProbeBytes &&
        std::memchr(bytes.owned.get() + before, '\0',
                    std::min(bytes.size, kBinaryProbeBytes) - before))
      throw_binary(path);
  }
  bytes.data = bytes.owned.get();
}

void read_whole_file(const std::string& path, FileBytes& bytes) {
  const int fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
  if (fd < 0) throw_cannot_open(path, "cannot open", errno);
  struct Closer {
    int fd;
    ~Closer() { ::close(fd); }
  } closer{fd};
  struct ::stat info {};
  if (::fstat(fd, &info) != 0) throw_cannot_open(path, "cannot read", errno);
  if (S_ISDIR(info.st_mode))
    throw tape_error(ErrorKind::cannot_open, path, 0, "", "", "is a directory, not a tape");
  const auto size = static_cast<std::size_t>(info.st_size);
  if (S_ISREG(info.st_mode) && size > 0) {
    void* mapped = ::mmap(nullptr, size, PROT_READ, MAP_PRIVATE | MAP_POPULATE, fd, 0);
    if (mapped != MAP_FAILED) {
      bytes.mapped = mapped;
      bytes.data = static_cast<const char*>(mapped);
      bytes.size = size;
      return;
    }
  }
  read_to_end(fd, path, size, bytes);
}

}  // namespace

TapeRead read_tape_text(std::string_view text, std::string_view name, const ReadOptions& options) {
  const std::string file(name);
  check_options(options, file);
  if (text.empty()) throw tape_error(ErrorKind::empty, file, 0, "", "", "the file is empty");
  if (std::memchr(text.data(), '\0', std::min(text.size(), kBinaryProbeBytes)))
    throw_binary(file);
  CsvScanner scanner = start_csv(text, file, options.max_record_bytes);
  CsvRecord header;
  if (!read_header(scanner, header, file))
    throw tape_error(ErrorKind::empty, file, 0, "", "", "the file has no header and no rows");
  if (std::memchr(header.raw.data(), '\0', header.raw.size()))
    throw tape_error(ErrorKind::binary, file, header.row, "", "",
                     "not a text file (NUL bytes in the header)");
  reject_cr_line_ends(text, header.offset, header.offset + header.raw.size(), file);
  reject_other_delimiter(header, file);
  const ColumnMap* map = options.map ? &*options.map : nullptr;
  const ColumnIndex columns = resolve_columns(header.fields, map, file, header.row);
  const Plan plan = make_plan(columns, options, file);

  RowsRead rows = read_rows(scanner, plan, columns);
  if (rows.rows_read == 0)
    throw tape_error(ErrorKind::no_data_rows, file, 0, "", "", "no data rows after the header");
  TapeRead out;
  out.file = file;
  out.cutoff = plan.cutoff;
  out.notes = plan.notes;
  out.blank_lines = scanner.blank_lines;
  apply_units(rows, plan, out.notes);
  const std::size_t fees_defaulted = fill_default_fee(rows.staging, plan, columns);
  if (rows.ages_from_terms > 0)
    out.notes.push_back(
        fmt::format("loan age empty on {} rows: taken as original term - remaining term",
                    rows.ages_from_terms));
  if (fees_defaulted > 0)
    out.notes.push_back(fmt::format("servicing fee empty on {} rows: pool default {} used",
                                    fees_defaulted, percent_text(*plan.default_fee)));

  CellReader cells{text, file, options.max_record_bytes, &columns, &rows.staging};
  const std::size_t first_rule_problem = rows.problems.size();
  out.rows_with_warnings =
      check_rows(rows.staging, cells, RuleOptions{options.term_tolerance_months}, rows.problems);
  std::inplace_merge(rows.problems.begin(), rows.problems.begin() + first_rule_problem,
                     rows.problems.end(),
                     [](const RowProblem& a, const RowProblem& b) { return a.row < b.row; });
  out.problems = std::move(rows.problems);
  finish(rows, out);
  return out;
}

TapeRead read_tape(const std::string& path, const ReadOptions& options) {
  FileBytes bytes;
  read_whole_file(path, bytes);
  return read_tape_text(bytes.text(), path, options);
}

}  // namespace poolbid
