// TapeError text: where the problem is (file, row, column, value), then what it is.
#include <fmt/core.h>

#include "tape/reader.h"

namespace poolbid::detail {
TapeError tape_error(ErrorKind kind, std::string_view file, std::size_t row,
                     std::string_view column, std::string_view value, std::string_view message) {
  std::string where(file);
  if (row != 0) where += fmt::format(" row {}", row);
  if (!column.empty()) where += fmt::format("{} column {}", row != 0 ? "," : "", column);
  if (!value.empty()) {
    const std::string_view shown = utf8_prefix(value, kValueShownBytes);  // the field keeps all
    where += fmt::format(", value '{}{}'", shown, shown.size() < value.size() ? "..." : "");
  }
  return TapeError(kind, std::string(file), row, std::string(column), std::string(value),
                   fmt::format("{}: {}", where, message));
}

}  // namespace poolbid::detail
