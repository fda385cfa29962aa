// Report: turns a checked tape and its strats into text for a terminal or JSON for a program.
// Functions return the whole document as a string, so a caller writes all of it or nothing.
#pragma once

#include <string>
#include <string_view>

namespace poolbid {

struct TapeRead;
struct Strats;

// `poolbid check`: rows read / accepted / rejected / with warnings, UPB accepted and rejected,
// file-level notes, then every problem (row, loan id, column, value, reason).
std::string check_text(const TapeRead& tape);
std::string check_json(const TapeRead& tape);

// `poolbid strats`: pool summary, weighted averages with missing counts, one table per
// stratification; a short account of rejected rows (the full list is `check`'s).
std::string strats_text(const TapeRead& tape, const Strats& strats);
std::string strats_json(const TapeRead& tape, const Strats& strats);

// The caution every report carries.
std::string_view caution_text();

}  // namespace poolbid
