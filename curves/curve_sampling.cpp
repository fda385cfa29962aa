// Reading a yield curve: discount factors, curve time, zero and forward rates, par yields, ARM
// index paths and the market mortgage rate. Dates become QuantLib dates in one place
// (curves/ql_dates.h) and every day count is QuantLib's. Paths read each date's discount factor
// from the curve once. Tested: tests/curves/yield_curve_test.cpp,
// tests/curves/curve_sampling_test.cpp.
#include <fmt/core.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <limits>
#include <ql/termstructures/yieldtermstructure.hpp>
#include <ql/time/daycounters/actual360.hpp>
#include <ql/time/daycounters/actual365fixed.hpp>
#include <ql/time/daycounters/thirty360.hpp>
#include <ql/time/period.hpp>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

#include "curves/curve_errors.h"
#include "curves/curves.h"
#include "curves/ql_dates.h"

namespace poolbid {
namespace {

namespace ql = QuantLib;

constexpr int kMortgageParHalves = 20;  // the market mortgage rate reads the 10-year par yield
constexpr double kMaxParYears = 100;

const ql::YieldTermStructure& structure(const YieldCurve& curve) {
  if (!curve.term_structure)
    throw std::invalid_argument(fmt::format("yield curve {} is not built", curve.source));
  return *curve.term_structure;
}

std::string iso(Date date) {
  return fmt::format("{:04d}-{:02d}-{:02d}", static_cast<int>(date.year()),
                     static_cast<unsigned>(date.month()), static_cast<unsigned>(date.day()));
}

// `date` as a QuantLib date, checked to be on or after the curve's as_of.
ql::Date sample_date(const YieldCurve& curve, Date date, std::string_view caller) {
  if (date < curve.as_of)
    throw std::invalid_argument(fmt::format("{}: {} is before the date of curve {} ({})", caller,
                                            iso(date), curve.source, iso(curve.as_of)));
  return detail::ql_date(date);
}

void check_months(int months, std::string_view caller) {
  if (months < 0)
    throw std::invalid_argument(fmt::format("{}: {} months; give 0 or more", caller, months));
}

// Discount factors for dates on or after as_of, each read from the curve once: a vector indexed
// by days from as_of. One per call, so nothing is shared between threads.
class DiscountMemo {
 public:
  explicit DiscountMemo(const YieldCurve& curve)
      : curve_(structure(curve)), first_(detail::ql_date(curve.as_of).serialNumber()) {}

  double operator()(const ql::Date& date) {
    const auto offset = static_cast<std::size_t>(date.serialNumber() - first_);
    if (offset >= known_.size()) known_.resize(offset + 1, kUnknown);
    if (std::isnan(known_[offset])) known_[offset] = curve_.discount(date, true);
    return known_[offset];
  }

 private:
  static constexpr double kUnknown = std::numeric_limits<double>::quiet_NaN();
  const ql::YieldTermStructure& curve_;
  ql::Date::serial_type first_;
  std::vector<double> known_;
};

// Simple Actual/360 forward rate from `start` to `end`.
Rate simple_forward(DiscountMemo& df, const ql::Date& start, const ql::Date& end) {
  return (df(start) / df(end) - 1) / ql::Actual360().yearFraction(start, end);
}

// Semiannual par coupon of a bond from `start` with `halves` coupons on start + 6i months, each
// accruing its 30/360 (bond basis) fraction tau_i, 0.5 but for month ends such as August 31 to
// February 28: (DF(start) - DF(t_n)) / sum tau_i DF(t_i). Dividing every DF by DF(start) makes
// it a forward par yield and cancels.
Rate par_coupon(DiscountMemo& df, const ql::Date& start, int halves) {
  const ql::Thirty360 thirty_360(ql::Thirty360::BondBasis);
  double annuity = 0;
  ql::Date previous = start;
  for (int i = 1; i <= halves; ++i) {
    const ql::Date coupon = start + ql::Period(6 * i, ql::Months);
    annuity += thirty_360.yearFraction(previous, coupon) * df(coupon);
    previous = coupon;
  }
  return (df(start) - df(previous)) / annuity;
}

std::string defined_names(const YieldCurve& curve) {
  std::string names;
  for (const CurveIndex& index : curve.indexes)
    names += fmt::format("{}{}", names.empty() ? "" : ", ", index.name);
  return names;
}

CurveIndex index_named(const YieldCurve& curve, const std::string& name) {
  for (const CurveIndex& index : curve.indexes)
    if (index.name == name) return index;
  if (curve.flat) return CurveIndex{name, 1, 0};
  throw detail::curve_error(
      {curve.source, "indexes"}, name,
      curve.indexes.empty()
          ? std::string(R"(the curve defines no ARM index; add one under "indexes", such as )"
                        R"("indexes": {"SOFR30A": {"tenor": "1M", "spread": 0}})")
          : fmt::format("the curve defines no index of this name; it defines {}",
                        defined_names(curve)));
}

}  // namespace

double discount_factor(const YieldCurve& curve, Date date) {
  return structure(curve).discount(sample_date(curve, date, "discount_factor"), true);
}

std::vector<double> discount_factors(const YieldCurve& curve, std::span<const Date> dates) {
  const ql::YieldTermStructure& term_structure = structure(curve);
  std::vector<double> out;
  out.reserve(dates.size());
  for (const Date& date : dates)
    out.push_back(term_structure.discount(sample_date(curve, date, "discount_factors"), true));
  return out;
}

double curve_time(const YieldCurve& curve, Date date) {
  return ql::Actual365Fixed().yearFraction(detail::ql_date(curve.as_of),
                                           sample_date(curve, date, "curve_time"));
}

Rate zero_rate(const YieldCurve& curve, Date date) {
  return structure(curve)
      .zeroRate(sample_date(curve, date, "zero_rate"), ql::Actual365Fixed(), ql::Continuous,
                ql::NoFrequency, true)
      .rate();
}

Rate forward_rate(const YieldCurve& curve, Date start, int months) {
  if (months < 1)
    throw std::invalid_argument(
        fmt::format("forward_rate: a {}-month forward; give 1 month or more", months));
  const ql::Date from = sample_date(curve, start, "forward_rate");
  DiscountMemo df(curve);
  return simple_forward(df, from, from + ql::Period(months, ql::Months));
}

Rate par_yield(const YieldCurve& curve, double years) {
  if (!(years > 0 && years <= kMaxParYears))
    throw std::invalid_argument(fmt::format(
        "par_yield: maturity {} years; give more than 0 and at most {}", years, kMaxParYears));
  DiscountMemo df(curve);
  const ql::Date start = detail::ql_date(curve.as_of);
  const double halves = 2 * years;
  const int below = std::max(1, static_cast<int>(std::floor(halves)));
  const int above = std::max(1, static_cast<int>(std::ceil(halves)));
  const Rate at_below = par_coupon(df, start, below);
  if (above == below) return at_below;
  const double w = halves - below;
  return (1 - w) * at_below + w * par_coupon(df, start, above);
}

namespace {

// Forwards for collection months that start before the curve's date start at that date instead:
// the curve knows nothing earlier (and poolbid keeps no index fixings).
Date not_before_as_of(const YieldCurve& curve, Date start) {
  return start < curve.as_of ? curve.as_of : start;
}

}  // namespace

IndexPaths index_paths(const YieldCurve& curve, std::span<const std::string> names, Date cutoff,
                       int months) {
  check_months(months, "index_paths");
  IndexPaths paths;
  paths.months = months;
  paths.names.assign(names.begin(), names.end());
  std::vector<CurveIndex> indexes;
  for (const std::string& name : names) indexes.push_back(index_named(curve, name));
  DiscountMemo df(curve);
  for (const CurveIndex& index : indexes) {
    std::vector<Rate>& rates = paths.rates.emplace_back();
    rates.reserve(static_cast<std::size_t>(months));
    for (int t = 1; t <= months; ++t) {
      const ql::Date start = detail::ql_date(not_before_as_of(curve, collection_start(cutoff, t)));
      rates.push_back(
          simple_forward(df, start, start + ql::Period(index.tenor_months, ql::Months)) +
          index.spread);
    }
  }
  return paths;
}

std::vector<Rate> mortgage_rate_path(const YieldCurve& curve, Date cutoff, int months) {
  check_months(months, "mortgage_rate_path");
  std::vector<Rate> path;
  if (months == 0) return path;
  path.reserve(static_cast<std::size_t>(months));
  if (cutoff.day() > std::chrono::day{28} || cutoff < curve.as_of) {
    // Month ends: a start on the 28th of February rolls its coupons from the 28th, not the 31st.
    // A cut-off before the curve's date: the months before it read the curve from as_of.
    DiscountMemo df(curve);
    for (int t = 1; t <= months; ++t) {
      const ql::Date start = detail::ql_date(not_before_as_of(curve, collection_start(cutoff, t)));
      path.push_back(par_coupon(df, start, kMortgageParHalves) + curve.mortgage_spread);
    }
    return path;
  }
  // No day of the cut-off month is missing from any month, so start + 6i months is
  // cutoff + (t - 1 + 6i) months: read each monthly discount factor once, then the same sums as
  // par_coupon in the same order (the results are identical, only faster).
  const ql::Date first = detail::ql_date(cutoff);
  const ql::YieldTermStructure& term_structure = structure(curve);
  std::vector<double> grid(static_cast<std::size_t>(months + 6 * kMortgageParHalves));
  for (std::size_t m = 0; m < grid.size(); ++m)
    grid[m] = term_structure.discount(first + ql::Period(static_cast<int>(m), ql::Months), true);
  for (std::size_t start = 0; start < static_cast<std::size_t>(months); ++start) {
    double annuity = 0;
    for (std::size_t i = 1; i <= kMortgageParHalves; ++i) annuity += grid[start + 6 * i];
    const double par = 2 * (grid[start] - grid[start + 6 * kMortgageParHalves]) / annuity;
    path.push_back(par + curve.mortgage_spread);
  }
  return path;
}

}  // namespace poolbid
