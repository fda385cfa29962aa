// Tests of kick-outs: the break-even default probability, the credit box (reasons per screen,
// missing fields, the file and its errors), each loan's decision, and the bid without the
// kicked-out loans (kept + kicked = the pool; the same as pricing the kept loans alone).
#include <gtest/gtest.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <numeric>
#include <sstream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "pricing/pricing.h"
#include "report/report.h"
#include "tests/support/loans.h"

namespace poolbid {
namespace {

using testing_support::kNaN;
using testing_support::make_loans;
using testing_support::TestLoan;
using std::chrono::day;
using std::chrono::month;
using std::chrono::year;

constexpr Date kCutoff{year{2026}, month{12}, day{1}};

BidRequest yield_request(double bey, Assumptions a) {
  BidRequest r;
  r.target = BidTarget::yield;
  r.value = bey;
  r.settlement = Settlement{kCutoff, Date{year{2026}, month{12}, day{17}}, 17};
  r.assumptions = std::move(a);
  r.key_rate_years = {};  // not what these tests are about
  return r;
}

Assumptions with_defaults() {
  Assumptions a;
  a.prepay = standard_curve(CurveShape::psa, 1.5);
  a.default_rate = standard_curve(CurveShape::sda, 1.0);
  a.severity = constant_curve(0.40);
  a.lag_months = 12;
  a.delinquent_default = true;  // loans 90+ days delinquent default in month 1
  return a;
}

// Ten alike loans (one coupon, term and age) with balances from $150,000 to $375,000.
std::vector<TestLoan> alike_loans() {
  std::vector<TestLoan> loans;
  for (int i = 0; i < 10; ++i)
    loans.push_back(TestLoan{.id = "L" + std::to_string(i), .upb = 150'000.0 + 25'000.0 * i,
                             .rate = 0.0675});
  return loans;
}

// A box that screens nothing.
CreditBox open_box() {
  CreditBox box;
  box.source = "test";
  return box;
}

// ---- Decision economics -------------------------------------------------------------------------

TEST(Kickouts, BreakEvenDefaultProbability) {
  // common practice: 5% margin against a 50% loss on a bad loan -> p* = 5 / 55, about 9%.
  EXPECT_NEAR(break_even_default_probability(0.05, 0.50), 0.0909090909090909, 1e-15);
  const DecisionEconomics economics;
  EXPECT_DOUBLE_EQ(economics.margin, 0.05);
  EXPECT_DOUBLE_EQ(economics.bad_loan_loss, 0.50);
  // identity: at p* the expected loss of approving equals the expected margin given up.
  const double p = break_even_default_probability(0.03, 0.35);
  EXPECT_NEAR(p * 0.35, (1 - p) * 0.03, 1e-15);
  EXPECT_DOUBLE_EQ(break_even_default_probability(0.05, 0.0), 1.0);  // nothing to lose
  EXPECT_THROW(break_even_default_probability(0.0, 0.0), std::invalid_argument);
  EXPECT_THROW(break_even_default_probability(-0.01, 0.5), std::invalid_argument);
  EXPECT_THROW(break_even_default_probability(0.05, kNaN), std::invalid_argument);
}

// ---- The credit box -----------------------------------------------------------------------------

TEST(Kickouts, BoxReasonsForEachScreen) {
  std::vector<TestLoan> t(9, TestLoan{.id = "", .upb = 200'000, .rate = 0.065});
  for (std::size_t i = 0; i < t.size(); ++i) t[i].id = "B" + std::to_string(i);
  t[1].score = 598;
  t[2].ltv = 0.97;
  t[2].cltv = 0.97;
  t[3].cltv = 1.0125;
  t[4].dti = 0.523;
  t[6].occupancy = Occupancy::investor;
  t[8].state = "NY";
  LoanArrays loans = make_loans(t);
  loans.documentation[5] = Documentation::none;
  loans.property_type[7] = PropertyType::manufactured;

  CreditBox box = default_credit_box();
  box.occupancy = {Occupancy::owner, Occupancy::second_home};
  box.states = {*state_index("CA"), *state_index("TX")};
  EXPECT_TRUE(box_reasons(box, loans, 0).empty());
  using V = std::vector<std::string>;
  EXPECT_EQ(box_reasons(box, loans, 1), V{"score 598 below 620"});
  EXPECT_EQ(box_reasons(box, loans, 2), V{"LTV 97.0% above 95.0%"});
  EXPECT_EQ(box_reasons(box, loans, 3), V{"CLTV 101.2% above 100.0%"});
  EXPECT_EQ(box_reasons(box, loans, 4), V{"DTI 52.3% above 50.0%"});
  EXPECT_EQ(box_reasons(box, loans, 5), V{"documentation none not allowed"});
  EXPECT_EQ(box_reasons(box, loans, 6), V{"occupancy investor not allowed"});
  EXPECT_EQ(box_reasons(box, loans, 7), V{"property type manufactured not allowed"});
  EXPECT_EQ(box_reasons(box, loans, 8), V{"state NY not allowed"});
  EXPECT_THROW(box_reasons(box, loans, 9), std::out_of_range);

  // Every screen a loan fails, in screen order; an open box screens nothing.
  loans.credit_score[2] = 600;
  EXPECT_EQ(box_reasons(box, loans, 2), (V{"score 600 below 620", "LTV 97.0% above 95.0%"}));
  for (std::size_t i = 0; i < loans.size(); ++i) EXPECT_TRUE(box_reasons(open_box(), loans, i).empty());
}

TEST(Kickouts, BoxLimitsAreInclusiveAndPrintedApart) {
  std::vector<TestLoan> t = {{.id = "AT", .upb = 1e5, .rate = 0.06, .score = 620, .ltv = 0.95,
                              .cltv = 1.0, .dti = 0.50},
                             {.id = "JUST", .upb = 1e5, .rate = 0.06, .ltv = 0.9504}};
  const LoanArrays loans = make_loans(t);
  const CreditBox box = default_credit_box();
  EXPECT_TRUE(box_reasons(box, loans, 0).empty());  // at each limit: inside
  // 95.04% against 95% reads 95.0% for both at one place: more places until they differ.
  EXPECT_EQ(box_reasons(box, loans, 1), std::vector<std::string>{"LTV 95.04% above 95.00%"});
}

TEST(Kickouts, MissingFieldsAreOutsideUnlessTheBoxSaysInside) {
  std::vector<TestLoan> t = {{.id = "M", .upb = 1e5, .rate = 0.06, .score = kNaN, .ltv = kNaN,
                              .cltv = kNaN, .dti = kNaN, .state = ""}};
  LoanArrays loans = make_loans(t);
  loans.documentation[0] = Documentation::unknown;
  loans.occupancy[0] = Occupancy::unknown;
  loans.property_type[0] = PropertyType::unknown;
  CreditBox box = default_credit_box();
  box.occupancy = {Occupancy::owner};
  box.states = {*state_index("CA")};
  EXPECT_EQ(box_reasons(box, loans, 0),
            (std::vector<std::string>{"score not on the tape", "LTV not on the tape",
                                      "CLTV not on the tape", "DTI not on the tape",
                                      "documentation not on the tape", "occupancy not on the tape",
                                      "property type not on the tape", "state not on the tape"}));
  box.missing_inside = true;
  EXPECT_TRUE(box_reasons(box, loans, 0).empty());
  // A field the box does not screen is never a reason, missing or not.
  EXPECT_TRUE(box_reasons(open_box(), loans, 0).empty());
}

TEST(Kickouts, TheDemoBoxFileIsTheDefaultBox) {
  const std::string path = std::string(POOLBID_SOURCE_DIR) + "/demo-pools/credit-box.json";
  CreditBox file = load_credit_box(path);
  EXPECT_EQ(file.source, path);
  CreditBox expected = default_credit_box();
  expected.source = file.source;
  expected.description = file.description;
  EXPECT_EQ(file, expected);
  EXPECT_DOUBLE_EQ(*expected.min_score, 620);
  EXPECT_DOUBLE_EQ(*expected.max_ltv, 0.95);
  EXPECT_DOUBLE_EQ(*expected.max_cltv, 1.00);
  EXPECT_DOUBLE_EQ(*expected.max_dti, 0.50);
  EXPECT_TRUE(expected.occupancy.empty());
  EXPECT_TRUE(expected.states.empty());
  EXPECT_FALSE(expected.missing_inside);
}

TEST(Kickouts, BoxFileReadsEveryKey) {
  const CreditBox box = parse_credit_box(
      R"({"description": "strict", "min_score": 700, "max_ltv": 80, "max_cltv": 90.5,
          "max_dti": 43, "documentation": ["full"], "occupancy": ["owner", "second_home"],
          "property_types": ["single_family", "pud"], "states": ["CA", "TX"],
          "missing_fields": "inside"})",
      "box.json");
  EXPECT_EQ(box.source, "box.json");
  EXPECT_EQ(box.description, "strict");
  EXPECT_DOUBLE_EQ(*box.min_score, 700);
  EXPECT_EQ(*box.max_ltv, 0.80);
  EXPECT_EQ(*box.max_cltv, 0.905);
  EXPECT_EQ(*box.max_dti, 0.43);
  EXPECT_EQ(box.documentation, std::vector<Documentation>{Documentation::full});
  EXPECT_EQ(box.occupancy, (std::vector<Occupancy>{Occupancy::owner, Occupancy::second_home}));
  EXPECT_EQ(box.property_types,
            (std::vector<PropertyType>{PropertyType::single_family, PropertyType::pud}));
  EXPECT_EQ(box.states, (std::vector<std::uint8_t>{*state_index("CA"), *state_index("TX")}));
  EXPECT_TRUE(box.missing_inside);
  // Keys left out or null screen nothing.
  const CreditBox open = parse_credit_box(R"({"min_score": null, "states": null})", "open.json");
  EXPECT_FALSE(open.min_score);
  EXPECT_TRUE(open.states.empty());
  EXPECT_FALSE(open.missing_inside);
}

TEST(Kickouts, BoxFileErrorsNameTheFileKeyAndValue) {
  struct Case {
    std::string json, key, value, words;
  };
  const std::vector<Case> cases = {
      {R"({"min_scor": 620})", "min_scor", "620", "unknown key"},
      {R"({"min_score": 620, "min_score": 640})", "min_score", "", "duplicate key"},
      {R"({"min_score": 900})", "min_score", "900", "300 to 850"},
      {R"({"min_score": "620"})", "min_score", "620", "must be a number"},
      {R"({"max_ltv": 0.95})", "max_ltv", "0.95", "not 0.95"},
      {R"({"max_dti": 140})", "max_dti", "140", "at most 100"},
      {R"({"documentation": []})", "documentation", "[]", "non-empty"},
      {R"({"documentation": ["full", "stated"]})", "documentation[1]", "stated", "not one of"},
      {R"({"occupancy": ["owner", "owner"]})", "occupancy[1]", "owner", "listed twice"},
      {R"({"property_types": ["unknown"]})", "property_types[0]", "unknown", "not one of"},
      {R"({"states": ["CA", "XX"]})", "states[1]", "XX", "USPS"},
      {R"({"states": ["ca"]})", "states[0]", "ca", "USPS"},
      {R"({"states": "CA"})", "states", "CA", "array"},
      {R"({"missing_fields": "maybe"})", "missing_fields", "maybe", "outside"},
      {R"({"description": 5})", "description", "5", "text"},
      {R"([1, 2])", "", "", "holds an array"},
      {R"({"min_score": 620)", "", "", "not valid JSON"},
  };
  for (const Case& c : cases) {
    try {
      parse_credit_box(c.json, "buyer.json");
      ADD_FAILURE() << "accepted " << c.json;
    } catch (const AssumptionError& e) {
      EXPECT_EQ(e.source, "buyer.json") << c.json;
      EXPECT_EQ(e.key, c.key) << c.json;
      EXPECT_EQ(e.value, c.value) << c.json;
      const std::string what = e.what();
      EXPECT_NE(what.find("buyer.json"), std::string::npos) << what;
      EXPECT_NE(what.find(c.words), std::string::npos) << what;
      if (!c.key.empty()) {
        EXPECT_NE(what.find("key " + c.key), std::string::npos) << what;
      }
    }
  }
  try {
    load_credit_box("/nonexistent/box.json");
    ADD_FAILURE() << "read a missing file";
  } catch (const AssumptionError& e) {
    EXPECT_EQ(e.source, "/nonexistent/box.json");
    EXPECT_NE(std::string(e.what()).find("cannot open the credit box file"), std::string::npos)
        << e.what();
  }
}

// ---- Decisions and the bid without the kick-outs ------------------------------------------------

TEST(Kickouts, ALoanCertainToDefaultIsKickedAndTheBidWithoutItIsHigher) {
  std::vector<TestLoan> t = alike_loans();
  t[3].delinquency = Delinquency::dq90_plus;  // defaults in month 1 (delinquent_default)
  const LoanArrays loans = make_loans(t);
  const YieldCurve curve = flat_yield_curve(0.04, kCutoff);
  const BidRequest request = yield_request(0.065, with_defaults());
  const KickoutResult r = price_with_kickouts(loans, curve, request, open_box());

  const LoanDecision& bad = r.loans[3];
  EXPECT_NEAR(bad.default_probability, 1.0, 1e-12);
  EXPECT_TRUE(bad.modelled_severity);
  EXPECT_NEAR(bad.severity, 0.40, 1e-12);  // the assumptions' severity, no advancing
  // common practice: p* = m / (m + s) with the loan's own severity.
  EXPECT_NEAR(bad.break_even, 0.05 / (0.05 + 0.40), 1e-12);
  EXPECT_TRUE(bad.above_break_even);
  EXPECT_TRUE(bad.below_price);
  EXPECT_FALSE(bad.outside_box);
  EXPECT_TRUE(bad.kicked());
  EXPECT_EQ(r.kicked, std::vector<std::uint32_t>{3});
  EXPECT_NEAR(r.break_even, 0.05 / 0.55, 1e-15);

  // The others are alike: values per 100 within rounding of one another, none kicked.
  for (std::size_t i = 0; i < loans.size(); ++i) {
    if (i == 3) continue;
    EXPECT_FALSE(r.loans[i].kicked()) << i;
    EXPECT_LT(r.loans[i].default_probability, r.loans[i].break_even);
  }
  ASSERT_TRUE(r.without);
  EXPECT_GT(r.without->clean_price, r.whole.clean_price);
  EXPECT_LT(r.without->expected_loss_pct, r.whole.expected_loss_pct);
  EXPECT_NEAR(r.without->loss_adjusted.bey, 0.065, 1e-10);  // the same target
  EXPECT_DOUBLE_EQ(r.without->cutoff_balance, r.whole.cutoff_balance - loans.current_balance[3]);
}

TEST(Kickouts, KeptAndKickedAreEveryLoanOnce) {
  std::vector<TestLoan> t;
  for (int i = 0; i < 40; ++i) {
    TestLoan l{.id = "P" + std::to_string(i), .upb = 80'000.0 + 7'500.0 * i,
               .rate = 0.055 + 0.0025 * (i % 7)};
    l.score = 560 + 7 * i;
    l.ltv = l.cltv = 0.70 + 0.007 * i;
    l.age = i % 13;
    l.remaining = 360 - l.age;
    if (i % 9 == 0) l.delinquency = Delinquency::foreclosure;
    t.push_back(l);
  }
  const LoanArrays loans = make_loans(t);
  const YieldCurve curve = flat_yield_curve(0.042, kCutoff);
  const KickoutResult r =
      price_with_kickouts(loans, curve, yield_request(0.07, with_defaults()), default_credit_box());

  std::vector<std::uint32_t> all = r.kept;
  all.insert(all.end(), r.kicked.begin(), r.kicked.end());
  std::sort(all.begin(), all.end());
  std::vector<std::uint32_t> expected(loans.size());
  std::iota(expected.begin(), expected.end(), 0u);
  EXPECT_EQ(all, expected);
  EXPECT_EQ(r.kept_total.loans + r.kicked_total.loans, loans.size());
  EXPECT_NEAR(r.kept_total.upb + r.kicked_total.upb, r.whole.cutoff_balance, 1e-6);
  EXPECT_FALSE(r.kept.empty());
  EXPECT_FALSE(r.kicked.empty());

  // Each loan's flags follow its numbers; the tallies count them.
  std::size_t outside = 0, below = 0, above = 0;
  double allocated = 0;
  for (std::size_t i = 0; i < loans.size(); ++i) {
    const LoanDecision& d = r.loans[i];
    EXPECT_EQ(d.outside_box, !box_reasons(r.box, loans, i).empty()) << i;
    EXPECT_EQ(d.box_reasons, box_reasons(r.box, loans, i)) << i;
    EXPECT_EQ(d.below_price, d.value_price < d.allocated_price - 1e-7) << i;
    EXPECT_EQ(d.above_break_even, d.default_probability > d.break_even) << i;
    EXPECT_NEAR(d.allocated_price, 100 * d.allocated / loans.current_balance[i], 1e-9);
    allocated += d.allocated;
    EXPECT_NEAR(d.value_price, 100 * d.value / loans.current_balance[i], 1e-9);
    EXPECT_NEAR(d.expected_loss, r.whole.flows.loans.loss[i], 1e-9);
    EXPECT_EQ(std::find(r.kicked.begin(), r.kicked.end(), i) != r.kicked.end(), d.kicked()) << i;
    outside += d.outside_box;
    below += d.below_price;
    above += d.above_break_even;
  }
  EXPECT_EQ(r.outside_box.loans, outside);
  EXPECT_EQ(r.below_price.loans, below);
  EXPECT_NEAR(allocated, r.whole.dirty_value, 1e-6);  // identity: the allocations are the bid
  EXPECT_EQ(r.above_break_even.loans, above);
  EXPECT_EQ(r.by_screen.size(), kBoxScreenCount);
  EXPECT_GT(r.by_screen[static_cast<std::size_t>(BoxScreen::score)].loans, 0u);  // scores < 620
  // identity: the loans' values add up to the pool's dirty value.
  double values = 0;
  for (const LoanDecision& d : r.loans) values += d.value;
  EXPECT_NEAR(values, r.whole.dirty_value, 1e-6 * r.whole.dirty_value);
}

TEST(Kickouts, TheBidWithoutIsTheKeptLoansPricedAlone) {
  std::vector<TestLoan> t = alike_loans();
  for (std::size_t i = 0; i < t.size(); ++i) t[i].rate = 0.06 + 0.0025 * static_cast<double>(i % 4);
  t[1].score = 590;
  t[6].delinquency = Delinquency::dq90_plus;
  const LoanArrays loans = make_loans(t);
  const YieldCurve curve = flat_yield_curve(0.04, kCutoff);
  for (const BidTarget target : {BidTarget::yield, BidTarget::spread, BidTarget::price}) {
    BidRequest request = yield_request(0.068, with_defaults());
    request.target = target;
    if (target == BidTarget::spread) request.value = 0.0225;
    if (target == BidTarget::price) request.value = 97.5;
    const KickoutResult r = price_with_kickouts(loans, curve, request, default_credit_box());
    ASSERT_TRUE(r.without);
    const BidResult alone = price_pool(select_loans(loans, r.kept), curve, request);
    // identity: the same request on the same loans.
    EXPECT_EQ(r.without->clean_price, alone.clean_price);
    EXPECT_EQ(r.without->dirty_value, alone.dirty_value);
    EXPECT_EQ(r.without->loss_adjusted.bey, alone.loss_adjusted.bey);
    EXPECT_EQ(r.without->loss_adjusted.z_spread, alone.loss_adjusted.z_spread);
    EXPECT_EQ(r.without->expected_loss, alone.expected_loss);
    EXPECT_EQ(r.without->cutoff_balance, r.kept_total.upb);
    // The whole pool's bid is price_pool's on every loan.
    const BidResult whole = price_pool(loans, curve, request);
    EXPECT_EQ(r.whole.clean_price, whole.clean_price);
    if (target == BidTarget::price) {
      EXPECT_DOUBLE_EQ(r.without->clean_price, 97.5);
    }
  }
}

TEST(Kickouts, ValueBelowTheAllocatedPriceIsAKickOut) {
  // The bid is shared out by no-loss value, so coupon alone never puts a loan below: with no
  // defaults two loans of different coupons are each worth exactly their allocation.
  const LoanArrays loans = make_loans({{.id = "LOW", .upb = 200'000, .rate = 0.055},
                                       {.id = "HIGH", .upb = 200'000, .rate = 0.075}});
  const YieldCurve curve = flat_yield_curve(0.04, kCutoff);
  Assumptions a;
  a.prepay = standard_curve(CurveShape::psa, 1.0);
  KickoutResult r = price_with_kickouts(loans, curve, yield_request(0.065, a), open_box());
  for (const LoanDecision& d : r.loans) {
    EXPECT_NEAR(d.value, d.allocated, 1e-6 * d.allocated);  // identity: no credit, no gap
    EXPECT_EQ(d.default_probability, 0.0);
    EXPECT_FALSE(d.modelled_severity);
    EXPECT_DOUBLE_EQ(d.severity, 0.50);  // no defaults: the break-even uses the bad-loan loss
    EXPECT_FALSE(d.above_break_even);
  }
  EXPECT_TRUE(r.kicked.empty());

  // Credit does: the same two coupons, the low one in foreclosure. It defaults, loses more
  // than the pool's average share, and falls below its allocation; the other is above its own.
  std::vector<TestLoan> two = {{.id = "LOW", .upb = 200'000, .rate = 0.055},
                               {.id = "HIGH", .upb = 200'000, .rate = 0.075}};
  two[0].delinquency = Delinquency::foreclosure;
  const LoanArrays late = make_loans(two);
  Assumptions d = a;
  d.default_rate = constant_curve(0.01);
  d.delinquent_default = true;
  r = price_with_kickouts(late, curve, yield_request(0.065, d), open_box());
  EXPECT_TRUE(r.loans[0].below_price);
  EXPECT_FALSE(r.loans[1].below_price);
  EXPECT_LT(r.loans[0].value, r.loans[0].allocated);
  EXPECT_GT(r.loans[1].value, r.loans[1].allocated);
  EXPECT_EQ(r.kicked, std::vector<std::uint32_t>{0});
  ASSERT_TRUE(r.without);
  EXPECT_NEAR(r.without->dirty_price, r.loans[1].value_price, 1e-9);  // one loan: its own value
}

TEST(Kickouts, NoneKickedAndAllKickedHaveNoSecondBid) {
  const LoanArrays loans = make_loans(alike_loans());
  const YieldCurve curve = flat_yield_curve(0.04, kCutoff);
  Assumptions a;
  a.prepay = standard_curve(CurveShape::psa, 1.0);
  const KickoutResult none = price_with_kickouts(loans, curve, yield_request(0.065, a),
                                                 default_credit_box());
  EXPECT_TRUE(none.kicked.empty());  // alike loans: each worth the pool's price, within rounding
  EXPECT_EQ(none.kept.size(), loans.size());
  EXPECT_FALSE(none.without);

  CreditBox strict = default_credit_box();
  strict.min_score = 800;  // every test loan has 740
  const KickoutResult all = price_with_kickouts(loans, curve, yield_request(0.065, a), strict);
  EXPECT_EQ(all.kicked.size(), loans.size());
  EXPECT_TRUE(all.kept.empty());
  EXPECT_FALSE(all.without);
  EXPECT_EQ(all.by_screen[static_cast<std::size_t>(BoxScreen::score)].loans, loans.size());
}

TEST(Kickouts, TheEconomicsMoveTheBreakEven) {
  std::vector<TestLoan> t = alike_loans();
  const LoanArrays loans = make_loans(t);
  const YieldCurve curve = flat_yield_curve(0.04, kCutoff);
  Assumptions a = with_defaults();
  a.default_rate = constant_curve(0.03);  // 3% CDR: a lifetime default probability near 25%
  const BidRequest request = yield_request(0.065, a);
  const KickoutResult lenient =
      price_with_kickouts(loans, curve, request, open_box(), {.margin = 0.20, .bad_loan_loss = 0.5});
  const KickoutResult strict =
      price_with_kickouts(loans, curve, request, open_box(), {.margin = 0.02, .bad_loan_loss = 0.5});
  EXPECT_NEAR(lenient.break_even, 0.20 / 0.70, 1e-15);
  EXPECT_NEAR(strict.break_even, 0.02 / 0.52, 1e-15);
  EXPECT_EQ(lenient.above_break_even.loans, 0u);
  EXPECT_EQ(strict.above_break_even.loans, loans.size());
  EXPECT_THROW(price_with_kickouts(loans, curve, request, open_box(), {.margin = 0, .bad_loan_loss = 0.5}),
               std::invalid_argument);
  EXPECT_THROW(price_with_kickouts(loans, curve, request, open_box(), {.margin = 0.05, .bad_loan_loss = -1}),
               std::invalid_argument);
}

TEST(Kickouts, WorksWithTheLoanLevelModel) {
  // The model reads each loan's credit: a weak borrower defaults more than a strong one, each
  // loan's severity is its own, and the bid without the kick-outs is still the kept loans alone.
  std::vector<TestLoan> t = alike_loans();
  t[2].score = 580;
  t[2].ltv = t[2].cltv = 0.97;
  t[2].dti = 0.49;
  t[5].delinquency = Delinquency::dq90_plus;
  t[8].state = "NY";
  const LoanArrays loans = make_loans(t);
  const YieldCurve curve = flat_yield_curve(0.04, kCutoff);
  const CreditModel model = default_credit_model();
  BidRequest request = yield_request(0.065, Assumptions{});
  request.model = &model;
  request.scenario = find_scenario(default_scenarios(), "base");
  const KickoutResult r = price_with_kickouts(loans, curve, request, default_credit_box());
  EXPECT_GT(r.loans[2].default_probability, r.loans[0].default_probability);
  EXPECT_GT(r.loans[5].default_probability, r.loans[0].default_probability);
  for (const LoanDecision& d : r.loans) {
    if (!d.modelled_severity) continue;
    EXPECT_GE(d.severity, 0.0);
    EXPECT_NEAR(d.break_even, 0.05 / (0.05 + d.severity), 1e-15);
  }
  EXPECT_TRUE(r.loans[2].outside_box);  // score 580
  EXPECT_EQ(r.kept.size() + r.kicked.size(), loans.size());
  ASSERT_TRUE(r.without);
  const BidResult alone = price_pool(select_loans(loans, r.kept), curve, request);
  EXPECT_EQ(r.without->clean_price, alone.clean_price);
  EXPECT_EQ(r.without->expected_loss, alone.expected_loss);
}

// ---- Reports ------------------------------------------------------------------------------------

TEST(KickoutReport, TextJsonAndCsvAgreeWithTheResult) {
  std::vector<TestLoan> t = alike_loans();
  t[2].score = 600;
  t[7].delinquency = Delinquency::dq90_plus;
  TapeRead tape;
  tape.file = "pool.csv";
  tape.cutoff = kCutoff;
  tape.loans = make_loans(t);
  tape.rows_read = t.size();
  const YieldCurve curve = flat_yield_curve(0.04, kCutoff);
  const BidRequest request = yield_request(0.065, with_defaults());
  const KickoutResult r =
      price_with_kickouts(tape.loans, curve, request, default_credit_box());
  ASSERT_EQ(r.kicked, (std::vector<std::uint32_t>{2, 7}));

  const std::string text = price_kickouts_text(tape, curve, request, r);
  const std::size_t section = text.find("\nkick-outs\n");
  ASSERT_NE(section, std::string::npos) << text;
  EXPECT_LT(section, text.find("rejected rows:"));  // before the rejects and the caution
  EXPECT_LT(text.find("bid (price"), section);      // after the whole pool's report
  for (const std::string needle :
       {"break-even p* = m / (m + s)", "9.09%", "score 600 below 620", "without kick-outs",
        "default probability 100.00% above break-even 11.11%", "kicked out (any reason)"})
    EXPECT_NE(text.find(needle), std::string::npos) << needle << "\n" << text;
  const std::string limited = price_kickouts_text(tape, curve, request, r, nullptr, 1);
  EXPECT_NE(limited.find("... and 1 more"), std::string::npos) << limited;

  const auto json = nlohmann::json::parse(price_kickouts_json(tape, curve, request, r));
  const auto& k = json.at("kickouts");
  EXPECT_EQ(k.at("counts").at("kicked").at("loans"), 2);
  EXPECT_EQ(k.at("kicked").size(), 2u);
  EXPECT_EQ(k.at("kicked")[0].at("loan_id"), "L2");
  EXPECT_EQ(k.at("without").at("status"), "priced");
  EXPECT_DOUBLE_EQ(k.at("without").at("bid").at("clean_price").get<double>(),
                   r.without->clean_price);
  EXPECT_DOUBLE_EQ(k.at("economics").at("break_even").get<double>(), r.break_even);
  // The box reads back as a credit box file.
  const CreditBox back = parse_credit_box(k.at("box").dump(), "back");
  CreditBox expected = r.box;
  expected.source = "back";
  EXPECT_EQ(back, expected);

  const std::string csv = kickouts_csv(tape.loans, r);
  std::istringstream lines(csv);
  std::string header;
  std::getline(lines, header);
  EXPECT_EQ(header, kKickoutsCsvHeader);
  std::size_t rows = 0, kicks = 0;
  for (std::string line; std::getline(lines, line); ++rows)
    kicks += line.find(",kick,") != std::string::npos;
  EXPECT_EQ(rows, tape.loans.size());
  EXPECT_EQ(kicks, 2u);
  std::ostringstream streamed;
  write_kickouts_csv(streamed, tape.loans, r);
  EXPECT_EQ(streamed.str(), csv);
}

}  // namespace
}  // namespace poolbid
