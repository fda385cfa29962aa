// Tests for the command-line text forms (curves/assumption_text.cpp, canonical_text.cpp): every
// accepted form, canonical text and its round trip, and the messages for bad forms.
#include "curves/curves.h"

#include <gtest/gtest.h>

#include <fmt/core.h>

#include <cmath>
#include <cstdint>

#include "tests/curves/curve_testing.h"

namespace {

using namespace poolbid;
using namespace testing_curves;

constexpr auto kAge = CurveClock::loan_age;
constexpr auto kMonth = CurveClock::projection_month;

SpeedCurve constant(double v, CurveClock clock = kMonth) { return constant_curve(v, clock); }
SpeedCurve vector(std::vector<double> v, CurveClock clock = kMonth) {
  return vector_curve(std::move(v), clock);
}
SpeedCurve ramp(double from, double to, int months, CurveClock clock = kMonth) {
  return ramp_curve(from, to, months, clock);
}
SpeedCurve standard(CurveShape shape, double multiple, CurveClock clock = kAge) {
  return standard_curve(shape, multiple, clock);
}

enum class Kind { prepay, default_rate, severity };

SpeedCurve parse(Kind kind, std::string_view text) {
  switch (kind) {
    case Kind::prepay:
      return parse_prepay(text);
    case Kind::default_rate:
      return parse_default(text);
    case Kind::severity:
      break;
  }
  return parse_severity(text);
}

std::string text(Kind kind, const SpeedCurve& curve) {
  switch (kind) {
    case Kind::prepay:
      return prepay_text(curve);
    case Kind::default_rate:
      return default_text(curve);
    case Kind::severity:
      break;
  }
  return severity_text(curve);
}

struct Accepted {
  Kind kind;
  std::string_view text;
  SpeedCurve curve;
  std::string_view canonical;
};

TEST(TextForms, EveryAcceptedForm) {
  const Accepted cases[] = {
      {Kind::prepay, "cpr:8", constant(0.08), "cpr:8"},
      {Kind::prepay, "CPR:8", constant(0.08), "cpr:8"},
      {Kind::prepay, "  cpr : 8.0 ", constant(0.08), "cpr:8"},
      {Kind::prepay, "cpr:0", constant(0), "cpr:0"},
      {Kind::prepay, "cpr:-0", constant(0), "cpr:0"},
      {Kind::prepay, "cpr:100", constant(1), "cpr:100"},
      {Kind::prepay, "cpr:6.5", constant(0.065), "cpr:6.5"},
      {Kind::prepay, "cpr:.5", constant(0.005), "cpr:0.5"},
      {Kind::prepay, "cpr:1e1", constant(0.1), "cpr:10"},
      {Kind::prepay, "cpr:8@age", constant(0.08, kAge), "cpr:8@age"},
      {Kind::prepay, "cpr:8 @ AGE", constant(0.08, kAge), "cpr:8@age"},
      {Kind::prepay, "cpr:8@month", constant(0.08), "cpr:8"},
      {Kind::prepay, "psa:150", standard(CurveShape::psa, 1.5), "psa:150"},
      {Kind::prepay, "PSA:100@age", standard(CurveShape::psa, 1), "psa:100"},
      {Kind::prepay, "psa:150@month", standard(CurveShape::psa, 1.5, kMonth), "psa:150@month"},
      {Kind::prepay, "psa:0", standard(CurveShape::psa, 0), "psa:0"},
      {Kind::prepay, "psa:1666", standard(CurveShape::psa, 16.66), "psa:1666"},
      {Kind::prepay, "cpr:6,7,8,9", vector({0.06, 0.07, 0.08, 0.09}), "cpr:6,7,8,9"},
      {Kind::prepay, "cpr:6, 7 ,8", vector({0.06, 0.07, 0.08}), "cpr:6,7,8"},
      {Kind::prepay, "cpr:4,6@age", vector({0.04, 0.06}, kAge), "cpr:4,6@age"},
      {Kind::prepay, "cpr:2..8/24", ramp(0.02, 0.08, 24), "cpr:2..8/24"},
      {Kind::prepay, "cpr:8..2/12", ramp(0.08, 0.02, 12), "cpr:8..2/12"},
      {Kind::prepay, "cpr:2.5..8/1", ramp(0.025, 0.08, 1), "cpr:2.5..8/1"},
      {Kind::prepay, "cpr:2 .. 8 / 24@age", ramp(0.02, 0.08, 24, kAge), "cpr:2..8/24@age"},
      {Kind::default_rate, "cdr:1.5", constant(0.015), "cdr:1.5"},
      {Kind::default_rate, "sda:200", standard(CurveShape::sda, 2), "sda:200"},
      {Kind::default_rate, "sda:200@month", standard(CurveShape::sda, 2, kMonth), "sda:200@month"},
      {Kind::default_rate, "sda:16666", standard(CurveShape::sda, 166.66), "sda:16666"},
      {Kind::default_rate, "cdr:0.5,1,1.5", vector({0.005, 0.01, 0.015}), "cdr:0.5,1,1.5"},
      {Kind::default_rate, "cdr:0..3/36", ramp(0, 0.03, 36), "cdr:0..3/36"},
      {Kind::severity, "45", constant(0.45), "45"},
      {Kind::severity, "45@age", constant(0.45, kAge), "45@age"},
      {Kind::severity, "45,40,35", vector({0.45, 0.40, 0.35}), "45,40,35"},
      {Kind::severity, "60..40/24", ramp(0.6, 0.4, 24), "60..40/24"},
      {Kind::severity, "100", constant(1), "100"},
  };
  for (const Accepted& c : cases) {
    SCOPED_TRACE(c.text);
    const SpeedCurve parsed = parse(c.kind, c.text);
    EXPECT_TRUE(same_curve(parsed, c.curve));
    EXPECT_EQ(text(c.kind, parsed), c.canonical);
    EXPECT_TRUE(same_curve(parse(c.kind, text(c.kind, parsed)), parsed));  // identity: round trip
  }
}

TEST(TextForms, CanonicalTextIsShortestAndRoundTrips) {
  for (int i = 0; i <= 100000; i += 7) {
    const std::string form = fmt::format("cpr:{}", i / 1000.0);
    const SpeedCurve curve = parse_prepay(form);
    EXPECT_EQ(prepay_text(curve), form);
    EXPECT_TRUE(same_curve(parse_prepay(prepay_text(curve)), curve)) << form;  // identity
  }
  for (int i = 0; i <= 16666; i += 3) {
    const std::string form = fmt::format("sda:{}", i);
    EXPECT_EQ(default_text(parse_default(form)), form);  // identity: round trip
  }
}

TEST(TextForms, HandBuiltCurvesRoundTrip) {
  const SpeedCurve curves[] = {
      constant(0.07),          constant(0.1 + 0.2),    constant(1.0 / 3),
      constant(2.0 / 3),       constant(0.0123456789), vector({0.07, 0.3, 1.0 / 7}, kAge),
      ramp(1.0 / 3, 0.09, 17),
  };
  for (const SpeedCurve& c : curves) {
    EXPECT_TRUE(same_curve(parse_prepay(prepay_text(c)), c)) << prepay_text(c);  // identity
    EXPECT_TRUE(same_curve(parse_default(default_text(c)), c)) << default_text(c);
    EXPECT_TRUE(same_curve(parse_severity(severity_text(c)), c)) << severity_text(c);
  }
  EXPECT_EQ(prepay_text(constant(0.07)), "cpr:7");
  EXPECT_EQ(severity_text(constant(0.40)), "40");
  EXPECT_EQ(prepay_text(standard(CurveShape::psa, 1.5)), "psa:150");
}

TEST(TextForms, AnyRateRoundTripsExactly) {
  // Deterministic sweep of doubles in [0, 1], many with 16-17 significant digits.
  std::uint64_t state = 12345;
  for (int i = 0; i < 20000; ++i) {
    state = state * 6364136223846793005ULL + 1442695040888963407ULL;
    const double v = static_cast<double>(state >> 11) / 9007199254740992.0;  // 2^53
    const double rate = i % 3 == 0 ? v : i % 3 == 1 ? v * 1e-4 : std::round(v * 1e4) / 1e6;
    const SpeedCurve c = constant(rate);
    ASSERT_TRUE(same_curve(parse_prepay(prepay_text(c)), c)) << prepay_text(c);  // identity
    ASSERT_TRUE(same_curve(parse_severity(severity_text(c)), c)) << severity_text(c);
    const SpeedCurve psa = standard(CurveShape::psa, rate * 16);
    ASSERT_TRUE(same_curve(parse_prepay(prepay_text(psa)), psa)) << prepay_text(psa);
  }
  EXPECT_EQ(prepay_text(constant(1.0 / 3)), "cpr:33.33333333333333");
  EXPECT_EQ(prepay_text(constant(1e-8)), "cpr:0.000001");
  EXPECT_EQ(prepay_text(constant(1e-9)), "cpr:1e-7");
  EXPECT_EQ(prepay_text(constant(1e-12)), "cpr:1e-10");
  EXPECT_EQ(prepay_text(constant(std::nan(""))), "cpr:nan");  // hand-built; no parser accepts it
}

TEST(TextForms, ErrorCarriesItsPlace) {
  try {
    parse_prepay("psb:150");
    FAIL() << "accepted";
  } catch (const AssumptionError& e) {
    EXPECT_STREQ(e.what(),
                 "--prepay 'psb:150': unknown form; use cpr:RATE, psa:MULTIPLE, a vector "
                 "cpr:A,B,C or a ramp cpr:FROM..TO/MONTHS");
    EXPECT_EQ(e.source, "--prepay");
    EXPECT_EQ(e.key, "");
    EXPECT_EQ(e.value, "psb:150");
  }
  try {
    parse_default("cdr:x", "--stress-default");
    FAIL() << "accepted";
  } catch (const AssumptionError& e) {
    EXPECT_EQ(std::string(e.what()).rfind("--stress-default 'cdr:x': ", 0), 0u) << e.what();
    EXPECT_EQ(e.source, "--stress-default");
  }
}

struct Rejected {
  Kind kind;
  std::string_view text;
  std::string_view fragment;  // must appear in what()
};

TEST(TextForms, BadFormsSayWhatIsAccepted) {
  const Rejected cases[] = {
      {Kind::prepay, "", "--prepay: empty; use cpr:RATE, psa:MULTIPLE"},
      {Kind::prepay, "   ", "empty; use cpr:RATE"},
      {Kind::prepay, "@age", "empty; use cpr:RATE"},
      {Kind::prepay, "8", "--prepay '8': unknown form; use cpr:RATE"},
      {Kind::prepay, "cdr:2", "'cdr:2': unknown form; use cpr:RATE"},
      {Kind::prepay, "sda:100", "unknown form; use cpr:RATE"},
      {Kind::prepay, "cpr:", "no number after 'cpr:'; use cpr:RATE"},
      {Kind::prepay, "cpr:abc", "'abc' is not a number; use cpr:RATE"},
      {Kind::prepay, "cpr:8x", "'8x' is not a number"},
      {Kind::prepay, "cpr:8%", "'8%' is not a number"},
      {Kind::prepay, "cpr:8 9", "'8 9' is not a number"},
      {Kind::prepay, "cpr:+5", "'+5' is not a number"},
      {Kind::prepay, "cpr:0x10", "'0x10' is not a number"},
      {Kind::prepay, "cpr:8,", "a number is missing"},
      {Kind::prepay, "cpr:6,,8", "a number is missing"},
      {Kind::prepay, "cpr:-1", "CPR -1% is negative; CPR is annual percent from 0 to 100"},
      {Kind::prepay, "cpr:100.5", "CPR 100.5% is above 100%; CPR is annual percent from 0 to 100"},
      {Kind::prepay, "cpr:6,120", "CPR 120% is above 100%"},
      {Kind::prepay, "cpr:nan", "'nan' is not a finite number"},
      {Kind::prepay, "cpr:inf", "'inf' is not a finite number"},
      {Kind::prepay, "cpr:1e400", "'1e400' is out of range"},
      {Kind::prepay, "cpr:2..8", "a ramp needs its length: FROM..TO/MONTHS"},
      {Kind::prepay, "cpr:2..8/0", "ramp months '0' must be a whole number from 1 to 600"},
      {Kind::prepay, "cpr:2..8/-3", "ramp months '-3' must be a whole number"},
      {Kind::prepay, "cpr:2..8/1.5", "ramp months '1.5' must be a whole number"},
      {Kind::prepay, "cpr:2..8/601", "ramp months '601' must be a whole number"},
      {Kind::prepay, "cpr:2..8/24x", "ramp months '24x' must be a whole number"},
      {Kind::prepay, "cpr:2..8/", "ramp months '' must be a whole number"},
      {Kind::prepay, "cpr:..8/24", "a number is missing"},
      {Kind::prepay, "cpr:2..120/24", "CPR 120% is above 100%"},
      {Kind::prepay, "psa:-100", "psa:-100 is negative; use cpr:RATE"},
      {Kind::prepay, "psa:2000", "psa:2000 peaks at 120% CPR, above 100% (psa:1666 at most)"},
      {Kind::prepay, "psa:1667", "peaks at 100.02% CPR"},
      {Kind::prepay, "psa:150,200", "psa takes one multiple, e.g. psa:150; use cpr:RATE"},
      {Kind::prepay, "psa:100..200/10", "psa takes one multiple"},
      {Kind::prepay, "psa:nan", "'nan' is not a finite number"},
      {Kind::prepay, "cpr:8@year",
       "unknown clock '@year': @age reads loan age, @month the "
       "projection month; use cpr:RATE"},
      {Kind::prepay, "cpr:8@", "unknown clock '@'"},
      {Kind::prepay, "cpr:8@age@month", "unknown clock '@age@month'"},
      {Kind::default_rate, "cpr:2",
       "--default 'cpr:2': unknown form; use cdr:RATE, "
       "sda:MULTIPLE, a vector cdr:A,B,C or a ramp "
       "cdr:FROM..TO/MONTHS"},
      {Kind::default_rate, "psa:100", "unknown form; use cdr:RATE"},
      {Kind::default_rate, "cdr:101", "CDR 101% is above 100%; CDR is annual percent"},
      {Kind::default_rate, "cdr:-0.5", "CDR -0.5% is negative"},
      {Kind::default_rate, "sda:20000",
       "sda:20000 peaks at 120% CDR, above 100% (sda:16666 at "
       "most)"},
      {Kind::default_rate, "sda:1,2", "sda takes one multiple"},
      {Kind::severity, "",
       "--severity: empty; use PERCENT (of the defaulted balance), a vector "
       "A,B,C or a ramp FROM..TO/MONTHS"},
      {Kind::severity, "sev:45", "--severity 'sev:45': unknown form; use PERCENT"},
      {Kind::severity, "cdr:45", "unknown form"},
      {Kind::severity, "101",
       "severity 101% is above 100%; severity is percent of the "
       "defaulted balance from 0 to 100"},
      {Kind::severity, "-5", "severity -5% is negative"},
      {Kind::severity, "45%", "'45%' is not a number; use PERCENT"},
      {Kind::severity, "60..40", "a ramp needs its length"},
      {Kind::severity, "45,x", "'x' is not a number"},
  };
  for (const Rejected& c : cases) {
    SCOPED_TRACE(c.text);
    try {
      parse(c.kind, c.text);
      ADD_FAILURE() << "accepted";
    } catch (const AssumptionError& e) {
      EXPECT_NE(std::string_view(e.what()).find(c.fragment), std::string_view::npos) << e.what();
      EXPECT_EQ(e.value, c.text);
    }
  }
}

TEST(Lag, AcceptsWholeMonths) {
  EXPECT_EQ(parse_lag("0"), 0);
  EXPECT_EQ(parse_lag("12"), 12);
  EXPECT_EQ(parse_lag(" 360 "), 360);
}

TEST(Lag, Rejects) {
  for (const std::string_view bad : {"-1", "361", "12.5", "12m", "abc", "1e1", "+3"}) {
    try {
      parse_lag(bad);
      ADD_FAILURE() << bad << " accepted";
    } catch (const AssumptionError& e) {
      EXPECT_EQ(std::string(e.what()),
                fmt::format("--lag '{}': not a whole number in range; the lag is a whole number "
                            "of months from 0 to 360",
                            bad));
    }
  }
  EXPECT_THROW(
      {
        try {
          parse_lag("", "--liquidation-lag");
        } catch (const AssumptionError& e) {
          EXPECT_STREQ(e.what(),
                       "--liquidation-lag: empty; the lag is a whole number of months "
                       "from 0 to 360");
          throw;
        }
      },
      AssumptionError);
}

TEST(Advancing, ParsesAndPrints) {
  EXPECT_EQ(parse_advancing("none"), Advancing::none);
  EXPECT_EQ(parse_advancing("interest"), Advancing::interest);
  EXPECT_EQ(parse_advancing(" Interest "), Advancing::interest);
  EXPECT_EQ(to_string(Advancing::none), "none");
  EXPECT_EQ(to_string(Advancing::interest), "interest");
  for (const Advancing a : {Advancing::none, Advancing::interest})
    EXPECT_EQ(parse_advancing(to_string(a)), a);  // identity: round trip
  try {
    parse_advancing("full");
    FAIL() << "accepted";
  } catch (const AssumptionError& e) {
    EXPECT_STREQ(e.what(), "--advancing 'full': unknown; use none or interest");
  }
  EXPECT_THROW(parse_advancing(""), AssumptionError);
}

}  // namespace
