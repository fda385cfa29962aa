// Tests for reading yield curves (curves/curve_sampling.cpp): flat curves against hand formulas,
// par yields and their interpolation, ARM index paths, the market mortgage rate path, errors, and
// the same answers from several threads at once.
#include <gtest/gtest.h>
#include <ql/time/daycounters/thirty360.hpp>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <string>
#include <thread>
#include <vector>

#include "curves/curves.h"

namespace {

using namespace poolbid;

constexpr Date kAsOf{std::chrono::year{2026}, std::chrono::month{12}, std::chrono::day{1}};
constexpr Rate kRate = 0.045;
const std::string kSwapCurve = POOLBID_SOURCE_DIR "/demo-pools/curve-2026-12-01.json";

Date ymd(int y, unsigned m, unsigned d) {
  return Date{std::chrono::year{y}, std::chrono::month{m}, std::chrono::day{d}};
}

// Days from a to b, counted by the calendar (no QuantLib).
double days(Date a, Date b) {
  return static_cast<double>((std::chrono::sys_days{b} - std::chrono::sys_days{a}).count());
}

// The same day `months` later (every date here is a first of the month).
Date months_after(Date date, int months) { return date + std::chrono::months{months}; }

TEST(FlatCurve, DiscountFactorsAndZeroRates) {
  const YieldCurve curve = flat_yield_curve(kRate, kAsOf);
  EXPECT_TRUE(curve.flat);
  EXPECT_EQ(curve.flat_rate, kRate);
  EXPECT_EQ(curve.source, "flat 4.5%");
  EXPECT_TRUE(curve.quotes.empty());
  EXPECT_TRUE(curve.indexes.empty());
  EXPECT_EQ(discount_factor(curve, kAsOf), 1.0);
  for (int t = 1; t <= 480; ++t) {
    const Date date = payment_date(kAsOf, t, 17);
    const double years = days(kAsOf, date) / 365;
    // identity: continuous compounding on Actual/365 Fixed
    EXPECT_NEAR(curve_time(curve, date), years, 1e-15) << t;
    EXPECT_NEAR(discount_factor(curve, date), std::exp(-kRate * years), 1e-15) << t;
    EXPECT_NEAR(zero_rate(curve, date), kRate, 1e-14) << t;
  }
  const std::vector<Date> dates{ymd(2027, 1, 18), ymd(2036, 12, 1), ymd(2100, 2, 28)};
  const std::vector<double> dfs = discount_factors(curve, dates);
  ASSERT_EQ(dfs.size(), 3u);
  for (std::size_t i = 0; i < dates.size(); ++i)
    EXPECT_EQ(dfs[i], discount_factor(curve, dates[i]));
}

TEST(FlatCurve, SimpleActual360Forwards) {
  const YieldCurve curve = flat_yield_curve(kRate, kAsOf);
  for (int start = 0; start < 120; start += 7)
    for (int months : {1, 3, 6, 12, 60}) {
      const Date from = months_after(kAsOf, start), to = months_after(from, months);
      const double d = days(from, to);
      // identity: (DF(s) / DF(e) - 1) / (days / 360) with DF = exp(-r days / 365)
      EXPECT_NEAR(forward_rate(curve, from, months), (std::exp(kRate * d / 365) - 1) / (d / 360),
                  1e-13)
          << start << " " << months;
    }
}

TEST(FlatCurve, ParYields) {
  const YieldCurve curve = flat_yield_curve(kRate, kAsOf);
  for (int halves = 1; halves <= 60; ++halves) {
    // identity: 2 (1 - DF(t_n)) / sum DF(t_i), coupon dates as_of + 6i months, DFs by hand
    double annuity = 0, shortest = 1e9, longest = 0;
    for (int i = 1; i <= halves; ++i) {
      annuity += std::exp(-kRate * days(kAsOf, months_after(kAsOf, 6 * i)) / 365);
      const double period = days(months_after(kAsOf, 6 * (i - 1)), months_after(kAsOf, 6 * i));
      shortest = std::min(shortest, period);
      longest = std::max(longest, period);
    }
    const double last = std::exp(-kRate * days(kAsOf, months_after(kAsOf, 6 * halves)) / 365);
    const Rate par = par_yield(curve, halves / 2.0);
    EXPECT_NEAR(par, 2 * (1 - last) / annuity, 1e-14) << halves;
    // identity: were every coupon period tau years long, the par coupon (accruing 0.5 a period)
    // would be 2 (exp(r tau) - 1); it grows with each period's length, so periods of 181-184
    // days bound it
    EXPECT_GE(par, 2 * (std::exp(kRate * shortest / 365) - 1) - 1e-15) << halves;
    EXPECT_LE(par, 2 * (std::exp(kRate * longest / 365) - 1) + 1e-15) << halves;
  }
}

TEST(ParYield, InterpolatesBetweenHalfYears) {
  const YieldCurve curve = load_yield_curve(kSwapCurve);
  const Rate p2 = par_yield(curve, 2), p25 = par_yield(curve, 2.5);
  EXPECT_NEAR(par_yield(curve, 2.25), 0.5 * (p2 + p25), 1e-15);
  EXPECT_NEAR(par_yield(curve, 2.1), 0.8 * p2 + 0.2 * p25, 1e-15);
  // A maturity under half a year reads the half-year point.
  EXPECT_EQ(par_yield(curve, 0.2), par_yield(curve, 0.5));
  EXPECT_THROW(par_yield(curve, 0), std::invalid_argument);
  EXPECT_THROW(par_yield(curve, -1), std::invalid_argument);
  EXPECT_THROW(par_yield(curve, std::nan("")), std::invalid_argument);
}

TEST(IndexPaths, FlatCurveProjectsAnyNameAtItsOneMonthForward) {
  const YieldCurve curve = flat_yield_curve(kRate, kAsOf);
  const std::vector<std::string> names{"SOFR30A", "ANY-INDEX"};
  const Date cutoff = ymd(2027, 3, 1);
  const IndexPaths paths = index_paths(curve, names, cutoff, 360);
  EXPECT_EQ(paths.months, 360);
  EXPECT_EQ(paths.names, names);
  ASSERT_EQ(paths.rates.size(), 2u);
  for (const std::vector<Rate>& rates : paths.rates) {
    ASSERT_EQ(rates.size(), 360u);
    for (int t = 1; t <= 360; ++t) {
      const Date start = collection_start(cutoff, t);
      const double d = days(start, months_after(start, 1));
      // identity: the 1-month simple Actual/360 forward; on a flat curve it differs between
      // months only by the month's length (28-31 days): about r^2 x 3 / 730 = 0.08bp at most
      EXPECT_NEAR(rates[t - 1], (std::exp(kRate * d / 365) - 1) / (d / 360), 1e-13) << t;
      EXPECT_NEAR(rates[t - 1], rates[0], 1e-5) << t;
    }
  }
}

TEST(IndexPaths, MonthsBeforeTheCurveDateReadFromIt) {
  // A cut-off a month before the curve's date: month 1 starts before as_of, so its forward starts
  // at as_of; month 2 on are the usual forwards. The mortgage-rate path likewise.
  const YieldCurve curve = flat_yield_curve(0.04, ymd(2026, 12, 10));
  const Date cutoff = ymd(2026, 11, 1);
  const std::vector<std::string> names{"SOFR30A"};
  const IndexPaths paths = index_paths(curve, names, cutoff, 3);
  EXPECT_DOUBLE_EQ(paths.rates[0][0], forward_rate(curve, ymd(2026, 12, 10), 1));
  EXPECT_DOUBLE_EQ(paths.rates[0][1], forward_rate(curve, ymd(2026, 12, 10), 1));
  EXPECT_DOUBLE_EQ(paths.rates[0][2], forward_rate(curve, ymd(2027, 1, 1), 1));
  const std::vector<Rate> mortgage = mortgage_rate_path(curve, cutoff, 3);
  EXPECT_DOUBLE_EQ(mortgage[0], mortgage[1]);
  EXPECT_NEAR(mortgage[2], mortgage[0], 2e-5);  // flat curve: day counts only
}

TEST(IndexPaths, CurveIndexesReadTheirTenorPlusSpread) {
  const YieldCurve curve = parse_yield_curve(
      R"({"as_of": "2026-12-01", "quotes": [{"kind": "deposit", "tenor": "1M", "rate": 4},
          {"kind": "swap", "tenor": "2Y", "rate": 3.5}, {"kind": "swap", "tenor": "10Y", "rate": 4}],
          "indexes": {"SOFR30A": {"tenor": "1M", "spread": 0}, "CMT1Y": {"tenor": "1Y", "spread": 0.25}}})",
      "c.json");
  const std::vector<std::string> names{"CMT1Y", "SOFR30A"};
  const IndexPaths paths = index_paths(curve, names, kAsOf, 120);
  for (int t = 1; t <= 120; ++t) {
    const Date start = collection_start(kAsOf, t);
    EXPECT_DOUBLE_EQ(paths.rates[0][t - 1], forward_rate(curve, start, 12) + 0.0025) << t;
    EXPECT_DOUBLE_EQ(paths.rates[1][t - 1], forward_rate(curve, start, 1)) << t;
  }
  EXPECT_TRUE(index_paths(curve, names, kAsOf, 0).rates[0].empty());

  const std::vector<std::string> unknown{"SOFR30A", "LIBOR6M"};
  try {
    index_paths(curve, unknown, kAsOf, 12);
    FAIL() << "no error";
  } catch (const CurveError& e) {
    EXPECT_EQ(e.source, "c.json");
    EXPECT_EQ(e.key, "indexes");
    EXPECT_EQ(e.value, "LIBOR6M");
    EXPECT_NE(std::string(e.what()).find("it defines CMT1Y, SOFR30A"), std::string::npos)
        << e.what();
  }
}

TEST(MortgageRatePath, FlatCurveIsTenYearParPlusSpread) {
  YieldCurve curve = flat_yield_curve(kRate, kAsOf);
  EXPECT_EQ(curve.mortgage_spread, 0.0145);
  const std::vector<Rate> path = mortgage_rate_path(curve, kAsOf, 400);
  ASSERT_EQ(path.size(), 400u);
  // identity: month 1 starts on as_of, so it is the 10-year par yield itself plus the spread
  EXPECT_NEAR(path[0], par_yield(curve, 10) + 0.0145, 1e-15);
  // On a flat curve the forward par yield is the same from any start up to the lengths of the
  // window's coupon periods (181-184 days), which bound it as in FlatCurve.ParYields; every
  // month is within 0.2bp of month 1 (observed: 0.11bp).
  for (int t = 1; t <= 400; ++t) {
    const Rate par = path[t - 1] - 0.0145;
    EXPECT_GE(par, 2 * (std::exp(kRate * 181 / 365) - 1)) << t;
    EXPECT_LE(par, 2 * (std::exp(kRate * 184 / 365) - 1)) << t;
    EXPECT_NEAR(path[t - 1], path[0], 2e-5) << t;
  }
  curve.mortgage_spread = 0.02;
  EXPECT_NEAR(mortgage_rate_path(curve, kAsOf, 3)[2], path[2] - 0.0145 + 0.02, 1e-15);
  EXPECT_TRUE(mortgage_rate_path(curve, kAsOf, 0).empty());
}

TEST(MortgageRatePath, IsTheForwardParYield) {
  const YieldCurve curve = load_yield_curve(kSwapCurve);
  const std::vector<Rate> path = mortgage_rate_path(curve, kAsOf, 61);
  // identity: the forward 10-year par yield from a start date, by hand from discount factors
  for (int t : {1, 2, 13, 61}) {
    const Date start = collection_start(kAsOf, t);
    double annuity = 0;
    for (int i = 1; i <= 20; ++i) annuity += discount_factor(curve, months_after(start, 6 * i));
    const double par =
        2 * (discount_factor(curve, start) - discount_factor(curve, months_after(start, 120))) /
        annuity;
    EXPECT_NEAR(path[t - 1], par + curve.mortgage_spread, 1e-15) << t;
  }
}

TEST(MortgageRatePath, MonthEndCutoffRollsFromEachStart) {
  const YieldCurve curve = load_yield_curve(kSwapCurve);
  const Date cutoff = ymd(2027, 1, 31);
  const std::vector<Rate> path = mortgage_rate_path(curve, cutoff, 14);
  // identity: month 2 starts 2027-02-28 and its coupons fall on the 28th (Aug 28, Feb 28, ...);
  // month 3 starts 2027-03-31 and rolls from the 31st (Sep 30, Mar 31, ...); month 14 starts on
  // 2028-02-29 and ends on 2038-02-28. Each coupon accrues its 30/360 (bond basis) fraction.
  const QuantLib::Thirty360 thirty_360(QuantLib::Thirty360::BondBasis);
  auto ql_date = [](Date d) {
    return QuantLib::Date(static_cast<QuantLib::Day>(static_cast<unsigned>(d.day())),
                          static_cast<QuantLib::Month>(static_cast<unsigned>(d.month())),
                          static_cast<QuantLib::Year>(static_cast<int>(d.year())));
  };
  for (int t : {2, 3, 14}) {
    const Date start = collection_start(cutoff, t);
    double annuity = 0;
    Date end{}, previous = start;
    for (int i = 1; i <= 20; ++i) {
      const std::chrono::year_month month =
          std::chrono::year_month(start.year(), start.month()) + std::chrono::months{6 * i};
      end = Date{month.year(), month.month(),
                 std::min(start.day(), (month.year() / month.month() / std::chrono::last).day())};
      annuity += thirty_360.yearFraction(ql_date(previous), ql_date(end)) *
                 discount_factor(curve, end);
      previous = end;
    }
    const double par = (discount_factor(curve, start) - discount_factor(curve, end)) / annuity;
    EXPECT_NEAR(path[t - 1], par + curve.mortgage_spread, 1e-15) << t;
  }
}

TEST(Sampling, DatesBeforeTheCurveAreErrors) {
  const YieldCurve curve = flat_yield_curve(kRate, kAsOf);
  const Date before = ymd(2026, 11, 30);
  EXPECT_THROW(discount_factor(curve, before), std::invalid_argument);
  EXPECT_THROW(zero_rate(curve, before), std::invalid_argument);
  EXPECT_THROW(curve_time(curve, before), std::invalid_argument);
  EXPECT_THROW(forward_rate(curve, before, 1), std::invalid_argument);
  EXPECT_THROW(forward_rate(curve, kAsOf, 0), std::invalid_argument);
  const std::vector<Date> dates{kAsOf, before};
  EXPECT_THROW(discount_factors(curve, dates), std::invalid_argument);
  // Paths from a cut-off before the curve read their early months from as_of instead (see
  // IndexPaths.MonthsBeforeTheCurveDateReadFromIt); a negative month count is still an error.
  EXPECT_THROW(mortgage_rate_path(curve, kAsOf, -1), std::invalid_argument);
}

TEST(Sampling, SameAnswersFromSeveralThreads) {
  const YieldCurve curve = shift_curve(load_yield_curve(kSwapCurve), 25);
  const std::vector<Rate> alone = mortgage_rate_path(curve, kAsOf, 400);
  std::vector<std::vector<Rate>> paths(4);
  std::vector<std::thread> threads;
  for (auto& path : paths)
    threads.emplace_back([&curve, &path] { path = mortgage_rate_path(curve, kAsOf, 400); });
  for (auto& thread : threads) thread.join();
  for (const auto& path : paths) EXPECT_EQ(path, alone);

  // Curves built at the same time from several threads come out the same as one built alone.
  const std::vector<Rate> reference = mortgage_rate_path(load_yield_curve(kSwapCurve), kAsOf, 60);
  std::vector<std::vector<Rate>> built(3);
  threads.clear();
  for (auto& path : built)
    threads.emplace_back(
        [&path] { path = mortgage_rate_path(load_yield_curve(kSwapCurve), kAsOf, 60); });
  for (auto& thread : threads) thread.join();
  for (const auto& path : built) EXPECT_EQ(path, reference);
}

}  // namespace
