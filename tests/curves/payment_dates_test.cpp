// Tests for the payment-date rule (curves/payment_dates.cpp): payment_date and collection_start,
// including month ends, leap years and agreement with QuantLib's month arithmetic.
#include <gtest/gtest.h>

#include <chrono>
#include <ql/time/date.hpp>
#include <ql/time/period.hpp>

#include "curves/curves.h"

namespace {

using namespace poolbid;

constexpr Date kCutoff{std::chrono::year{2026}, std::chrono::month{12}, std::chrono::day{1}};

Date ymd(int y, unsigned m, unsigned d) {
  return Date{std::chrono::year{y}, std::chrono::month{m}, std::chrono::day{d}};
}

TEST(PaymentDate, FirstOfNextMonthPlusDelay) {
  // DESIGN.md section 5: collection month t starts at cut-off + (t - 1) months; its cash is paid
  // on the first of the following month plus the delay.
  EXPECT_EQ(payment_date(kCutoff, 1, 17), ymd(2027, 1, 18));
  EXPECT_EQ(payment_date(kCutoff, 1, 0), ymd(2027, 1, 1));
  EXPECT_EQ(payment_date(kCutoff, 12, 17), ymd(2027, 12, 18));
  EXPECT_EQ(payment_date(kCutoff, 360, 17), ymd(2056, 12, 18));
  // A delay past the month's end runs into the next: 2028-02-01 + 30 days, 2028 a leap year.
  EXPECT_EQ(payment_date(ymd(2027, 12, 1), 2, 30), ymd(2028, 3, 2));
  EXPECT_EQ(payment_date(ymd(2026, 12, 1), 2, 30), ymd(2027, 3, 3));
}

TEST(PaymentDate, MonthlyStepsAreOneMonthApart) {
  for (int t = 1; t < 480; ++t) {
    const Date now = payment_date(kCutoff, t, 17), next = payment_date(kCutoff, t + 1, 17);
    EXPECT_EQ(now.day(), std::chrono::day{18}) << t;
    EXPECT_EQ(std::chrono::year_month(next.year(), next.month()),
              std::chrono::year_month(now.year(), now.month()) + std::chrono::months{1})
        << t;
  }
}

TEST(CollectionStart, CutoffPlusMonthsBefore) {
  EXPECT_EQ(collection_start(kCutoff, 1), kCutoff);
  EXPECT_EQ(collection_start(kCutoff, 2), ymd(2027, 1, 1));
  EXPECT_EQ(collection_start(kCutoff, 13), ymd(2027, 12, 1));
  EXPECT_EQ(collection_start(kCutoff, 360), ymd(2056, 11, 1));
  // The cash of a collection month is paid after the month has started.
  for (int t = 1; t <= 360; ++t)
    EXPECT_LT(collection_start(kCutoff, t), payment_date(kCutoff, t, 0));
}

TEST(CollectionStart, DayMissingFromTheMonthIsItsLastDay) {
  EXPECT_EQ(collection_start(ymd(2027, 1, 31), 2), ymd(2027, 2, 28));
  EXPECT_EQ(collection_start(ymd(2027, 1, 31), 3), ymd(2027, 3, 31));
  EXPECT_EQ(collection_start(ymd(2027, 12, 31), 3), ymd(2028, 2, 29));
  // The same rule as QuantLib's Date + n Months, for every month end over four years.
  // source: QuantLib as a reference library (Date::advance, end of month kept within the month)
  for (unsigned day : {28u, 29u, 30u, 31u})
    for (int t = 1; t <= 48; ++t) {
      const Date start = ymd(2027, 1, day);
      const QuantLib::Date ql =
          QuantLib::Date(static_cast<QuantLib::Day>(day), QuantLib::January, 2027) +
          QuantLib::Period(t - 1, QuantLib::Months);
      const Date ours = collection_start(start, t);
      EXPECT_EQ(static_cast<unsigned>(ours.day()), static_cast<unsigned>(ql.dayOfMonth()))
          << day << " " << t;
      EXPECT_EQ(static_cast<unsigned>(ours.month()), static_cast<unsigned>(ql.month()));
      EXPECT_EQ(static_cast<int>(ours.year()), ql.year());
    }
}

}  // namespace
