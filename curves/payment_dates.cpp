// The payment-date rule (DESIGN.md section 5): when each collection month starts and when its cash
// reaches the investor. Calendar arithmetic on std::chrono dates; no business-day adjustment.
#include <algorithm>

#include "curves/curves.h"

namespace poolbid {

Date payment_date(Date cutoff, int month, int delay_days) {
  const std::chrono::year_month collection_end =
      std::chrono::year_month{cutoff.year(), cutoff.month()} + std::chrono::months{month};
  return Date{std::chrono::sys_days{collection_end / std::chrono::day{1}} +
              std::chrono::days{delay_days}};
}

// A day of month the target month lacks becomes its last day (2027-01-31 + 1 month = 2027-02-28),
// the rule QuantLib's Date + Period(n, Months) follows; tested against it.
Date collection_start(Date cutoff, int month) {
  const std::chrono::year_month start =
      std::chrono::year_month{cutoff.year(), cutoff.month()} + std::chrono::months{month - 1};
  const std::chrono::day last = std::chrono::year_month_day_last{
      start.year(),
      std::chrono::month_day_last{
          start.month()}}.day();
  return Date{start.year(), start.month(), std::min(cutoff.day(), last)};
}

}  // namespace poolbid
