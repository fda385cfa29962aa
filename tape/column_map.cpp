// Column map files: a seller's header names, units, category spellings, defaults and cut-off,
// read from JSON into a ColumnMap. Every mistake is a TapeError bad_map naming the file and key.
#include <fmt/core.h>

#include <cctype>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <nlohmann/json.hpp>

#include "tape/fields.h"
#include "tape/reader.h"

namespace poolbid {
namespace {

using nlohmann::json;

[[noreturn]] void bad_map(std::string_view source, std::string_view key, std::string_view value,
                          std::string_view message) {
  const std::string where =
      key.empty() ? std::string(source) : fmt::format("{}, key {}", source, key);
  throw TapeError(ErrorKind::bad_map, std::string(source), 0, std::string(key), std::string(value),
                  fmt::format("{}: {}", where, message));
}

std::string shown(const json& value) {
  return value.is_string() ? value.get<std::string>() : value.dump();
}

// A JSON value as written, for "got ..." in a message: strings keep their quotes; long values
// are cut.
std::string got(const json& value) {
  const std::string text = value.dump();
  const std::string_view shown = detail::utf8_prefix(text, detail::kValueShownBytes);
  return shown.size() < text.size() ? std::string(shown) + "..." : text;
}

const json& object_at(const json& parent, const std::string& key, std::string_view source) {
  const json& value = parent.at(key);
  if (!value.is_object())
    bad_map(source, key, shown(value), fmt::format("must be a JSON object, got {}", got(value)));
  return value;
}

std::string string_at(const json& value, std::string_view key, std::string_view source) {
  if (!value.is_string())
    bad_map(source, key, shown(value), fmt::format("must be a string, got {}", got(value)));
  std::string text = value.get<std::string>();
  if (std::string(detail::trim_spaces(text)).empty())
    bad_map(source, key, text, "must not be empty");
  return text;
}

Field field_at(const std::string& name, std::string_view key, std::string_view source) {
  const std::optional<Field> f = field_from_name(name);
  if (!f) bad_map(source, key, name, fmt::format("unknown field name '{}'", name));
  return *f;
}

void read_columns(const json& columns, ColumnMap& map) {
  // Lower-cased header name -> the field that claimed it, so one header is not given to two.
  std::map<std::string, Field> owner;
  for (const auto& [name, value] : columns.items()) {
    const std::string key = "columns." + name;
    const Field f = field_at(name, key, map.source);
    std::vector<std::string> headers;
    if (value.is_array()) {
      if (value.empty()) bad_map(map.source, key, "[]", "lists no header names");
      for (const json& item : value) headers.push_back(string_at(item, key, map.source));
    } else {
      headers.push_back(string_at(value, key, map.source));
    }
    for (const std::string& header : headers) {
      const std::string folded = detail::ascii_lower(detail::trim_spaces(header));
      const auto [it, fresh] = owner.emplace(folded, f);
      if (!fresh && it->second != f)
        bad_map(map.source, key, header,
                fmt::format("header '{}' is also listed for {}", header, field_name(it->second)));
    }
    map.columns[f] = std::move(headers);
  }
}

void read_units(const json& units, ColumnMap& map) {
  for (const auto& [name, value] : units.items()) {
    const std::string key = "units." + name;
    const Field f = field_at(name, key, map.source);
    if (!detail::is_rate_field(f))
      bad_map(map.source, key, name,
              fmt::format("units apply only to rate and ratio fields, not {}", name));
    const std::string unit = shown(value);
    if (unit == "percent")
      map.units[f] = Unit::percent;
    else if (unit == "decimal")
      map.units[f] = Unit::decimal;
    else
      bad_map(map.source, key, unit, fmt::format("unknown unit '{}' (percent or decimal)", unit));
  }
}

void read_values(const json& values, ColumnMap& map) {
  for (const auto& [name, spellings] : values.items()) {
    const std::string key = "values." + name;
    const Field f = field_at(name, key, map.source);
    if (!detail::is_category(f))
      bad_map(map.source, key, name,
              fmt::format("values apply only to category fields, not {}", name));
    if (!spellings.is_object())
      bad_map(map.source, key, shown(spellings),
              fmt::format("must be a JSON object, got {}", got(spellings)));
    auto& table = map.values[f];
    std::map<std::string, std::uint8_t> folded_targets;  // spellings are compared folded
    for (const auto& [seller_spelling, ours] : spellings.items()) {
      const std::string item_key = key + "." + seller_spelling;
      const std::string target = string_at(ours, item_key, map.source);
      const std::optional<std::uint8_t> value = detail::parse_category(f, target);
      if (!value)
        bad_map(map.source, item_key, target,
                fmt::format("'{}' is not a {} we know: use one of {}", target, field_name(f),
                            detail::category_spellings(f)));
      const auto [it, fresh] =
          folded_targets.emplace(detail::fold_spelling(seller_spelling), *value);
      if (!fresh && it->second != *value)
        bad_map(map.source, item_key, target,
                "another spelling that differs only in case, spaces or punctuation maps elsewhere");
      table[seller_spelling] = target;
    }
  }
}

void read_defaults(const json& defaults, ColumnMap& map) {
  for (const auto& [name, value] : defaults.items()) {
    const std::string key = "defaults." + name;
    if (name != "servicing_fee")
      bad_map(map.source, key, name,
              fmt::format("no default for {}: the only default is servicing_fee (percent per "
                          "year)",
                          name));
    if (!value.is_number())
      bad_map(map.source, key, shown(value), fmt::format("must be a number, got {}", got(value)));
    if (!(value.get<double>() >= 0 && value.get<double>() < 25))
      bad_map(map.source, key, shown(value),
              fmt::format("must be percent per year from 0 to below 25 (0.25 = 0.25%), got {}",
                          got(value)));
    map.default_servicing_fee = value.get<double>() / 100;
  }
}

}  // namespace

ColumnMap parse_column_map(std::string_view json_text, std::string_view source_name) {
  ColumnMap map;
  map.source = std::string(source_name);
  json doc;
  try {
    doc = json::parse(json_text.begin(), json_text.end());
  } catch (const json::parse_error& e) {
    // nlohmann's text after its "[json.exception.parse_error.101] " id: line, column, reason.
    std::string what = e.what();
    const std::size_t id_end = what.find("] ");
    if (id_end != std::string::npos) what.erase(0, id_end + 2);
    throw TapeError(ErrorKind::bad_map, map.source, 0, "", "",
                    fmt::format("{}: not valid JSON (byte {}): {}", map.source, e.byte, what));
  }
  if (!doc.is_object())
    bad_map(map.source, "", "", fmt::format("must be a JSON object {{...}}, got {}", got(doc)));
  for (const auto& [key, value] : doc.items()) {
    if (key == "seller") {
      map.seller = string_at(value, key, map.source);
    } else if (key == "cutoff_date") {
      const std::string text = string_at(value, key, map.source);
      map.cutoff = parse_date(text);
      if (!map.cutoff)
        bad_map(map.source, key, text,
                fmt::format("'{}' is not a date (YYYY-MM-DD or M/D/YYYY)", text));
      if (map.cutoff->day() != std::chrono::day{1})
        bad_map(map.source, key, text,
                fmt::format("'{}' is not the first day of a month (balances are as of a "
                            "month's start)", text));
    } else if (key == "columns") {
      read_columns(object_at(doc, key, map.source), map);
    } else if (key == "units") {
      read_units(object_at(doc, key, map.source), map);
    } else if (key == "values") {
      read_values(object_at(doc, key, map.source), map);
    } else if (key == "defaults") {
      read_defaults(object_at(doc, key, map.source), map);
    } else {
      bad_map(map.source, key, "",
              fmt::format("unknown key '{}': use seller, cutoff_date, columns, units, values, "
                          "defaults",
                          key));
    }
  }
  return map;
}

ColumnMap load_column_map(const std::string& path) {
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec))
    throw TapeError(ErrorKind::bad_map, path, 0, "", "",
                    fmt::format("{}: is a directory, not a column map", path));
  std::ifstream in(path, std::ios::binary);
  if (!in)
    throw TapeError(ErrorKind::bad_map, path, 0, "", "", fmt::format("{}: cannot open", path));
  const std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  if (in.bad())
    throw TapeError(ErrorKind::bad_map, path, 0, "", "", fmt::format("{}: cannot read", path));
  return parse_column_map(text, path);
}

}  // namespace poolbid
