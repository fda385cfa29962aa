// Test support for report/: the small tape with rejected and warned rows that the cash-flow and
// price report tests both read, and searches in a report's text. Header-only.
#pragma once

#include <chrono>
#include <optional>
#include <string>

#include "tape/tape.h"
#include "tests/support/csv_text.h"
#include "tests/support/loans.h"

namespace poolbid::testing_support {

inline constexpr Date kCutoff{std::chrono::year{2026}, std::chrono::month{12}, std::chrono::day{1}};

// pool.csv, cut off on kCutoff: two loans accepted (L001 $600,000 at 6.5%, L004 $400,000 at 6%),
// two rows rejected (row 3 for two reasons, row 4 for its cell count; UPB $250,000), one accepted
// row warned.
inline TapeRead two_loan_tape() {
  TapeRead t;
  t.file = "pool.csv";
  t.cutoff = kCutoff;
  t.loans = make_loans({{.id = "L001", .upb = 600'000, .rate = 0.065},
                        {.id = "L004", .upb = 400'000, .rate = 0.06}});
  t.problems = {
      {2, "L001", Field::dti, "DTI", "", "DTI not given", false},
      {3, "L002", Field::note_rate, "NOTE_RT", "31", "note rate 31% outside 0-25%", true},
      {3, "L002", Field::state, "ST", "ZZ", "not a US state code", true},
      {4, "", std::nullopt, "", "a,b", "row has 2 cells, header has 33", true},
  };
  t.rows_read = 4;
  t.rows_rejected = 2;
  t.rows_with_warnings = 1;
  t.upb_accepted = 1'000'000;
  t.upb_rejected = 250'000;
  return t;
}

inline bool contains(const std::string& text, const std::string& part) {
  return text.find(part) != std::string::npos;
}

// The first line of `text` that starts with `start` (a table line starts with its indent), without
// its line break; "" if none.
inline std::string line_starting(const std::string& text, const std::string& start) {
  for (const std::string& line : lines_of(text))
    if (line.rfind(start, 0) == 0) return line;
  return "";
}

}  // namespace poolbid::testing_support
