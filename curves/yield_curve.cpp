// Building yield curves: the JSON curve file (parse, load), flat curves, and the QuantLib
// bootstrap. Bootstrap: PiecewiseYieldCurve<Discount, LogLinear>, Actual/365 Fixed, reference date
// = as_of (settlement days 0). Calendar: QuantLib's NullCalendar -- every quote starts on as_of and
// ends exactly its tenor later, no business-day adjustment (the file names no holiday calendar).
//   deposit    DepositRateHelper, simple Actual/360
//   swap       OISRateHelper: fixed annual Actual/360 against an overnight index built here
//              ("overnight", Actual/360, daily compounding), payments on the period end dates;
//              telescopic value dates (the projected compounded rate of a period is
//              DF(start) / DF(end) either way; a date per day made a 30-year curve take 1.7 s)
//   par_yield  FixedRateBondHelper at clean price 100, semiannual coupon = the quote, 30/360 bond
//              basis, coupon dates rolled back from the maturity
// The bootstrapped nodes are copied into a plain InterpolatedDiscountCurve<LogLinear> -- the same
// interpolation on the same nodes, flat forward past the last -- so the finished curve neither
// observes QuantLib's global evaluation date nor changes when it moves. That date is set only here,
// under a lock, while the helpers are built and solved, and restored after.
// Tested: each curve reprices its own quotes (tests/curves/yield_curve_test.cpp).
#include <fmt/core.h>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <mutex>
#include <nlohmann/json.hpp>
#include <optional>
#include <ql/currency.hpp>
#include <ql/indexes/iborindex.hpp>
#include <ql/math/interpolations/loginterpolation.hpp>
#include <ql/quotes/simplequote.hpp>
#include <ql/settings.hpp>
#include <ql/termstructures/yield/bondhelpers.hpp>
#include <ql/termstructures/yield/discountcurve.hpp>
#include <ql/termstructures/yield/flatforward.hpp>
#include <ql/termstructures/yield/oisratehelper.hpp>
#include <ql/termstructures/yield/piecewiseyieldcurve.hpp>
#include <ql/termstructures/yield/ratehelpers.hpp>
#include <ql/time/calendars/nullcalendar.hpp>
#include <ql/time/daycounters/actual360.hpp>
#include <ql/time/daycounters/actual365fixed.hpp>
#include <ql/time/daycounters/thirty360.hpp>
#include <ql/time/schedule.hpp>
#include <stdexcept>
#include <string>
#include <vector>

#include "curves/curve_errors.h"
#include "curves/curves.h"
#include "curves/json_duplicates.h"
#include "curves/ql_dates.h"

namespace poolbid {
namespace {

namespace ql = QuantLib;
namespace ext = QuantLib::ext;
using detail::Place;
using detail::shown;
using nlohmann::json;

// Rates and index spreads, percent: wide enough for any market seen, narrow enough to catch a
// decimal given where a percent belongs only when it is not (0.045 reads as 0.045%).
constexpr double kMinRatePercent = -5;
constexpr double kMaxRatePercent = 30;
constexpr double kMaxMortgageSpreadPercent = 10;
constexpr int kMaxTenorMonths = 600;  // 50 years
// QuantLib dates end in 2199; a 50-year quote must fit.
constexpr int kFirstYear = 1901;
constexpr int kLastYear = 2149;

constexpr std::string_view kKeys = "as_of, quotes, indexes, mortgage_spread, description";
constexpr std::string_view kRateForm = "a number in percent from -5 to 30, such as 4.25";
constexpr std::string_view kTenorForm =
    R"(must be a tenor such as "3M" or "10Y": a whole number of months (M) or years (Y), )"
    R"(from 1M to 50Y)";
constexpr std::string_view kQuoteForm = R"({"kind": "swap", "tenor": "10Y", "rate": 4.1})";

[[noreturn]] void fail(Place place, const json& value, std::string_view message) {
  throw detail::curve_error(place, shown(value), message);
}

// A percent in [low, high] as a decimal.
double percent_at(const json& value, Place place, double low, double high, std::string_view form) {
  if (!value.is_number()) fail(place, value, fmt::format("must be {}", form));
  const double percent = value.get<double>();
  if (!(percent >= low && percent <= high))
    fail(place, value, fmt::format("is outside {} .. {}; give {}", low, high, form));
  return detail::hundredth(value.dump());  // as the assumptions file reads percents
}

Rate rate_at(const json& value, Place place) {
  return percent_at(value, place, kMinRatePercent, kMaxRatePercent, kRateForm);
}

// "3M" -> 3, "10Y" -> 120 (unit in either case), from 1 month to 50 years.
std::optional<int> tenor_months(std::string_view text) {
  if (text.size() < 2 || text.front() < '0' || text.front() > '9') return std::nullopt;
  const char unit = text.back();
  const int months_per_unit = (unit == 'M' || unit == 'm')   ? 1
                              : (unit == 'Y' || unit == 'y') ? 12
                                                             : 0;
  if (months_per_unit == 0) return std::nullopt;
  int count = 0;
  const auto [end, error] = std::from_chars(text.data(), text.data() + text.size() - 1, count);
  if (error != std::errc() || end != text.data() + text.size() - 1) return std::nullopt;
  if (count <= 0 || count > kMaxTenorMonths / months_per_unit) return std::nullopt;
  return count * months_per_unit;
}

int tenor_at(const json& value, Place place) {
  const std::optional<int> months =
      value.is_string() ? tenor_months(value.get_ref<const std::string&>()) : std::nullopt;
  if (!months) fail(place, value, kTenorForm);
  return *months;
}

// "2026-12-01": four-digit year, two-digit month and day, a real calendar date.
std::optional<Date> iso_date(std::string_view text) {
  if (text.size() != 10 || text[4] != '-' || text[7] != '-') return std::nullopt;
  const auto number = [&](std::size_t at, std::size_t length) -> std::optional<int> {
    int out = 0;
    for (std::size_t i = at; i < at + length; ++i) {
      if (text[i] < '0' || text[i] > '9') return std::nullopt;
      out = out * 10 + (text[i] - '0');
    }
    return out;
  };
  const auto year = number(0, 4), month = number(5, 2), day = number(8, 2);
  if (!year || !month || !day) return std::nullopt;
  const Date date{std::chrono::year{*year}, std::chrono::month{static_cast<unsigned>(*month)},
                  std::chrono::day{static_cast<unsigned>(*day)}};
  if (!date.ok()) return std::nullopt;
  return date;
}

Date as_of_at(const json& value, Place place) {
  const std::optional<Date> date =
      value.is_string() ? iso_date(value.get_ref<const std::string&>()) : std::nullopt;
  if (!date) fail(place, value, "must be a date written yyyy-mm-dd, such as \"2026-12-01\"");
  const int year = static_cast<int>(date->year());
  if (year < kFirstYear || year > kLastYear)
    fail(place, value,
         fmt::format("must be a date from {}-01-01 to {}-12-31", kFirstYear, kLastYear));
  return *date;
}

CurveQuote quote_at(const json& object, std::string_view source, const std::string& key) {
  if (!object.is_object())
    fail({source, key}, object, fmt::format("must be an object such as {}", kQuoteForm));
  CurveQuote quote;
  bool has_kind = false, has_tenor = false, has_rate = false;
  for (const auto& [name, value] : object.items()) {
    const std::string at = fmt::format("{}.{}", key, name);
    const Place place{source, at};
    if (name == "kind") {
      has_kind = true;
      if (value == "deposit")
        quote.kind = CurveQuote::Kind::deposit;
      else if (value == "swap")
        quote.kind = CurveQuote::Kind::swap;
      else if (value == "par_yield")
        quote.kind = CurveQuote::Kind::par_yield;
      else
        fail(place, value, R"(must be "deposit", "swap" or "par_yield")");
    } else if (name == "tenor") {
      has_tenor = true;
      quote.months = tenor_at(value, place);
      quote.tenor = value.get<std::string>();
    } else if (name == "rate") {
      has_rate = true;
      quote.rate = rate_at(value, place);
    } else {
      fail(place, value, "unknown key; a quote takes kind, tenor and rate");
    }
  }
  if (!has_kind || !has_tenor || !has_rate)
    fail({source, key}, object,
         fmt::format("lacks {}; a quote needs kind, tenor and rate, such as {}",
                     !has_kind    ? "kind"
                     : !has_tenor ? "tenor"
                                  : "rate",
                     kQuoteForm));
  return quote;
}

std::vector<CurveIndex> indexes_at(const json& object, std::string_view source) {
  constexpr std::string_view kForm = R"({"SOFR30A": {"tenor": "1M", "spread": 0}})";
  if (!object.is_object())
    fail({source, "indexes"}, object, fmt::format("must be an object such as {}", kForm));
  std::vector<CurveIndex> indexes;
  for (const auto& [name, definition] : object.items()) {
    const std::string key = fmt::format("indexes.{}", name);
    if (name.empty()) fail({source, key}, definition, "an index needs a name");
    if (!definition.is_object())
      fail({source, key}, definition,
           R"(must be an object such as {"tenor": "1M", "spread": 0}; spread in percent)");
    CurveIndex index{name, 0, 0};
    for (const auto& [field, value] : definition.items()) {
      const std::string at = fmt::format("{}.{}", key, field);
      const Place place{source, at};
      if (field == "tenor")
        index.tenor_months = tenor_at(value, place);
      else if (field == "spread")
        index.spread = rate_at(value, place);
      else
        fail(place, value, "unknown key; an index takes tenor and spread");
    }
    if (index.tenor_months == 0)
      fail({source, key}, definition, R"(lacks tenor; an index needs one, such as "1M")");
    indexes.push_back(std::move(index));
  }
  return indexes;
}

// Two quotes may not mature together ("12M" and "1Y" do): the bootstrap needs one node per date.
void check_maturities(const std::vector<CurveQuote>& quotes, std::string_view source) {
  for (std::size_t i = 1; i < quotes.size(); ++i)
    for (std::size_t j = 0; j < i; ++j)
      if (quotes[i].months == quotes[j].months)
        throw detail::curve_error(
            {source, fmt::format("quotes[{}].tenor", i)}, quotes[i].tenor,
            fmt::format("matures with quotes[{}] ({}); two quotes may not share a maturity", j,
                        quotes[j].tenor));
}

// A QuantLib pointer as the std::shared_ptr the public header holds; the deleter keeps it alive.
template <class T>
std::shared_ptr<const ql::YieldTermStructure> shared(const ext::shared_ptr<T>& curve) {
  return std::shared_ptr<const ql::YieldTermStructure>(
      curve.get(), [keep = curve](const ql::YieldTermStructure*) mutable { keep.reset(); });
}

// Guards QuantLib's global evaluation date while a bootstrap reads it.
std::mutex& evaluation_date_lock() {
  static std::mutex lock;
  return lock;
}

ext::shared_ptr<ql::RateHelper> helper(const CurveQuote& quote, const ql::Date& as_of,
                                       const ext::shared_ptr<ql::OvernightIndex>& overnight) {
  const ql::NullCalendar calendar;
  const ql::Period tenor(quote.months, ql::Months);
  const ql::Handle<ql::Quote> rate(ext::make_shared<ql::SimpleQuote>(quote.rate));
  switch (quote.kind) {
    case CurveQuote::Kind::deposit:
      return ext::make_shared<ql::DepositRateHelper>(rate, tenor, 0, calendar, ql::Unadjusted,
                                                     false, ql::Actual360());
    case CurveQuote::Kind::swap:
      return ext::make_shared<ql::OISRateHelper>(0, tenor, rate, overnight,
                                                 ql::Handle<ql::YieldTermStructure>(),
                                                 /*telescopicValueDates=*/true);
    case CurveQuote::Kind::par_yield:
      break;
  }
  const ql::Schedule schedule(as_of, as_of + tenor, ql::Period(ql::Semiannual), calendar,
                              ql::Unadjusted, ql::Unadjusted, ql::DateGeneration::Backward, false);
  const ql::Handle<ql::Quote> par(ext::make_shared<ql::SimpleQuote>(100.0));
  return ext::make_shared<ql::FixedRateBondHelper>(
      par, 0, 100.0, schedule, std::vector<ql::Rate>{quote.rate},
      ql::Thirty360(ql::Thirty360::BondBasis), ql::Unadjusted, 100.0, as_of);
}

std::shared_ptr<const ql::YieldTermStructure> bootstrap(const YieldCurve& curve) {
  const ql::Date as_of = detail::ql_date(curve.as_of);
  std::vector<ql::Date> dates;
  std::vector<ql::DiscountFactor> discounts;
  try {
    const std::lock_guard<std::mutex> lock(evaluation_date_lock());
    const ql::SavedSettings restore;
    ql::Settings::instance().evaluationDate() = as_of;
    const auto overnight = ext::make_shared<ql::OvernightIndex>(
        "overnight", 0, ql::Currency(), ql::NullCalendar(), ql::Actual360());
    std::vector<ext::shared_ptr<ql::RateHelper>> helpers;
    for (const CurveQuote& quote : curve.quotes) helpers.push_back(helper(quote, as_of, overnight));
    const ql::PiecewiseYieldCurve<ql::Discount, ql::LogLinear> piecewise(as_of, helpers,
                                                                         ql::Actual365Fixed());
    for (const auto& [date, discount] : piecewise.nodes()) {
      dates.push_back(date);
      discounts.push_back(discount);
    }
  } catch (const std::exception& e) {
    throw detail::curve_error(
        {curve.source, "quotes"}, "",
        fmt::format("QuantLib cannot bootstrap a curve from these quotes: {}", e.what()));
  }
  const auto fixed = ext::make_shared<ql::InterpolatedDiscountCurve<ql::LogLinear>>(
      dates, discounts, ql::Actual365Fixed(), ql::NullCalendar());
  fixed->enableExtrapolation();
  return shared(fixed);
}

}  // namespace

YieldCurve parse_yield_curve(std::string_view json_text, std::string_view source_name) {
  const json doc = detail::parse_json_object(
      json_text,
      fmt::format(R"(a curve file holds one JSON object such as )"
                  R"({{"as_of": "2026-12-01", "quotes": [{}]}})",
                  kQuoteForm),
      [source_name](std::string_view key, std::string_view message) {
        return detail::curve_error({source_name, key}, "", message);
      });

  YieldCurve curve;
  curve.source = std::string(source_name);
  bool has_as_of = false, has_quotes = false;
  for (const auto& [key, value] : doc.items()) {
    const Place place{source_name, key};
    if (key == "as_of") {
      has_as_of = true;
      curve.as_of = as_of_at(value, place);
    } else if (key == "quotes") {
      has_quotes = true;
      if (!value.is_array() || value.empty())
        fail(place, value,
             fmt::format("must be a non-empty array of quotes such as [{}]", kQuoteForm));
      for (std::size_t i = 0; i < value.size(); ++i)
        curve.quotes.push_back(quote_at(value[i], source_name, fmt::format("quotes[{}]", i)));
    } else if (key == "indexes") {
      curve.indexes = indexes_at(value, source_name);
    } else if (key == "mortgage_spread") {
      curve.mortgage_spread = percent_at(value, place, 0, kMaxMortgageSpreadPercent,
                                         "a number in percent from 0 to 10, such as 1.45");
    } else if (key == "description") {
      if (!value.is_string()) fail(place, value, "must be text");
      curve.description = value.get<std::string>();
    } else {
      fail(place, value, fmt::format("unknown key; the keys are {}", kKeys));
    }
  }
  if (!has_as_of || !has_quotes)
    throw detail::curve_error({source_name, has_as_of ? "quotes" : "as_of"}, "",
                              "missing; a curve file needs as_of and quotes");
  check_maturities(curve.quotes, source_name);
  curve.term_structure = bootstrap(curve);
  return curve;
}

YieldCurve load_yield_curve(const std::string& path) {
  const std::string text = detail::read_text_file(
      path, "curve file", [&path](std::string_view key, std::string_view message) {
        return detail::curve_error({path, key}, "", message);
      });
  return parse_yield_curve(text, path);
}

YieldCurve flat_yield_curve(Rate continuous_rate, Date as_of) {
  if (!std::isfinite(continuous_rate))
    throw std::invalid_argument("flat_yield_curve: the rate must be a finite number");
  YieldCurve curve;
  curve.source = fmt::format("flat {:.6g}%", continuous_rate * 100);
  curve.description = "flat continuously compounded zero rate, Actual/365 Fixed";
  curve.as_of = as_of;
  curve.flat_rate = continuous_rate;
  curve.flat = true;
  const auto flat = ext::make_shared<ql::FlatForward>(detail::ql_date(as_of), continuous_rate,
                                                      ql::Actual365Fixed(), ql::Continuous);
  flat->enableExtrapolation();
  flat->discount(1.0);  // FlatForward is lazy: compute now, so later reads from threads only read
  curve.term_structure = shared(flat);
  return curve;
}

}  // namespace poolbid
