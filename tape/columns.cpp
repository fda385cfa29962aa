// Header resolution: which header cell holds each canonical field, through the column map if any.
#include <fmt/core.h>

#include <algorithm>
#include <cctype>

#include "tape/reader.h"

namespace poolbid::detail {
namespace {

// Positions of the unclaimed header cells equal to `name` (case-insensitive, trimmed).
std::vector<std::size_t> matching_cells(const std::vector<std::string>& lowered,
                                        const std::vector<bool>& claimed, std::string_view name) {
  const std::string wanted = ascii_lower(trim_spaces(name));
  std::vector<std::size_t> found;
  for (std::size_t i = 0; i < lowered.size(); ++i)
    if (!claimed[i] && lowered[i] == wanted) found.push_back(i);
  return found;
}

// Claims the one cell in `found` for f; two or more give f twice.
void claim(ColumnIndex& index, std::vector<bool>& claimed, Field f,
           const std::vector<std::size_t>& found, std::string_view file) {
  if (found.size() > 1) {
    const std::string& second = index.header[found[1]];
    throw tape_error(ErrorKind::duplicate_column, file, index.header_row, second, "",
                     fmt::format("columns {} ({}) and {} ({}) both give {}", found[0] + 1,
                                 index.header[found[0]], found[1] + 1, second, field_name(f)));
  }
  index.position[static_cast<std::size_t>(f)] = found[0];
  claimed[found[0]] = true;
}

}  // namespace

ColumnIndex resolve_columns(const std::vector<std::string_view>& header_cells, const ColumnMap* map,
                            std::string_view file, std::size_t header_row) {
  ColumnIndex index;
  index.position.fill(kNoColumn);
  index.header_row = header_row;
  std::vector<std::string> lowered;
  for (std::string_view cell : header_cells) {
    index.header.emplace_back(trim_spaces(cell));
    lowered.push_back(ascii_lower(index.header.back()));
  }
  std::vector<bool> claimed(header_cells.size(), false);

  // A map's names first: the first listed name present in the header wins.
  if (map) {
    for (const auto& [f, names] : map->columns) {
      for (const std::string& name : names) {
        const std::vector<std::size_t> found = matching_cells(lowered, claimed, name);
        if (found.empty()) continue;
        claim(index, claimed, f, found, file);
        break;
      }
    }
  }
  // Canonical names, for every field a map does not list.
  for (std::size_t i = 0; i < kFieldCount; ++i) {
    const Field f = static_cast<Field>(i);
    if (map && map->columns.count(f)) continue;
    const std::vector<std::size_t> found = matching_cells(lowered, claimed, field_name(f));
    if (!found.empty()) claim(index, claimed, f, found, file);
  }
  for (std::size_t i = 0; i < claimed.size(); ++i)
    if (!claimed[i]) index.ignored.push_back(index.header[i]);
  return index;
}

std::vector<std::string> names_looked_for(Field f, const ColumnMap* map) {
  if (map) {
    const auto listed = map->columns.find(f);
    if (listed != map->columns.end()) return listed->second;
  }
  return {std::string(field_name(f))};
}

}  // namespace poolbid::detail
