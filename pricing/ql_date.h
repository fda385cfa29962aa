// Date <-> QuantLib::Date for pricing/ (private): where pricing's dates meet QuantLib's day counts.
#pragma once

#include <ql/time/date.hpp>

#include <fmt/format.h>

#include <stdexcept>
#include <string>

#include "curves/curves.h"

namespace poolbid::detail {

// "2026-12-01", for messages.
inline std::string date_text(Date date) {
  return fmt::format("{:04}-{:02}-{:02}", static_cast<int>(date.year()),
                     static_cast<unsigned>(date.month()), static_cast<unsigned>(date.day()));
}

// The same calendar day as a QuantLib date. Throws std::invalid_argument for a date that does not
// exist or lies outside QuantLib's range (1901-01-01 to 2199-12-31).
inline QuantLib::Date to_quantlib(Date date) {
  const int year = static_cast<int>(date.year());
  if (!date.ok() || year < 1901 || year > 2199)
    throw std::invalid_argument(fmt::format("date {}: not a date from 1901 to 2199",
                                            date_text(date)));
  return QuantLib::Date(static_cast<QuantLib::Day>(static_cast<unsigned>(date.day())),
                        static_cast<QuantLib::Month>(static_cast<unsigned>(date.month())),
                        static_cast<QuantLib::Year>(year));
}

}  // namespace poolbid::detail
