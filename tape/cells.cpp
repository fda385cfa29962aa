// Reading one tape cell: numbers as sellers write them, whole numbers, and month counts from dates.
#include <algorithm>
#include <charconv>
#include <chrono>
#include <cmath>
#include <cstdint>
#include <limits>

#include "tape/reader.h"

namespace poolbid::detail {
namespace {

bool is_digit(char ch) { return ch >= '0' && ch <= '9'; }

// A finite double from all of `text`, which must start with a digit or '.' (no second sign).
bool plain_number(std::string_view text, double& out) {
  if (text.empty() || !(is_digit(text.front()) || text.front() == '.')) return false;
  if (short_decimal(text, out)) return true;
  const char* end = text.data() + text.size();
  const auto [stop, ec] = std::from_chars(text.data(), end, out);
  return ec == std::errc{} && stop == end && std::isfinite(out);
}

// `text` with thousands separators removed into `buffer`, or false if they are not in groups of
// three counted from the decimal point (or exponent, or end): "1,234,567.5" yes, "6,5" no.
bool drop_thousands_separators(std::string_view text, char* buffer, std::size_t capacity,
                               std::size_t& size) {
  std::size_t integer_end = text.find_first_of(".eE");
  if (integer_end == std::string_view::npos) integer_end = text.size();
  std::size_t digits_since_separator = 0;
  bool seen_separator = false;
  size = 0;
  for (std::size_t i = 0; i < text.size(); ++i) {
    const char ch = text[i];
    if (ch == ',') {
      if (i >= integer_end || i == 0) return false;
      if (seen_separator && digits_since_separator != 3) return false;
      if (!seen_separator && digits_since_separator > 3) return false;
      seen_separator = true;
      digits_since_separator = 0;
      continue;
    }
    if (i < integer_end) ++digits_since_separator;
    if (size == capacity) return false;
    buffer[size++] = ch;
  }
  return !seen_separator || digits_since_separator == 3;
}

std::chrono::year_month month_of(Date date) { return {date.year(), date.month()}; }

}  // namespace

std::optional<Number> parse_number(std::string_view text) {
  double value = 0;
  if (plain_number(text, value)) return Number{value, false};
  // The general form: [sign][$][sign] digits[,ddd...][.digits][e[sign]digits][%]
  bool percent = false;
  if (!text.empty() && text.back() == '%') {
    percent = true;
    text = trim_spaces(text.substr(0, text.size() - 1));
  }
  bool negative = false, signed_ = false, dollar = false;
  for (;;) {
    if (text.empty()) return std::nullopt;
    if (!signed_ && (text.front() == '-' || text.front() == '+')) {
      negative = text.front() == '-';
      signed_ = true;
    } else if (!dollar && text.front() == '$') {
      dollar = true;
    } else {
      break;
    }
    text.remove_prefix(1);
  }
  char buffer[64];
  std::size_t size = 0;
  if (!drop_thousands_separators(text, buffer, sizeof buffer, size)) return std::nullopt;
  if (!plain_number(std::string_view(buffer, size), value)) return std::nullopt;
  double result = negative ? -value : value;
  if (percent) result /= 100;
  return Number{result, percent};
}

std::optional<Date> parse_cell_date(std::string_view text) {
  const bool iso = text.size() == 10 && text[4] == '-' && text[7] == '-' &&
                   std::all_of(text.begin(), text.begin() + 4, is_digit) && is_digit(text[5]) &&
                   is_digit(text[6]) && is_digit(text[8]) && is_digit(text[9]);
  if (!iso) return parse_date(text);
  auto number = [&](std::size_t at, std::size_t n) {
    unsigned value = 0;
    for (std::size_t i = at; i < at + n; ++i)
      value = value * 10 + static_cast<unsigned>(text[i] - '0');
    return value;
  };
  const unsigned year = number(0, 4), month = number(5, 2), day = number(8, 2);
  if (!plausible_date(year, month, day)) return std::nullopt;
  const Date date{std::chrono::year{static_cast<int>(year)}, std::chrono::month{month},
                  std::chrono::day{day}};
  if (!date.ok()) return std::nullopt;
  return date;
}

int whole_months_between(Date from, Date to) {
  int months = static_cast<int>((month_of(to) - month_of(from)).count());
  if (months > 0 && to.day() < from.day()) --months;
  if (months < 0 && to.day() > from.day()) ++months;
  return months;
}

int months_to_maturity(Date cutoff, Date maturity) {
  return static_cast<int>((month_of(maturity) - month_of(cutoff)).count()) + 1;
}

std::int32_t days_since_epoch(Date date) {
  return static_cast<std::int32_t>(std::chrono::sys_days(date).time_since_epoch().count());
}

}  // namespace poolbid::detail
