// Private to curves/: the one place a Date (std::chrono) becomes a QuantLib::Date and back.
#pragma once

#include <fmt/core.h>

#include <ql/time/date.hpp>
#include <stdexcept>

#include "curves/curves.h"

namespace poolbid::detail {

// QuantLib dates run from 1901-01-01 to 2199-12-31; outside that is std::invalid_argument.
inline QuantLib::Date ql_date(Date date) {
  const int year = static_cast<int>(date.year());
  if (!date.ok() || year < 1901 || year > 2199)
    throw std::invalid_argument(
        fmt::format("date {:04d}-{:02d}-{:02d} {}", year, static_cast<unsigned>(date.month()),
                    static_cast<unsigned>(date.day()),
                    date.ok() ? "is outside 1901-01-01 .. 2199-12-31" : "is not a calendar date"));
  return QuantLib::Date(static_cast<QuantLib::Day>(static_cast<unsigned>(date.day())),
                        static_cast<QuantLib::Month>(static_cast<unsigned>(date.month())),
                        static_cast<QuantLib::Year>(year));
}

inline Date chrono_date(const QuantLib::Date& date) {
  return Date{std::chrono::year{date.year()},
              std::chrono::month{static_cast<unsigned>(date.month())},
              std::chrono::day{static_cast<unsigned>(date.dayOfMonth())}};
}

}  // namespace poolbid::detail
