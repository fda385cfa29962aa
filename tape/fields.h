// Private to tape/: canonical field facts and the built-in spellings of categories.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

#include "tape/tape.h"

namespace poolbid::detail {

// Lower case with spaces, '_', '-', '/' and '.' removed: "Cash-Out Refi" -> "cashoutrefi".
std::string fold_spelling(std::string_view text);

// True for the category fields (occupancy, purpose, documentation, property type,
// amortization type, delinquency).
bool is_category(Field f);

// Built-in spellings of a category field, as the enum's underlying value; nullopt if the
// spelling is not one we know (the caller rejects the row and names the value).
std::optional<std::uint8_t> parse_category(Field f, std::string_view text);

// Our own canonical spellings for a category field, for messages: "owner, second_home, investor".
std::string_view category_spellings(Field f);

// Rate and ratio fields: written in percent or decimal on a tape.
bool is_rate_field(Field f);

// A value of field f written without '%' looks like a decimal at or below this, like percent
// above it. A column whose unit is not declared is read as most of its cells look (read_tape.cpp,
// apply_units), and a cell that looks otherwise than its column is reported. 1.0 for note rates,
// LTV and DTI (DESIGN.md section 2); smaller for fields whose percent values are themselves small
// (a 0.25% servicing fee, a 2% periodic cap).
double decimal_detection_ceiling(Field f);

}  // namespace poolbid::detail
