// Tests for building yield curves (curves/yield_curve.cpp): the curve file format and every class
// of error with its place, the bootstrap repricing its own quotes with QuantLib instruments, and
// the two demo curves.
#include <fmt/core.h>
#include <gtest/gtest.h>
#include <unistd.h>

#include <chrono>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <ql/currency.hpp>
#include <ql/indexes/iborindex.hpp>
#include <ql/instruments/bonds/fixedratebond.hpp>
#include <ql/instruments/makeois.hpp>
#include <ql/pricingengines/bond/discountingbondengine.hpp>
#include <ql/settings.hpp>
#include <ql/termstructures/yieldtermstructure.hpp>
#include <ql/time/calendars/nullcalendar.hpp>
#include <ql/time/daycounters/actual360.hpp>
#include <ql/time/daycounters/thirty360.hpp>
#include <ql/time/schedule.hpp>
#include <string>
#include <string_view>
#include <vector>

#include "curves/curves.h"

namespace {

using namespace poolbid;
namespace ql = QuantLib;

constexpr Date kAsOf{std::chrono::year{2026}, std::chrono::month{12}, std::chrono::day{1}};
const std::string kSwapCurve = POOLBID_SOURCE_DIR "/demo-pools/curve-2026-12-01.json";
const std::string kTreasuryCurve = POOLBID_SOURCE_DIR "/demo-pools/treasury-2026-12-01.json";

Date ymd(int y, unsigned m, unsigned d) {
  return Date{std::chrono::year{y}, std::chrono::month{m}, std::chrono::day{d}};
}

ql::Date ql_as_of() { return ql::Date(1, ql::December, 2026); }

// Our curve as a QuantLib handle, for QuantLib's own instruments and engines.
ql::Handle<ql::YieldTermStructure> handle(const YieldCurve& curve) {
  auto keep = curve.term_structure;
  return ql::Handle<ql::YieldTermStructure>(ql::ext::shared_ptr<ql::YieldTermStructure>(
      const_cast<ql::YieldTermStructure*>(keep.get()), [keep](ql::YieldTermStructure*) {}));
}

// A curve of mixed kinds: deposits, overnight-indexed swaps and par yields.
constexpr std::string_view kMixed = R"({
  "as_of": "2026-12-01",
  "quotes": [
    {"kind": "deposit", "tenor": "1M", "rate": 4.05},
    {"kind": "deposit", "tenor": "3M", "rate": 4.00},
    {"kind": "deposit", "tenor": "6M", "rate": 3.90},
    {"kind": "swap", "tenor": "1Y", "rate": 3.75},
    {"kind": "swap", "tenor": "2Y", "rate": 3.60},
    {"kind": "par_yield", "tenor": "3Y", "rate": 3.62},
    {"kind": "swap", "tenor": "5Y", "rate": 3.70},
    {"kind": "par_yield", "tenor": "7Y", "rate": 3.85},
    {"kind": "swap", "tenor": "10Y", "rate": 3.95},
    {"kind": "swap", "tenor": "30Y", "rate": 4.20}
  ],
  "indexes": {"SOFR30A": {"tenor": "1M", "spread": 0}, "CMT1Y": {"tenor": "1Y", "spread": 0.1}},
  "mortgage_spread": 1.6,
  "description": "test curve"
})";

// Each quote of `curve`, rebuilt as the QuantLib instrument it stands for and valued on the
// curve, gives back the quote. The bootstrap's swaps use telescopic value dates (the same
// projected compounded rate, computed without a date per day); `daily` values the reference swaps
// with a date per day instead, which is slower.
void expect_reprices(const YieldCurve& curve, bool daily) {
  const ql::SavedSettings restore;
  ql::Settings::instance().evaluationDate() = ql_as_of();
  const ql::Handle<ql::YieldTermStructure> h = handle(curve);
  for (const CurveQuote& quote : curve.quotes) {
    const ql::Period tenor(quote.months, ql::Months);
    SCOPED_TRACE(quote.tenor);
    switch (quote.kind) {
      case CurveQuote::Kind::deposit: {
        // source: QuantLib as a reference library (IborIndex forecast fixing on the curve)
        const ql::IborIndex deposit("deposit", tenor, 0, ql::Currency(), ql::NullCalendar(),
                                    ql::Unadjusted, false, ql::Actual360(), h);
        EXPECT_NEAR(deposit.fixing(ql_as_of()), quote.rate, 1e-10);
        // identity: a deposit from as_of is the simple Actual/360 forward from as_of
        EXPECT_NEAR(forward_rate(curve, kAsOf, quote.months), quote.rate, 1e-10);
        break;
      }
      case CurveQuote::Kind::swap: {
        // source: QuantLib as a reference library (MakeOIS fair rate, discounted on the curve)
        const auto overnight = ql::ext::make_shared<ql::OvernightIndex>(
            "overnight", 0, ql::Currency(), ql::NullCalendar(), ql::Actual360(), h);
        const ql::ext::shared_ptr<ql::OvernightIndexedSwap> swap =
            ql::MakeOIS(tenor, overnight, quote.rate)
                .withSettlementDays(0)
                .withTelescopicValueDates(!daily)
                .withDiscountingTermStructure(h);
        EXPECT_NEAR(swap->fairRate(), quote.rate, 1e-10);
        EXPECT_NEAR(swap->NPV(), 0.0, 1e-8);  // per 1 notional
        break;
      }
      case CurveQuote::Kind::par_yield: {
        // source: QuantLib as a reference library (FixedRateBond, DiscountingBondEngine)
        const ql::Schedule schedule(ql_as_of(), ql_as_of() + tenor, ql::Period(ql::Semiannual),
                                    ql::NullCalendar(), ql::Unadjusted, ql::Unadjusted,
                                    ql::DateGeneration::Backward, false);
        ql::FixedRateBond bond(0, 100.0, schedule, {quote.rate},
                               ql::Thirty360(ql::Thirty360::BondBasis), ql::Unadjusted, 100.0,
                               ql_as_of());
        bond.setPricingEngine(ql::ext::make_shared<ql::DiscountingBondEngine>(h));
        EXPECT_NEAR(bond.cleanPrice(), 100.0, 1e-8);
        // identity: par_yield's formula is this bond's par coupon (coupon dates on the 1st)
        EXPECT_NEAR(par_yield(curve, quote.months / 12.0), quote.rate, 1e-10);
        break;
      }
    }
  }
}

TEST(YieldCurveFile, ParYieldsRepriceFromAMonthEnd) {
  // A curve dated August 31: coupons fall on February 28 and August 31, and 30/360 (bond basis)
  // gives those half-years 178 and 182 days, not 180. par_yield weights each coupon by its
  // fraction, so it gives back the par-yield quotes the curve was built from.
  const YieldCurve curve = parse_yield_curve(R"({"as_of": "2026-08-31", "quotes": [
      {"kind": "par_yield", "tenor": "1Y", "rate": 3.60},
      {"kind": "par_yield", "tenor": "3Y", "rate": 3.62},
      {"kind": "par_yield", "tenor": "10Y", "rate": 4.10}]})",
                                             "month-end.json");
  for (const CurveQuote& quote : curve.quotes)
    // identity: the par coupon of the curve's own par bond is its quote
    EXPECT_NEAR(par_yield(curve, quote.months / 12.0), quote.rate, 1e-10) << quote.tenor;
}

TEST(YieldCurveFile, ReadsEveryKey) {
  const YieldCurve curve = parse_yield_curve(kMixed, "mixed.json");
  EXPECT_EQ(curve.source, "mixed.json");
  EXPECT_EQ(curve.description, "test curve");
  EXPECT_EQ(curve.as_of, kAsOf);
  EXPECT_FALSE(curve.flat);
  ASSERT_EQ(curve.quotes.size(), 10u);
  EXPECT_EQ(curve.quotes[0].kind, CurveQuote::Kind::deposit);
  EXPECT_EQ(curve.quotes[0].tenor, "1M");
  EXPECT_EQ(curve.quotes[0].months, 1);
  EXPECT_EQ(curve.quotes[0].rate, 0.0405);  // the double nearest 0.0405, read in one rounding
  EXPECT_EQ(curve.quotes[5].kind, CurveQuote::Kind::par_yield);
  EXPECT_EQ(curve.quotes[9].kind, CurveQuote::Kind::swap);
  EXPECT_EQ(curve.quotes[9].months, 360);
  ASSERT_EQ(curve.indexes.size(), 2u);
  EXPECT_EQ(curve.indexes[0].name, "CMT1Y");  // JSON objects read in key order
  EXPECT_EQ(curve.indexes[0].tenor_months, 12);
  EXPECT_EQ(curve.indexes[0].spread, 0.001);
  EXPECT_EQ(curve.indexes[1].name, "SOFR30A");
  EXPECT_EQ(curve.mortgage_spread, 0.016);
  EXPECT_EQ(curve.parallel_shift_bp, 0);
  ASSERT_NE(curve.term_structure, nullptr);
  EXPECT_DOUBLE_EQ(discount_factor(curve, kAsOf), 1.0);
}

TEST(YieldCurveFile, DefaultsAndTenorForms) {
  const YieldCurve curve = parse_yield_curve(
      R"({"as_of": "2026-12-01", "quotes": [{"kind": "deposit", "tenor": "18m", "rate": 4},
          {"rate": -0.5, "tenor": "2y", "kind": "swap"}]})",
      "min.json");
  EXPECT_EQ(curve.quotes[0].months, 18);
  EXPECT_EQ(curve.quotes[1].months, 24);
  EXPECT_EQ(curve.quotes[1].rate, -0.005);
  EXPECT_TRUE(curve.indexes.empty());
  EXPECT_EQ(curve.mortgage_spread, 0.0145);
  EXPECT_EQ(curve.description, "");
}

TEST(YieldCurveBootstrap, MixedCurveRepricesItsQuotes) {
  expect_reprices(parse_yield_curve(kMixed, "mixed.json"), true);
}

TEST(YieldCurveBootstrap, DemoCurvesLoadRepriceAndLookPlausible) {
  for (const std::string& path : {kSwapCurve, kTreasuryCurve}) {
    SCOPED_TRACE(path);
    const YieldCurve curve = load_yield_curve(path);
    EXPECT_EQ(curve.source, path);
    EXPECT_EQ(curve.as_of, kAsOf);
    EXPECT_NE(curve.description.find("not market data"), std::string::npos);
    expect_reprices(curve, false);
    // common practice: a USD curve of the mid-2020s has par and zero rates of a few percent
    for (double years : {1.0, 2.0, 5.0, 10.0, 30.0}) {
      EXPECT_GT(par_yield(curve, years), 0.03) << years;
      EXPECT_LT(par_yield(curve, years), 0.06) << years;
    }
    for (int y = 1; y <= 40; ++y) {
      const Rate zero = zero_rate(curve, ymd(2026 + y, 12, 1));
      EXPECT_GT(zero, 0.02) << y;
      EXPECT_LT(zero, 0.07) << y;
    }
    // Discount factors fall with maturity (every forward positive), also past the last quote.
    double previous = 1;
    for (int t = 1; t <= 600; ++t) {
      const double df = discount_factor(curve, payment_date(kAsOf, t, 17));
      EXPECT_LT(df, previous) << t;
      previous = df;
    }
    const std::vector<std::string> sofr{"SOFR30A"};
    const IndexPaths paths = index_paths(curve, sofr, kAsOf, 360);
    for (Rate r : paths.rates[0]) {
      EXPECT_GT(r, 0.02);
      EXPECT_LT(r, 0.07);
    }
    for (Rate r : mortgage_rate_path(curve, kAsOf, 360)) {
      EXPECT_GT(r, 0.045);
      EXPECT_LT(r, 0.075);
    }
  }
}

TEST(YieldCurveBootstrap, ExtrapolatesFlatForwardPastTheLastQuote) {
  const YieldCurve curve = load_yield_curve(kSwapCurve);
  // identity: LogLinear discount factors past the last node keep the last instantaneous forward,
  // so the continuous forward per day is the same over any stretch past 30 years
  const auto forward_per_day = [&](Date a, Date b) {
    const double days = (std::chrono::sys_days{b} - std::chrono::sys_days{a}).count();
    return std::log(discount_factor(curve, a) / discount_factor(curve, b)) / days;
  };
  const double far = forward_per_day(ymd(2059, 12, 1), ymd(2060, 12, 1));
  EXPECT_NEAR(forward_per_day(ymd(2069, 12, 1), ymd(2070, 12, 1)), far, 1e-15);
  EXPECT_NEAR(forward_per_day(ymd(2057, 1, 1), ymd(2099, 6, 1)), far, 1e-15);
  EXPECT_GT(far * 365, 0.03);
}

TEST(YieldCurveBootstrap, EvaluationDateIsLeftAsItWas) {
  const ql::SavedSettings restore;
  ql::Settings::instance().evaluationDate() = ql::Date(15, ql::March, 2021);
  parse_yield_curve(kMixed, "mixed.json");
  EXPECT_EQ(ql::Settings::instance().evaluationDate(), ql::Date(15, ql::March, 2021));
}

TEST(YieldCurveBootstrap, CurveDoesNotMoveWithTheEvaluationDate) {
  const YieldCurve curve = parse_yield_curve(kMixed, "mixed.json");
  const double before = discount_factor(curve, ymd(2036, 12, 1));
  const ql::SavedSettings restore;
  ql::Settings::instance().evaluationDate() = ql::Date(15, ql::March, 2027);
  EXPECT_EQ(discount_factor(curve, ymd(2036, 12, 1)), before);
  EXPECT_EQ(curve.term_structure->referenceDate(), ql_as_of());
}

// ---- Errors -------------------------------------------------------------------------------------

struct BadCurve {
  std::string_view key;    // expected CurveError::key
  std::string_view value;  // expected CurveError::value
  std::string_view says;   // part of what()
};

// A good file with one field replaced: {"as_of": AS_OF, "quotes": [..., QUOTE]}.
std::string with_quote(std::string_view quote) {
  return fmt::format(R"({{"as_of": "2026-12-01", "quotes": [
      {{"kind": "deposit", "tenor": "1M", "rate": 4}},
      {{"kind": "deposit", "tenor": "3M", "rate": 4}},
      {{"kind": "swap", "tenor": "2Y", "rate": 4}},
      {}]}})",
                     quote);
}

TEST(YieldCurveErrors, EachNamesKeyAndValue) {
  const std::string q = R"("quotes": [{"kind": "deposit", "tenor": "1M", "rate": 4}])";
  const std::vector<std::pair<std::string, BadCurve>> cases = {
      {"{", {"", "", "not valid JSON"}},
      {"[1, 2]", {"", "", "an array"}},
      {fmt::format(R"({{"as_of": "2026-12-01", {}, "spread": 1}})", q),
       {"spread", "1", "unknown key; the keys are as_of"}},
      {fmt::format(R"({{"as_of": "2026-12-01", {}, "as_of": "2026-12-02"}})", q),
       {"as_of", "", "duplicate key"}},
      {R"({"as_of": "2026-12-01", "quotes": [{"kind": "swap", "tenor": "1M", "kind": "deposit", "rate": 4}]})",
       {"quotes[0].kind", "", "duplicate key"}},
      {fmt::format(R"({{"as_of": "2026-13-01", {}}})", q), {"as_of", "2026-13-01", "yyyy-mm-dd"}},
      {fmt::format(R"({{"as_of": "2027-02-29", {}}})", q), {"as_of", "2027-02-29", "yyyy-mm-dd"}},
      {fmt::format(R"({{"as_of": "2026-12-1", {}}})", q), {"as_of", "2026-12-1", "yyyy-mm-dd"}},
      {fmt::format(R"({{"as_of": "12/01/2026", {}}})", q), {"as_of", "12/01/2026", "yyyy-mm-dd"}},
      {fmt::format(R"({{"as_of": 20261201, {}}})", q), {"as_of", "20261201", "yyyy-mm-dd"}},
      {fmt::format(R"({{"as_of": "1899-12-01", {}}})", q), {"as_of", "1899-12-01", "from 1901"}},
      {with_quote(R"({"kind": "deposit", "tenor": "10X", "rate": 4})"),
       {"quotes[3].tenor", "10X", "a tenor such as"}},
      {with_quote(R"({"kind": "deposit", "tenor": "0M", "rate": 4})"),
       {"quotes[3].tenor", "0M", "from 1M to 50Y"}},
      {with_quote(R"({"kind": "deposit", "tenor": "51Y", "rate": 4})"),
       {"quotes[3].tenor", "51Y", "from 1M to 50Y"}},
      {with_quote(R"({"kind": "deposit", "tenor": "1.5Y", "rate": 4})"),
       {"quotes[3].tenor", "1.5Y", "whole number"}},
      {with_quote(R"({"kind": "deposit", "tenor": "-1Y", "rate": 4})"),
       {"quotes[3].tenor", "-1Y", "a tenor such as"}},
      {with_quote(R"({"kind": "deposit", "tenor": "Y", "rate": 4})"),
       {"quotes[3].tenor", "Y", "a tenor such as"}},
      {with_quote(R"({"kind": "deposit", "tenor": 12, "rate": 4})"),
       {"quotes[3].tenor", "12", "a tenor such as"}},
      {with_quote(R"({"kind": "swap", "tenor": "5Y", "rate": 31})"),
       {"quotes[3].rate", "31", "from -5 to 30"}},
      {with_quote(R"({"kind": "swap", "tenor": "5Y", "rate": -5.5})"),
       {"quotes[3].rate", "-5.5", "from -5 to 30"}},
      {with_quote(R"({"kind": "swap", "tenor": "5Y", "rate": "4.1"})"),
       {"quotes[3].rate", "4.1", "must be a number in percent"}},
      {with_quote(R"({"kind": "bond", "tenor": "5Y", "rate": 4})"),
       {"quotes[3].kind", "bond", R"("deposit", "swap" or "par_yield")"}},
      {with_quote(R"({"kind": "swap", "tenor": "5Y", "rate": 4, "ratee": 4})"),
       {"quotes[3].ratee", "4", "unknown key; a quote takes kind, tenor and rate"}},
      {with_quote(R"({"kind": "swap", "tenor": "5Y"})"),
       {"quotes[3]", R"({"kind":"swap","tenor":"5Y"})", "lacks rate"}},
      {with_quote(R"("swap 5Y 4")"), {"quotes[3]", "swap 5Y 4", "must be an object"}},
      {with_quote(R"({"kind": "swap", "tenor": "24M", "rate": 4})"),
       {"quotes[3].tenor", "24M", "matures with quotes[2] (2Y)"}},
      {R"({"as_of": "2026-12-01", "quotes": []})", {"quotes", "[]", "non-empty array"}},
      {R"({"as_of": "2026-12-01", "quotes": {"kind": "swap"}})",
       {"quotes", R"({"kind":"swap"})", "non-empty array"}},
      {fmt::format(R"({{{}}})", q), {"as_of", "", "missing"}},
      {R"({"as_of": "2026-12-01"})", {"quotes", "", "missing"}},
      {fmt::format(R"({{"as_of": "2026-12-01", {}, "indexes": {{"SOFR30A": {{"tenor": "1X"}}}}}})",
                   q),
       {"indexes.SOFR30A.tenor", "1X", "a tenor such as"}},
      {fmt::format(
           R"({{"as_of": "2026-12-01", {}, "indexes": {{"SOFR30A": {{"tenor": "1M", "margin": 2}}}}}})",
           q),
       {"indexes.SOFR30A.margin", "2", "unknown key; an index takes tenor and spread"}},
      {fmt::format(R"({{"as_of": "2026-12-01", {}, "indexes": {{"SOFR30A": {{"spread": 0}}}}}})",
                   q),
       {"indexes.SOFR30A", R"({"spread":0})", "lacks tenor"}},
      {fmt::format(R"({{"as_of": "2026-12-01", {}, "indexes": ["SOFR30A"]}})", q),
       {"indexes", R"(["SOFR30A"])", "must be an object"}},
      {fmt::format(
           R"({{"as_of": "2026-12-01", {}, "indexes": {{"SOFR30A": {{"tenor": "1M"}}, "SOFR30A": {{"tenor": "3M"}}}}}})",
           q),
       {"indexes.SOFR30A", "", "duplicate key"}},
      {fmt::format(R"({{"as_of": "2026-12-01", {}, "mortgage_spread": 12}})", q),
       {"mortgage_spread", "12", "from 0 to 10"}},
      {fmt::format(R"({{"as_of": "2026-12-01", {}, "description": 7}})", q),
       {"description", "7", "must be text"}},
  };
  for (const auto& [json, bad] : cases) {
    SCOPED_TRACE(json);
    try {
      parse_yield_curve(json, "bad.json");
      ADD_FAILURE() << "no error";
    } catch (const CurveError& e) {
      EXPECT_EQ(e.source, "bad.json");
      EXPECT_EQ(e.key, bad.key);
      EXPECT_EQ(e.value, bad.value);
      EXPECT_NE(std::string_view(e.what()).find(bad.says), std::string_view::npos) << e.what();
      EXPECT_EQ(std::string_view(e.what()).substr(0, 8), "bad.json") << e.what();
    }
  }
}

TEST(YieldCurveErrors, WhatSaysWhereAndWhatIsAccepted) {
  try {
    parse_yield_curve(with_quote(R"({"kind": "deposit", "tenor": "10X", "rate": 4})"), "c.json");
    FAIL() << "no error";
  } catch (const CurveError& e) {
    EXPECT_STREQ(e.what(),
                 R"(c.json key quotes[3].tenor, value '10X': must be a tenor such as "3M" or )"
                 R"("10Y": a whole number of months (M) or years (Y), from 1M to 50Y)");
  }
}

TEST(YieldCurveErrors, BootstrapFailureNamesTheFile) {
  // A 1-year deposit at 30% then a 13-month one at -5%: a one-month forward near -390%, outside
  // what QuantLib's discount bootstrap searches.
  try {
    parse_yield_curve(R"({"as_of": "2026-12-01", "quotes": [
        {"kind": "deposit", "tenor": "1Y", "rate": 30},
        {"kind": "deposit", "tenor": "13M", "rate": -5}]})",
                      "wild.json");
    FAIL() << "no error";
  } catch (const CurveError& e) {
    EXPECT_EQ(e.source, "wild.json");
    EXPECT_EQ(e.key, "quotes");
    EXPECT_NE(std::string_view(e.what()).find("QuantLib cannot bootstrap"), std::string_view::npos)
        << e.what();
  }
}

TEST(YieldCurveErrors, MissingFile) {
  const std::string path = POOLBID_SOURCE_DIR "/demo-pools/no-such-curve.json";
  try {
    load_yield_curve(path);
    FAIL() << "no error";
  } catch (const CurveError& e) {
    EXPECT_EQ(e.source, path);
    EXPECT_EQ(e.key, "");
    EXPECT_NE(std::string_view(e.what()).find("cannot open the curve file"),
              std::string_view::npos);
  }
}

TEST(YieldCurveErrors, LoadNamesTheFileInErrors) {
  const std::filesystem::path path =
      std::filesystem::temp_directory_path() / fmt::format("poolbid-curve-{}.json", ::getpid());
  {
    std::ofstream out(path);
    out << R"({"as_of": "2026-12-01", "quotes": [{"kind": "swap", "tenor": "2Y", "rate": 4}], "x": 1})";
  }
  try {
    load_yield_curve(path.string());
    ADD_FAILURE() << "no error";
  } catch (const CurveError& e) {
    EXPECT_EQ(e.source, path.string());
    EXPECT_EQ(e.key, "x");
  }
  std::filesystem::remove(path);
}

}  // namespace
