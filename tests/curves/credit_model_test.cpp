// Tests for the loan-level model's tables (curves/credit_model.cpp): band and category lookups and
// labels, the illustrative defaults, the JSON model file (overrides, exact round trips, every class
// of error with its place), and the example file in demo-pools/.
#include <fmt/core.h>
#include <fmt/format.h>
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>
#include <ostream>
#include <random>
#include <set>
#include <string>
#include <string_view>
#include <vector>

#include "curves/curves.h"
#include "tape/tape.h"

// Failures print the model as its file.
namespace poolbid {
void PrintTo(const CreditModel& model, std::ostream* out) { *out << credit_model_json(model); }
void PrintTo(const BandTable& t, std::ostream* out) {
  *out << fmt::format("upper [{}] multiplier [{}] missing {}", fmt::join(t.upper, ", "),
                      fmt::join(t.multiplier, ", "), t.missing);
}
}  // namespace poolbid

namespace {

using namespace poolbid;

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();
const std::string kExample = POOLBID_SOURCE_DIR "/demo-pools/model-example.json";

CreditModel parse(std::string_view json, const CreditModel& base = default_credit_model()) {
  return parse_credit_model(json, "m.json", base);
}

const BandTable kScore{{620, 660, 700}, {3.0, 2.0, 1.3, 1.0}, 1.8};

// ---- Lookups
// -------------------------------------------------------------------------------------

TEST(BandTable, IndexAndValueAtTheEdges) {
  EXPECT_EQ(band_index(kScore, 300), 0u);
  EXPECT_EQ(band_index(kScore, 619.999), 0u);
  EXPECT_EQ(band_index(kScore, 620), 1u);  // exactly at a bound: the band above it
  EXPECT_EQ(band_index(kScore, 659), 1u);
  EXPECT_EQ(band_index(kScore, 660), 2u);
  EXPECT_EQ(band_index(kScore, 699.5), 2u);
  EXPECT_EQ(band_index(kScore, 700), 3u);
  EXPECT_EQ(band_index(kScore, 850), 3u);
  EXPECT_EQ(band_index(kScore, -kInf), 0u);
  EXPECT_EQ(band_index(kScore, kInf), 3u);
  EXPECT_EQ(band_index(kScore, kNaN), 4u);  // not on the tape

  EXPECT_EQ(band_value(kScore, 619), 3.0);
  EXPECT_EQ(band_value(kScore, 620), 2.0);
  EXPECT_EQ(band_value(kScore, 660), 1.3);
  EXPECT_EQ(band_value(kScore, 700), 1.0);
  EXPECT_EQ(band_value(kScore, kNaN), 1.8);

  const BandTable flat{{}, {1.25}, 2.0};
  EXPECT_EQ(band_index(flat, 0), 0u);
  EXPECT_EQ(band_value(flat, 1e9), 1.25);
  EXPECT_EQ(band_index(flat, kNaN), 1u);
  EXPECT_EQ(band_value(flat, kNaN), 2.0);
}

TEST(BandTable, DecimalBoundsReadTheBandAbove) {
  const BandTable ltv = default_credit_model().ltv_default;
  EXPECT_EQ(band_value(ltv, 0.5999), 0.45);
  EXPECT_EQ(band_value(ltv, 0.6), 0.7);
  EXPECT_EQ(band_value(ltv, 0.8), 1.4);
  EXPECT_EQ(band_value(ltv, 1.25), 5.5);
  EXPECT_EQ(band_value(ltv, kNaN), 1.5);
}

TEST(BandTable, Labels) {
  EXPECT_EQ(band_label(kScore, 0), "< 620");
  EXPECT_EQ(band_label(kScore, 1), "620-659");
  EXPECT_EQ(band_label(kScore, 2), "660-699");
  EXPECT_EQ(band_label(kScore, 3), ">= 700");
  EXPECT_EQ(band_label(kScore, 4), "missing");
  EXPECT_THROW(band_label(kScore, 5), std::out_of_range);

  // LTV and DTI in percent: the bounds as they are (a loan at 70% is in 70-80), no float noise.
  const BandTable ltv = default_credit_model().ltv_default;
  EXPECT_EQ(band_label(ltv, 0, 100), "< 60");
  EXPECT_EQ(band_label(ltv, 2, 100), "70-80");
  EXPECT_EQ(band_label(ltv, 6, 100), "110-125");
  EXPECT_EQ(band_label(ltv, 7, 100), ">= 125");
  EXPECT_EQ(band_label(ltv, 8, 100), "missing");
  EXPECT_EQ(band_label(ltv, 2), "0.7-0.8");
  EXPECT_EQ(band_label(BandTable{{0.07, 0.43}, {1, 1, 1}, 1}, 1, 100), "7-43");

  EXPECT_EQ(band_label(BandTable{{}, {1}, 1}, 0), "all");
  EXPECT_EQ(band_label(BandTable{{}, {1}, 1}, 1), "missing");
}

TEST(CategoryTable, ListedOrMissing) {
  const CategoryTable docs = default_credit_model().documentation_default;
  EXPECT_EQ(category_value(docs, "full"), 1.0);
  EXPECT_EQ(category_value(docs, "limited"), 1.6);
  EXPECT_EQ(category_value(docs, "none"), 2.2);
  EXPECT_EQ(category_value(docs, "unknown"), 1.5);
  EXPECT_EQ(category_value(docs, ""), 1.5);
  EXPECT_EQ(category_value(docs, "Full"), 1.5);  // spellings are exact
}

// ---- Defaults
// ------------------------------------------------------------------------------------

TEST(DefaultModel, ReferenceBorrowerReadsOne) {
  // The reference borrower: score 740-779, LTV 70-80%, DTI 30-36%, full documentation, owner,
  // purchase, single family -- every default multiplier 1.
  const CreditModel m = default_credit_model();
  for (const double score : {740.0, 760.0, 779.0}) EXPECT_EQ(band_value(m.score_default, score), 1);
  for (const double ltv : {0.70, 0.75, 0.7999}) EXPECT_EQ(band_value(m.ltv_default, ltv), 1);
  for (const double dti : {0.30, 0.33, 0.3599}) EXPECT_EQ(band_value(m.dti_default, dti), 1);
  EXPECT_EQ(category_value(m.documentation_default, "full"), 1);
  EXPECT_EQ(category_value(m.occupancy_default, "owner"), 1);
  EXPECT_EQ(category_value(m.purpose_default, "purchase"), 1);
  EXPECT_EQ(category_value(m.property_default, "single_family"), 1);
  // Worse credit defaults more: multipliers fall as the score rises and rise with LTV and DTI.
  for (const BandTable* t : {&m.score_default}) {
    EXPECT_TRUE(std::is_sorted(t->multiplier.rbegin(), t->multiplier.rend()));
  }
  for (const BandTable* t : {&m.ltv_default, &m.dti_default}) {
    EXPECT_TRUE(std::is_sorted(t->multiplier.begin(), t->multiplier.end()));
  }
  // Refinancing is suppressed by low scores and negative equity.
  EXPECT_TRUE(std::is_sorted(m.score_refi.multiplier.begin(), m.score_refi.multiplier.end()));
  EXPECT_TRUE(std::is_sorted(m.ltv_refi.multiplier.rbegin(), m.ltv_refi.multiplier.rend()));
}

TEST(DefaultModel, Curves) {
  const CreditModel m = default_credit_model();
  // 60 SDA by loan age: 0.6 x 0.60% = 0.36% CDR from age 30 to 60.
  // source: DESIGN.md section 3 (SDA 100% peaks at 0.60% CDR)
  EXPECT_NEAR(curve_value(m.base_default, 45), 0.0036, 1e-15);
  EXPECT_NEAR(curve_value(m.base_default, 10), 0.6 * 0.0002 * 10, 1e-15);
  EXPECT_EQ(m.base_default.clock, CurveClock::loan_age);
  // Turnover: a seasoning ramp from 0 in month 1 to 6% CPR at age 30 (the PSA ramp's shape).
  // common practice
  EXPECT_EQ(curve_value(m.turnover, 1), 0.0);
  EXPECT_EQ(curve_value(m.turnover, 30), 0.06);
  EXPECT_EQ(curve_value(m.turnover, 200), 0.06);
  EXPECT_EQ(m.turnover.clock, CurveClock::loan_age);
}

int timeline(const CreditModel& m, std::string_view state) {
  for (const auto& [code, months] : m.timeline_months)
    if (code == state) return months;
  return -1;
}

TEST(DefaultModel, ForeclosureTimelines) {
  const CreditModel m = default_credit_model();
  // A GSE servicing guide's 2019 maximums: Georgia 330 days (non-judicial), Florida 810 and New
  // Jersey 1,530 (judicial), in months of 365.25 / 12 days, rounded.
  // source: DESIGN.md section 8
  EXPECT_EQ(timeline(m, "GA"), static_cast<int>(std::lround(330 / (365.25 / 12))));
  EXPECT_EQ(timeline(m, "FL"), static_cast<int>(std::lround(810 / (365.25 / 12))));
  EXPECT_EQ(timeline(m, "NJ"), static_cast<int>(std::lround(1530 / (365.25 / 12))));
  EXPECT_EQ(timeline(m, "GA"), 11);
  EXPECT_EQ(timeline(m, "FL"), 27);
  EXPECT_EQ(timeline(m, "NJ"), 50);
  // Judicial states are slower than non-judicial ones.
  // from memory
  for (const char* judicial : {"NY", "IL", "PA", "OH", "CT"})
    for (const char* non_judicial : {"CA", "TX", "AZ", "GA", "VA"})
      EXPECT_GT(timeline(m, judicial), timeline(m, non_judicial)) << judicial << non_judicial;
  EXPECT_EQ(m.default_timeline_months, 18);
  // Every state and DC once.
  std::set<std::string> codes;
  for (const auto& [code, months] : m.timeline_months) {
    EXPECT_TRUE(codes.insert(code).second) << code;
    EXPECT_GE(months, 9);
    EXPECT_LE(months, 50);
  }
  EXPECT_EQ(codes.size(), 51u);
}

// Severity as curves.h defines it (CreditModel), for a loan defaulting in month t.
double severity(const CreditModel& m, const std::vector<double>& index, double value,
                double balance, double net_rate, int t, int timeline) {
  const double sale = value * index[t + timeline] * (1 - m.distressed_discount);
  const double proceeds = sale * (1 - m.sale_cost) - m.foreclosure_cost -
                          m.carrying_cost * value * index[t] * timeline / 12.0;
  return std::max(0.0, 1 - proceeds / balance) + net_rate * timeline / 12.0;
}

TEST(DefaultModel, SeverityInTheReportedRangeInADownturn) {
  // A $200,000 loan at 80% LTV and a 6% net rate defaulting in month 1 of the severe downturn,
  // with the default timeline and Florida's. First-lien severities of 30-60% of balance were
  // commonly reported in the 2008 downturn.
  // source: DESIGN.md section 8 (industry policy papers, 2008)
  const CreditModel m = default_credit_model();
  const Scenario severe = find_scenario(default_scenarios(), "severe_downturn");
  const std::vector<double> index = house_price_index(severe, 120);
  const double typical = severity(m, index, 250000, 200000, 0.06, 1, m.default_timeline_months);
  EXPECT_GE(typical, 0.30);
  EXPECT_LE(typical, 0.60);
  // A slow judicial state costs more: more months of carrying costs and lost interest.
  EXPECT_GT(severity(m, index, 250000, 200000, 0.06, 1, timeline(m, "FL")), typical);
  // Rising prices leave the sale discount, costs and lost interest: well under the downturn's.
  const std::vector<double> base =
      house_price_index(find_scenario(default_scenarios(), "base"), 120);
  EXPECT_LT(severity(m, base, 250000, 200000, 0.06, 1, 18), typical - 0.10);
}

TEST(DefaultModel, CategoriesAreTheTapesSpellings) {
  // Each table takes exactly the spellings tape/ writes (tape/tape.h to_string), "unknown" aside.
  const CreditModel m = default_credit_model();
  const auto names = [](const CategoryTable& table) {
    std::set<std::string> out;
    for (const auto& [name, multiplier] : table.multiplier) out.insert(name);
    return out;
  };
  const auto spelled = [](auto... values) {
    return std::set<std::string>{std::string(to_string(values))...};
  };
  EXPECT_EQ(names(m.documentation_default),
            spelled(Documentation::full, Documentation::limited, Documentation::none));
  EXPECT_EQ(names(m.occupancy_default),
            spelled(Occupancy::owner, Occupancy::second_home, Occupancy::investor));
  EXPECT_EQ(names(m.purpose_default),
            spelled(Purpose::purchase, Purpose::rate_term_refi, Purpose::cash_out_refi));
  EXPECT_EQ(names(m.property_default),
            spelled(PropertyType::single_family, PropertyType::condo, PropertyType::pud,
                    PropertyType::two_to_four, PropertyType::manufactured, PropertyType::coop));
  std::set<std::string> statuses;
  for (const auto& [status, roll] : m.delinquency_roll) statuses.insert(status);
  EXPECT_EQ(statuses, spelled(Delinquency::dq30, Delinquency::dq60, Delinquency::dq90_plus,
                              Delinquency::foreclosure));
  // And the file takes each of them (the parser keeps its own list of spellings).
  const CreditModel all = parse(R"({
    "documentation_default": {"full": 1, "limited": 2, "none": 3, "missing": 4},
    "occupancy_default": {"owner": 1, "second_home": 2, "investor": 3, "missing": 4},
    "purpose_default": {"purchase": 1, "rate_term_refi": 2, "cash_out_refi": 3, "missing": 4},
    "property_default": {"single_family": 1, "condo": 2, "pud": 3, "two_to_four": 4,
                         "manufactured": 5, "coop": 6, "missing": 7},
    "delinquency_roll": {"30": {"default_share": 1, "months": 1},
      "60": {"default_share": 1, "months": 1}, "90+": {"default_share": 1, "months": 1},
      "foreclosure": {"default_share": 1, "months": 1}}})");
  EXPECT_EQ(category_value(all.property_default, to_string(PropertyType::coop)), 6);
  EXPECT_EQ(all.delinquency_roll.size(), 4u);
}

// ---- The model file
// ------------------------------------------------------------------------------

TEST(ModelFile, DefaultsRoundTripExactly) {
  const CreditModel defaults = default_credit_model();
  const std::string text = credit_model_json(defaults);
  EXPECT_EQ(parse(text), defaults);
  // Every field is written: read over an empty model, the file alone gives the defaults.
  EXPECT_EQ(parse(text, CreditModel{}), defaults);
  // The numbers are the short ones a person writes (percents, points, dollars).
  for (
      const std::string_view piece :
      {R"("base_default": "sda:60")", R"("upper": [60, 70, 80, 90, 100, 110, 125])",
       R"("upper": [30, 36, 43, 50])", R"("turnover": "cpr:0..6/30@age")",
       R"("refi_midpoint": 0.75)", R"("refi_width": 0.25)", R"("burnout": 4)",
       R"("foreclosure_cost": 6000)", R"("90+": {"default_share": 70, "months": 3})",
       R"("occupancy_default": {"owner": 1, "second_home": 1.2, "investor": 1.6, "missing": 1.2})"})
    EXPECT_NE(text.find(piece), std::string::npos) << piece << "\n" << text;
}

TEST(ModelFile, AnyModelRoundTripsExactly) {
  CreditModel m;
  m.base_default = vector_curve({1.0 / 3, 0.0011, 2.0 / 3e3}, CurveClock::loan_age);
  m.score_default = {{601.5, 1.0 / 3 + 700}, {1.0 / 7, 2, 0}, 0.1 + 0.2};
  m.ltv_default = {{0.123456789012345, 0.3 + 0.6, 1.0000000000000002}, {1, 2, 3, 4}, 1};
  m.dti_default = {{}, {1.7}, 0.9};
  m.occupancy_default = {{{"investor", 2.5}, {"owner", 1.0 / 3}}, 1};  // file order kept
  m.delinquency_roll = {{"foreclosure", {1.0 / 3, 7}}, {"30", {0.0, 1}}};
  m.cured_multiplier = 0.1 + 0.7;
  m.assumed_ltv = 0.857142857142857;
  m.distressed_discount = 0.1 + 0.2;
  m.sale_cost = 1e-7;
  m.carrying_cost = 0.011;
  m.foreclosure_cost = 4321.123456789;
  m.timeline_months = {{"ZZ", 0}, {"AA", 120}};
  m.default_timeline_months = 0;
  m.turnover = standard_curve(CurveShape::psa, 1.5, CurveClock::projection_month);
  m.refi_max_cpr = 1;
  m.refi_midpoint = -0.0075;
  m.refi_width = 0.0001;
  m.burnout = 0.999;
  m.score_refi = {{}, {1}, 1};
  m.ltv_refi = {{0.01, 10}, {0, 0, 0}, 0};
  m.ltv_turnover = {{0.5}, {1, 2}, 3};
  EXPECT_EQ(parse(credit_model_json(m), CreditModel{}), m) << credit_model_json(m);
}

TEST(ModelFile, PercentsReadTheDigitsAsWritten) {
  // The double nearest 64.46009958004499 prints as 64.460099580045, which reads as another
  // percent: the file carries the digits, and the reader takes the digits, not the double.
  const double awkward = 0.6446009958004499;
  CreditModel m = default_credit_model();
  m.sale_cost = awkward;
  const std::string text = credit_model_json(m);
  EXPECT_NE(text.find(R"("sale_cost": 64.46009958004499,)"), std::string::npos) << text;
  EXPECT_EQ(parse(text).sale_cost, awkward);
  EXPECT_EQ(parse(R"({"sale_cost": 64.46009958004499})").sale_cost, awkward);
  EXPECT_EQ(parse(R"({"sale_cost": 64.460099580045})").sale_cost, 0.64460099580045);
  EXPECT_NE(0.64460099580045, awkward);
  EXPECT_EQ(parse(R"({"sale_cost": 6.446009958004499e1})").sale_cost, awkward);
  // The same in a curve object's percents and multiples.
  EXPECT_EQ(parse(R"({"base_default": {"cdr": [64.46009958004499]}})").base_default.values,
            std::vector<double>{awkward});
  EXPECT_EQ(parse(R"({"base_default": {"sda": 64.46009958004499}})").base_default.value, awkward);
}

TEST(ModelFile, RandomPercentsRoundTripExactly) {
  // Percents are written as the digits that read back to the same double, whatever the double.
  std::mt19937_64 rng(20261201);
  std::uniform_real_distribution<double> share(0, 1), power(-9, 0);
  const CreditModel defaults = default_credit_model();
  for (int trial = 0; trial < 500; ++trial) {
    CreditModel m = defaults;
    m.distressed_discount = share(rng);
    m.sale_cost = std::pow(10.0, power(rng));
    m.carrying_cost = share(rng) * 1e-3;
    m.assumed_ltv = 0.01 + share(rng);
    m.refi_midpoint = 0.2 * (share(rng) - 0.5);
    m.burnout = share(rng);
    m.delinquency_roll[0].second.default_share = share(rng);
    double bound = 0.01;
    for (double& upper : m.ltv_default.upper) upper = bound += 0.01 + share(rng);
    m.base_default = vector_curve({share(rng), share(rng) * 1e-4}, CurveClock::loan_age);
    const std::string text = credit_model_json(m);
    const CreditModel back = parse(text);
    ASSERT_EQ(back, m) << trial << "\n" << text;
  }
}

TEST(ModelFile, KeysOverrideTheirTableWhole) {
  const CreditModel base = default_credit_model();
  const CreditModel m = parse(R"({"score_default": {"upper": [620, 700],
      "multiplier": [2.5, 1.4, 1.0], "missing": 1.8},
    "timeline_months": {"FL": 30},
    "occupancy_default": {"investor": 2.0, "missing": 1.3},
    "base_default": {"cdr": [0.1, 0.2, 0.3], "clock": "loan_age"},
    "turnover": "psa:100",
    "ltv_refi": {"upper": [80, 100], "multiplier": [1, 0.5, 0.1], "missing": 0.8},
    "assumed_ltv": 75, "sale_cost": 6.5, "refi_midpoint": -0.25, "foreclosure_cost": 7500.5,
    "default_timeline_months": 15, "cured_multiplier": 1.5,
    "description": "free text, not kept"})");
  EXPECT_EQ(m.score_default, (BandTable{{620, 700}, {2.5, 1.4, 1.0}, 1.8}));
  EXPECT_EQ(m.timeline_months, (std::vector<std::pair<std::string, int>>{{"FL", 30}}));
  EXPECT_EQ(m.occupancy_default.missing, 1.3);
  EXPECT_EQ(category_value(m.occupancy_default, "owner"), 1.3);  // the whole table is replaced
  EXPECT_EQ(m.base_default, parse_default("cdr:0.1,0.2,0.3@age"));
  EXPECT_EQ(m.turnover, parse_prepay("psa:100"));
  EXPECT_EQ(m.ltv_refi, (BandTable{{0.8, 1.0}, {1, 0.5, 0.1}, 0.8}));
  EXPECT_EQ(m.assumed_ltv, 0.75);
  EXPECT_EQ(m.sale_cost, 0.065);
  EXPECT_EQ(m.refi_midpoint, -0.0025);
  EXPECT_EQ(m.foreclosure_cost, 7500.5);
  EXPECT_EQ(m.default_timeline_months, 15);
  EXPECT_EQ(m.cured_multiplier, 1.5);
  // Everything else is the base's.
  CreditModel rest = m;
  rest.score_default = base.score_default;
  rest.timeline_months = base.timeline_months;
  rest.occupancy_default = base.occupancy_default;
  rest.base_default = base.base_default;
  rest.turnover = base.turnover;
  rest.ltv_refi = base.ltv_refi;
  rest.assumed_ltv = base.assumed_ltv;
  rest.sale_cost = base.sale_cost;
  rest.refi_midpoint = base.refi_midpoint;
  rest.foreclosure_cost = base.foreclosure_cost;
  rest.default_timeline_months = base.default_timeline_months;
  rest.cured_multiplier = base.cured_multiplier;
  EXPECT_EQ(rest, base);
  EXPECT_EQ(parse("{}"), base);
  // A percent reads as the same digits as a decimal would: 6.5% is exactly 0.065.
  EXPECT_EQ(parse(R"({"refi_width": 0.1})").refi_width, 0.001);
}

TEST(ModelFile, ExampleFile) {
  const CreditModel defaults = default_credit_model();
  const CreditModel m = load_credit_model(kExample);
  EXPECT_EQ(m.score_default, (BandTable{{600, 640, 680, 720, 760}, {8, 5, 3, 1.8, 1.2, 1}, 3}));
  EXPECT_EQ(category_value(m.documentation_default, "none"), 3.0);
  EXPECT_EQ(m.distressed_discount, 0.35);
  // Harsher than the defaults where it overrides them, the defaults elsewhere.
  EXPECT_GT(band_value(m.score_default, 610), band_value(defaults.score_default, 610));
  CreditModel rest = m;
  rest.score_default = defaults.score_default;
  rest.documentation_default = defaults.documentation_default;
  rest.distressed_discount = defaults.distressed_discount;
  EXPECT_EQ(rest, defaults);
}

struct BadModel {
  std::string_view json;
  std::string_view key;                   // AssumptionError::key
  std::optional<std::string_view> value;  // AssumptionError::value, when checked
  std::string_view fragment;              // must appear in what()
};

void expect_refused(const BadModel& c) {
  SCOPED_TRACE(c.json);
  try {
    parse(c.json);
    ADD_FAILURE() << "accepted";
  } catch (const AssumptionError& e) {
    EXPECT_EQ(e.source, "m.json");
    EXPECT_EQ(e.key, c.key);
    if (c.value) {
      EXPECT_EQ(e.value, *c.value);
    }
    EXPECT_NE(std::string_view(e.what()).find(c.fragment), std::string_view::npos) << e.what();
  }
}

constexpr std::string_view kBand = R"("multiplier": [1, 1, 1, 1], "missing": 1)";

TEST(ModelFile, ErrorsNameTheKeyAndValue) {
  const std::string bad_order =
      fmt::format(R"({{"score_default": {{"upper": [620, 660, 650], {}}}}})", kBand);
  const std::string bad_bound =
      fmt::format(R"({{"score_default": {{"upper": [620, "x", 700], {}}}}})", kBand);
  const std::string decimal_ltv =
      fmt::format(R"({{"ltv_default": {{"upper": [0.6, 0.7, 0.8], {}}}}})", kBand);
  const std::string equal_ltv =
      fmt::format(R"({{"ltv_refi": {{"upper": [80, 90, 90], {}}}}})", kBand);
  const BadModel cases[] = {
      {R"({"scores": {}})", "scores", "{}",
       "m.json key scores, value '{}': unknown key; the keys "
       "are base_default, score_default"},
      {bad_order, "score_default.upper[2]", "650",
       "m.json key score_default.upper[2], value '650': must be above the bound before it (660); "
       "bounds are strictly ascending"},
      {bad_bound, "score_default.upper[1]", "x", "must be a bound in score points, from 0 to 1000"},
      {decimal_ltv, "ltv_default.upper[0]", "0.6",
       "must be a bound in percent (80 = 80%), from 1 to 1000"},
      {equal_ltv, "ltv_refi.upper[2]", "90", "must be above the bound before it (90)"},
      {R"({"score_default": {"upper": [1e999], "multiplier": [1, 1], "missing": 1}})", "", "",
       "not valid JSON"},
      {R"({"dti_default": {"upper": [30, 40], "multiplier": [1, 1, 1, 1], "missing": 1}})",
       "dti_default.multiplier", "[1,1,1,1]",
       "has 4 multipliers; 2 bounds need 3 (below the first bound, between each two, at or above "
       "the last)"},
      {R"({"dti_default": {"upper": [30], "multiplier": [1, -1], "missing": 1}})",
       "dti_default.multiplier[1]", "-1", "must be a multiplier, from 0 to 1000"},
      {R"({"dti_default": {"upper": [30], "multiplier": [], "missing": 1}})",
       "dti_default.multiplier", "[]", "must be a non-empty array of multipliers"},
      {R"({"dti_default": {"upper": 30, "multiplier": [1], "missing": 1}})", "dti_default.upper",
       "30", "must be an array of bounds in ascending order"},
      {R"({"score_default": {"upper": [620], "multiplier": [1, 1], "missing": "x"}})",
       "score_default.missing", "x", "must be a multiplier"},
      {R"({"score_default": {"upper": [620], "multiplier": [1, 1]}})", "score_default",
       std::nullopt, "lacks missing; a band table needs upper, multiplier and missing"},
      {R"({"score_default": {"multiplier": [1], "missing": 1}})", "score_default", std::nullopt,
       "lacks upper"},
      {R"({"score_default": {"upper": [], "lower": [], "multiplier": [1], "missing": 1}})",
       "score_default.lower", "[]",
       "unknown key; a band table takes upper, multiplier and missing"},
      {R"({"score_default": [620, 700]})", "score_default", "[620,700]",
       "must be an object such as"},
      {R"({"documentation_default": {"stated": 2, "missing": 1}})", "documentation_default.stated",
       "2",
       "unknown key; documentation_default takes full, limited, none and missing (the tape's "
       "spellings)"},
      {R"({"occupancy_default": {"owner": 1}})", "occupancy_default", std::nullopt,
       "lacks missing: the multiplier of a loan whose occupancy is not on the tape"},
      {R"({"property_default": {"condo": -2, "missing": 1}})", "property_default.condo", "-2",
       "must be a multiplier"},
      {R"({"purpose_default": {"unknown": 1, "missing": 1}})", "purpose_default.unknown", "1",
       "unknown key"},
      {R"({"delinquency_roll": {"current": {"default_share": 1, "months": 1}}})",
       "delinquency_roll.current", std::nullopt,
       "unknown key; delinquency_roll takes 30, 60, 90+, foreclosure"},
      {R"({"delinquency_roll": {"60": {"default_share": 120, "months": 4}}})",
       "delinquency_roll.60.default_share", "120",
       "must be a percent of the balance (40 = 40%), from 0 to 100"},
      {R"({"delinquency_roll": {"60": {"default_share": 40, "months": 0}}})",
       "delinquency_roll.60.months", "0", "must be months, a whole number from 1 to 120"},
      {R"({"delinquency_roll": {"60": {"default_share": 40, "months": 2.5}}})",
       "delinquency_roll.60.months", "2.5", "a whole number"},
      {R"({"delinquency_roll": {"60": {"default_share": 40}}})", "delinquency_roll.60",
       std::nullopt, "lacks months"},
      {R"({"delinquency_roll": {"60": {"share": 40, "months": 1}}})", "delinquency_roll.60.share",
       "40", "unknown key; a roll takes default_share and months"},
      {R"({"delinquency_roll": {"60": 40}})", "delinquency_roll.60", "40",
       "must be an object such as"},
      {R"({"timeline_months": {"Fl": 27}})", "timeline_months.Fl", "Fl",
       "is not a state postal code (two capital letters, such as FL)"},
      {R"({"timeline_months": {"FLA": 27}})", "timeline_months.FLA", "FLA", "postal code"},
      {R"({"timeline_months": {"FL": 121}})", "timeline_months.FL", "121",
       "must be months from default to liquidation, a whole number from 0 to 120"},
      {R"({"timeline_months": {"FL": 12.5}})", "timeline_months.FL", "12.5", "a whole number"},
      {R"({"timeline_months": [27]})", "timeline_months", "[27]", "must be an object such as"},
      {R"({"default_timeline_months": -1})", "default_timeline_months", "-1",
       "a whole number from 0 to 120"},
      {R"({"assumed_ltv": 0.8})", "assumed_ltv", "0.8",
       "must be an LTV in percent (80 = 80%), from 1 to 200"},
      {R"({"sale_cost": 101})", "sale_cost", "101",
       "must be a percent of the sale price, from 0 to 100"},
      {R"({"distressed_discount": -1})", "distressed_discount", "-1", "from 0 to 100"},
      {R"({"carrying_cost": "3"})", "carrying_cost", "3",
       "must be a percent of the property value a year"},
      {R"({"foreclosure_cost": -5})", "foreclosure_cost", "-5",
       "must be dollars per loan, from 0 to 10000000"},
      {R"({"refi_max_cpr": 101})", "refi_max_cpr", "101", "must be a CPR in annual percent"},
      {R"({"refi_width": 0})", "refi_width", "0",
       "must be an incentive in percent (0.25 = 25 bp), from 0.01 to 20"},
      {R"({"refi_midpoint": "0.75"})", "refi_midpoint", "0.75",
       "must be an incentive in percent (0.75 = 75 bp), from -20 to 20"},
      {R"({"burnout": null})", "burnout", "null", "must be a percent lost a month"},
      {R"({"cured_multiplier": true})", "cured_multiplier", "true", "must be a multiplier"},
      {R"({"base_default": "cpr:1"})", "base_default", "cpr:1", "unknown form; use cdr:RATE"},
      {R"({"base_default": "sda:20000"})", "base_default", "sda:20000", "peaks at 120% CDR"},
      {R"({"base_default": {"cdr": [1, 101]}})", "base_default.cdr[1]", "101",
       "CDR 101% is above 100%"},
      {R"({"base_default": {"cdr": []}})", "base_default.cdr", "[]",
       "must be a percent or a non-empty array of percents by month"},
      {R"({"base_default": {"cdr": [1], "sda": 60}})", "base_default", std::nullopt,
       "give one, not both, of cdr or sda"},
      {R"({"base_default": {"clock": "loan_age"}})", "base_default", std::nullopt,
       "needs cdr or sda"},
      {R"({"base_default": {"cdr": [1], "clock": "age"}})", "base_default.clock", "age",
       R"(must be "loan_age" or "projection_month")"},
      {R"({"base_default": 5})", "base_default", "5", R"(must be text such as "sda:60")"},
      {R"({"turnover": {"psa": 2000}})", "turnover.psa", "2000", "psa:2000 peaks at 120% CPR"},
      {R"({"turnover": {"cdr": [1]}})", "turnover.cdr", "[1]",
       "unknown key; a curve object takes cpr or psa and clock"},
      {R"({"turnover": "cpr:0..6/30@aeg"})", "turnover", "cpr:0..6/30@aeg", "unknown clock"},
      {R"({"description": 5})", "description", "5", "must be text"},
      // Syntax, duplicates and the document's shape name the file.
      {R"({"sale_cost": 6, "sale_cost": 7})", "sale_cost", "",
       "m.json key sale_cost: duplicate key; each key may appear only once"},
      {R"({"timeline_months": {"FL": 27, "FL": 28}})", "timeline_months.FL", "", "duplicate key"},
      {R"({"sale_cost": 6,})", "", "", "m.json: not valid JSON at byte"},
      {R"([{"sale_cost": 6}])", "", "", "m.json: holds an array; it must hold one JSON object"},
  };
  for (const BadModel& c : cases) expect_refused(c);
}

TEST(ModelFile, UnreadableFile) {
  const std::string path = "/nonexistent-dir/model.json";
  try {
    load_credit_model(path);
    FAIL() << "accepted";
  } catch (const AssumptionError& e) {
    EXPECT_EQ(e.source, path);
    EXPECT_EQ(e.key, "");
    EXPECT_NE(std::string_view(e.what()).find("cannot open the model file"), std::string::npos)
        << e.what();
  }
}

}  // namespace
