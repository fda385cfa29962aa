// Tests of compare_pools and outcome_matrix: the attribution adds up to the price gap, identical
// pools show no gap, a pool that differs only in credit score puts the gap on the score line, the
// common price reads back the target, thread counts change nothing, and on the demo sellers the
// strict pool bids above the loose one and defaults rise from boom to severe downturn.
#include <gtest/gtest.h>

#include <chrono>
#include <cmath>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "pricing/pricing.h"
#include "report/report.h"
#include "tape/tape.h"
#include "tests/support/loans.h"

namespace poolbid {
namespace {

using std::chrono::day;
using std::chrono::month;
using std::chrono::year;
using testing_support::make_loans;
using testing_support::TestLoan;

constexpr Date kCutoff{year{2026}, month{12}, day{1}};

// A yield target under the built-in model and the base scenario, risk off (fast).
BidRequest model_request(const CreditModel& model, double bey = 0.065) {
  BidRequest r;
  r.target = BidTarget::yield;
  r.value = bey;
  r.settlement = Settlement{kCutoff, Date{year{2026}, month{12}, day{17}}, 17};
  r.model = &model;
  r.scenario = find_scenario(default_scenarios(), "base");
  r.risk = false;
  r.threads = 1;
  return r;
}

YieldCurve test_curve() { return flat_yield_curve(0.04, kCutoff); }

// A mixed pool: scores, LTVs, DTIs, occupancies, delinquencies and states that vary loan by loan.
std::vector<TestLoan> mixed_loans(double score_shift = 0, double ltv_shift = 0) {
  const char* states[] = {"CA", "NY", "TX", "FL", "IL"};
  std::vector<TestLoan> loans;
  for (int i = 0; i < 40; ++i) {
    TestLoan t{.id = "L" + std::to_string(i),
               .upb = 150'000.0 + 7'500.0 * (i % 13),
               .rate = 0.06 + 0.0025 * (i % 6)};
    t.age = 2 + (i % 24);
    t.remaining = 360 - t.age;
    t.score = 640 + 10 * (i % 16) + score_shift;
    t.ltv = 0.60 + 0.02 * (i % 17) + ltv_shift;
    t.cltv = t.ltv + (i % 5 == 0 ? 0.10 : 0.0);
    t.dti = 0.25 + 0.01 * (i % 20);
    t.state = states[i % 5];
    t.occupancy = i % 7 == 0 ? Occupancy::investor : Occupancy::owner;
    t.delinquency = i % 19 == 0 ? Delinquency::dq30 : Delinquency::current;
    loans.push_back(t);
  }
  return loans;
}

// The lines as text, for failure messages.
std::string lines_text(const Attribution& a) {
  std::string out = "gap " + std::to_string(a.gap_points) + ":";
  for (const AttributionLine& l : a.lines) out += " " + l.label + " " + std::to_string(l.points);
  return out;
}

double sum_of_lines(const Attribution& a) {
  double sum = 0;
  for (const AttributionLine& l : a.lines) sum += l.points;
  return sum;
}

TEST(Compare, AttributionAddsUpToTheGap) {
  const CreditModel model = default_credit_model();
  const LoanArrays strong = make_loans(mixed_loans(40, -0.05));
  const LoanArrays weak = make_loans(mixed_loans(-40, 0.08));
  const std::vector<NamedPool> pools = {{"strong", &strong}, {"weak", &weak}};
  const Comparison c = compare_pools(pools, test_curve(), model_request(model));
  ASSERT_EQ(c.pools.size(), 2u);
  ASSERT_EQ(c.attributions.size(), 1u);
  const Attribution& a = c.attributions[0];
  SCOPED_TRACE(lines_text(a));
  EXPECT_EQ(a.pool, 1u);
  ASSERT_EQ(a.lines.size(), kFactorCount + 2);
  for (std::size_t f = 0; f < kFactorCount; ++f) {
    ASSERT_TRUE(a.lines[f].factor.has_value());
    EXPECT_EQ(*a.lines[f].factor, static_cast<Factor>(f));
    EXPECT_EQ(a.lines[f].label, to_string(static_cast<Factor>(f)));
  }
  EXPECT_EQ(a.lines[kFactorCount].label, "collateral and terms");
  EXPECT_EQ(a.lines[kFactorCount + 1].label, "interaction");
  // identity: the lines add up to the whole gap
  EXPECT_NEAR(sum_of_lines(a), a.gap_points, 1e-9);
  EXPECT_NEAR(a.gap_points, c.pools[0].bid.clean_price - c.pools[1].bid.clean_price, 1e-12);
  // identity: dollars are points on pool B's balance
  EXPECT_NEAR(a.gap_dollars, a.gap_points / 100 * c.pools[1].bid.cutoff_balance, 1e-6);
  for (const AttributionLine& l : a.lines)
    EXPECT_NEAR(l.dollars, l.points / 100 * c.pools[1].bid.cutoff_balance, 1e-6);
  // The stronger credit is worth more, and the score works that way. (LTV need not: a lower LTV
  // also refinances faster, which costs a pool priced near par.)
  EXPECT_GT(a.gap_points, 0.05);
  EXPECT_GT(a.lines[static_cast<std::size_t>(Factor::score)].points, 0);
  // Same coupons, terms, balances and states: with every factor neutral the pools price the same.
  EXPECT_NEAR(a.lines[kFactorCount].points, 0, 1e-9);
}

TEST(Compare, IdenticalPoolsHaveNoGap) {
  const CreditModel model = default_credit_model();
  const LoanArrays loans = make_loans(mixed_loans());
  const LoanArrays twin = make_loans(mixed_loans());
  const std::vector<NamedPool> pools = {{"one", &loans}, {"two", &twin}};
  const Comparison c = compare_pools(pools, test_curve(), model_request(model));
  ASSERT_EQ(c.attributions.size(), 1u);
  EXPECT_EQ(c.attributions[0].gap_points, 0);
  for (const AttributionLine& l : c.attributions[0].lines) EXPECT_EQ(l.points, 0) << l.label;
  EXPECT_EQ(c.pools[0].bid.clean_price, c.pools[1].bid.clean_price);
}

TEST(Compare, ScoreOnlyDifferenceSitsOnTheScoreLine) {
  const CreditModel model = default_credit_model();
  const LoanArrays high = make_loans(mixed_loans(60));
  const LoanArrays low = make_loans(mixed_loans(-60));
  const std::vector<NamedPool> pools = {{"high score", &high}, {"low score", &low}};
  const Comparison c = compare_pools(pools, test_curve(), model_request(model));
  const Attribution& a = c.attributions.at(0);
  SCOPED_TRACE(lines_text(a));
  const double score = a.lines[static_cast<std::size_t>(Factor::score)].points;
  EXPECT_GT(a.gap_points, 0.05);
  // identity: with the score read neutral the pools are the same loans, so the score line is the
  // whole gap and the collateral line is zero
  EXPECT_NEAR(score, a.gap_points, 1e-9);
  EXPECT_NEAR(a.lines[kFactorCount].points, 0, 1e-9);
  // The other factors' lines hold only their interaction with the score (the model multiplies
  // its factors, so reading LTV neutral moves a low-score pool more than a high-score one):
  // identity: together with the interaction line they net to zero.
  double others = 0;
  for (std::size_t f = 0; f < kFactorCount; ++f)
    if (f != static_cast<std::size_t>(Factor::score)) others += a.lines[f].points;
  EXPECT_NEAR(others + a.lines[kFactorCount + 1].points, 0, 1e-9);
  // Factors the two pools share and that sit at the model's reference read the same either way.
  EXPECT_EQ(a.lines[static_cast<std::size_t>(Factor::documentation)].points, 0);
  EXPECT_EQ(a.lines[static_cast<std::size_t>(Factor::purpose)].points, 0);
}

TEST(Compare, CommonPriceReadsBackTheTarget) {
  const CreditModel model = default_credit_model();
  const LoanArrays a = make_loans(mixed_loans(30));
  const LoanArrays b = make_loans(mixed_loans(-30));
  const std::vector<NamedPool> pools = {{"a", &a}, {"b", &b}};
  const BidRequest request = model_request(model, 0.07);
  const Comparison c = compare_pools(pools, test_curve(), request, {std::nullopt, false});
  EXPECT_TRUE(c.attributions.empty());
  EXPECT_FALSE(c.price_given);
  EXPECT_EQ(c.common_price, c.pools[0].bid.clean_price);
  // identity: the first pool read at its own price has the target yield and its own spread
  const PoolAtPrice& first = c.pools[0].at_common_price;
  EXPECT_TRUE(first.solved);
  EXPECT_NEAR(first.loss_adjusted.bey, 0.07, 1e-9);
  EXPECT_NEAR(first.loss_adjusted.z_spread, c.pools[0].bid.loss_adjusted.z_spread, 1e-9);
  // The weaker pool at the stronger pool's price yields less after losses.
  EXPECT_LT(c.pools[1].at_common_price.loss_adjusted.bey, 0.07);
  EXPECT_LT(c.pools[1].at_common_price.loss_adjusted.z_spread, first.loss_adjusted.z_spread);

  const Comparison given = compare_pools(pools, test_curve(), request, {101.5, false});
  EXPECT_TRUE(given.price_given);
  EXPECT_EQ(given.common_price, 101.5);
  for (const ComparedPool& p : given.pools) {
    EXPECT_EQ(p.at_common_price.clean_price, 101.5);
    // identity: dirty value = clean price on the balance plus the pool's own accrued interest
    EXPECT_NEAR(p.at_common_price.dirty_value, 1.015 * p.bid.cutoff_balance + p.bid.accrued, 1e-6);
  }
}

TEST(Compare, ThreadsChangeNothing) {
  const CreditModel model = default_credit_model();
  const LoanArrays a = make_loans(mixed_loans(20, -0.03));
  const LoanArrays b = make_loans(mixed_loans(-20, 0.03));
  const std::vector<NamedPool> pools = {{"a", &a}, {"b", &b}};
  BidRequest one = model_request(model);
  BidRequest four = one;
  four.threads = 4;
  const Comparison x = compare_pools(pools, test_curve(), one);
  const Comparison y = compare_pools(pools, test_curve(), four);
  ASSERT_EQ(x.attributions.size(), y.attributions.size());
  for (std::size_t k = 0; k < x.attributions[0].lines.size(); ++k)
    EXPECT_EQ(x.attributions[0].lines[k].points, y.attributions[0].lines[k].points);
  EXPECT_EQ(x.pools[1].at_common_price.loss_adjusted.z_spread,
            y.pools[1].at_common_price.loss_adjusted.z_spread);
}

TEST(Compare, RefusesWhatItCannotCompare) {
  const CreditModel model = default_credit_model();
  const LoanArrays a = make_loans(mixed_loans());
  const std::vector<NamedPool> pools = {{"a", &a}};
  BidRequest no_model = model_request(model);
  no_model.model = nullptr;
  EXPECT_THROW(compare_pools(pools, test_curve(), no_model), std::invalid_argument);
  BidRequest price = model_request(model);
  price.target = BidTarget::price;
  price.value = 100;
  EXPECT_THROW(compare_pools(pools, test_curve(), price), std::invalid_argument);
  EXPECT_THROW(compare_pools({}, test_curve(), model_request(model)), std::invalid_argument);
  const std::vector<NamedPool> null_pool = {{"a", nullptr}};
  EXPECT_THROW(compare_pools(null_pool, test_curve(), model_request(model)), std::invalid_argument);
  EXPECT_THROW(outcome_matrix(pools, {}, test_curve(), model_request(model)),
               std::invalid_argument);
  // One pool compares with nothing: no attribution, no error.
  const Comparison alone = compare_pools(pools, test_curve(), model_request(model));
  EXPECT_TRUE(alone.attributions.empty());
}

TEST(Matrix, CellsScenariosAndTheCommonPrice) {
  const CreditModel model = default_credit_model();
  const LoanArrays a = make_loans(mixed_loans(30));
  const LoanArrays b = make_loans(mixed_loans(-30));
  const std::vector<NamedPool> pools = {{"a", &a}, {"b", &b}};
  const std::vector<Scenario> scenarios = default_scenarios();
  const OutcomeMatrix m = outcome_matrix(pools, scenarios, test_curve(), model_request(model));
  ASSERT_EQ(m.pools.size(), 2u);
  ASSERT_EQ(m.scenarios.size(), scenarios.size());
  ASSERT_EQ(m.cells.size(), 2 * scenarios.size());
  ASSERT_EQ(m.scenarios[m.price_scenario], "base");
  EXPECT_EQ(m.common_price, m.at(0, m.price_scenario).clean_price);
  // identity: pool A in the base scenario read at its own price has the target yield
  EXPECT_NEAR(m.at(0, m.price_scenario).at_common_price.loss_adjusted.bey, 0.065, 1e-9);
  // Each cell is what price_pool says for that pool and scenario.
  BidRequest r = model_request(model);
  r.scenario = scenarios[3];
  const BidResult severe_b = price_pool(b, test_curve(), r);
  EXPECT_EQ(m.at(1, 3).clean_price, severe_b.clean_price);
  EXPECT_EQ(m.at(1, 3).cum_default_pct, severe_b.cum_default_pct);
  EXPECT_EQ(m.at(1, 3).cum_loss_pct, severe_b.expected_loss_pct);
  // Without a scenario called base, the first scenario sets the common price.
  const std::vector<Scenario> two = {scenarios[3], scenarios[0]};
  const OutcomeMatrix m2 = outcome_matrix(pools, two, test_curve(), model_request(model));
  EXPECT_EQ(m2.price_scenario, 0u);
  EXPECT_EQ(m2.common_price, m2.at(0, 0).clean_price);
  const OutcomeMatrix given =
      outcome_matrix(pools, two, test_curve(), model_request(model), {99.0});
  EXPECT_TRUE(given.price_given);
  EXPECT_EQ(given.common_price, 99.0);
}

// ---- The demo sellers
// -----------------------------------------------------------------------------

struct DemoPools {
  TapeRead strict, loose;
};

const DemoPools& demo_pools() {
  static const DemoPools pools = [] {
    ReadOptions strict_options;
    strict_options.cutoff = kCutoff;
    ReadOptions loose_options;
    loose_options.map =
        load_column_map(std::string(POOLBID_SOURCE_DIR) + "/demo-pools/sallowmere.map.json");
    return DemoPools{
        read_tape(std::string(POOLBID_SOURCE_DIR) + "/demo-pools/brindlecote-strict.csv",
                  strict_options),
        read_tape(std::string(POOLBID_SOURCE_DIR) + "/demo-pools/sallowmere-loose.csv",
                  loose_options)};
  }();
  return pools;
}

YieldCurve demo_curve() {
  return load_yield_curve(std::string(POOLBID_SOURCE_DIR) + "/demo-pools/curve-2026-12-01.json");
}

TEST(DemoSellers, StrictBidsAboveLooseAtTheSameYield) {
  const DemoPools& demo = demo_pools();
  ASSERT_EQ(demo.strict.rows_rejected, 0u);
  ASSERT_EQ(demo.loose.rows_rejected, 0u);
  const CreditModel model = default_credit_model();
  BidRequest request = model_request(model);
  request.threads = 0;
  const std::vector<NamedPool> pools = {{"strict", &demo.strict.loans},
                                        {"loose", &demo.loose.loans}};
  const Comparison c = compare_pools(pools, demo_curve(), request);
  EXPECT_GT(c.pools[0].bid.clean_price, c.pools[1].bid.clean_price);
  EXPECT_LT(c.pools[0].cum_default_pct, c.pools[1].cum_default_pct);
  EXPECT_LT(c.pools[0].cum_loss_pct, c.pools[1].cum_loss_pct);
  const Attribution& a = c.attributions.at(0);
  SCOPED_TRACE(lines_text(a));
  EXPECT_NEAR(sum_of_lines(a), a.gap_points, 1e-9);  // identity
  // The tapes share coupon, term and balance loan by loan: only their states differ, so the
  // collateral line is small beside the gap.
  EXPECT_LT(std::fabs(a.lines[kFactorCount].points), 0.25 * a.gap_points);
}

TEST(DemoSellers, DefaultsRiseFromBoomToSevereDownturnAndLooseIsWorse) {
  const DemoPools& demo = demo_pools();
  const CreditModel model = default_credit_model();
  BidRequest request = model_request(model);
  request.threads = 0;
  const std::vector<NamedPool> pools = {{"strict", &demo.strict.loans},
                                        {"loose", &demo.loose.loans}};
  const std::vector<Scenario> scenarios = default_scenarios();
  ASSERT_EQ(scenarios.size(), 4u);
  ASSERT_EQ(scenarios.front().name, "boom");
  ASSERT_EQ(scenarios.back().name, "severe_downturn");
  const OutcomeMatrix m = outcome_matrix(pools, scenarios, demo_curve(), request);
  for (std::size_t p = 0; p < 2; ++p)
    for (std::size_t s = 1; s < scenarios.size(); ++s) {
      EXPECT_GT(m.at(p, s).cum_default_pct, m.at(p, s - 1).cum_default_pct)
          << m.pools[p] << " " << m.scenarios[s];
      EXPECT_GT(m.at(p, s).cum_loss_pct, m.at(p, s - 1).cum_loss_pct)
          << m.pools[p] << " " << m.scenarios[s];
    }
  for (std::size_t s = 0; s < scenarios.size(); ++s) {
    EXPECT_GT(m.at(1, s).cum_default_pct, m.at(0, s).cum_default_pct) << m.scenarios[s];
    EXPECT_GT(m.at(1, s).cum_loss_pct, m.at(0, s).cum_loss_pct) << m.scenarios[s];
    EXPECT_LT(m.at(1, s).clean_price, m.at(0, s).clean_price) << m.scenarios[s];
    EXPECT_LT(m.at(1, s).at_common_price.loss_adjusted.z_spread,
              m.at(0, s).at_common_price.loss_adjusted.z_spread)
        << m.scenarios[s];
  }
}

// The top-level keys of a JSON document, in order.
std::vector<std::string> keys_of(const nlohmann::ordered_json& document) {
  std::vector<std::string> keys;
  for (const auto& item : document.items()) keys.push_back(item.key());
  return keys;
}

TEST(DemoSellers, Reports) {
  const DemoPools& demo = demo_pools();
  const CreditModel model = default_credit_model();
  BidRequest request = model_request(model);
  request.threads = 0;
  const std::vector<NamedPool> pools = {{"Brindlecote Home Loans", &demo.strict.loans},
                                        {"Sallowmere Funding", &demo.loose.loans}};
  const std::vector<const TapeRead*> tapes = {&demo.strict, &demo.loose};
  const YieldCurve curve = demo_curve();
  const Comparison c = compare_pools(pools, curve, request);

  const std::string text = compare_text(tapes, curve, request, c);
  EXPECT_NE(text.find("A (Brindlecote Home Loans) comes out ahead of B (Sallowmere Funding)"),
            std::string::npos)
      << text;
  EXPECT_NE(text.find("The biggest reasons: "), std::string::npos);
  for (const char* line : {"credit score", "delinquency at cut-off", "collateral and terms",
                           "interaction", "total gap (A - B)", "WA credit score",
                           "lifetime defaults (% of UPB)", "at a common clean price of"})
    EXPECT_NE(text.find(line), std::string::npos) << line;

  const auto json = nlohmann::ordered_json::parse(compare_json(tapes, curve, request, c));
  EXPECT_EQ(keys_of(json),
            (std::vector<std::string>{"cutoff_date", "settlement_date", "payment_delay_days",
                                      "curve", "model", "advancing", "scenario", "target",
                                      "common_price", "pools", "attribution", "caution"}));
  ASSERT_EQ(json["pools"].size(), 2u);
  EXPECT_EQ(json["pools"][1]["name"], "Sallowmere Funding");
  EXPECT_EQ(json["common_price"]["from"], "first_pool");
  EXPECT_EQ(json["pools"][0]["at_target"]["clean_price"].get<double>(), c.pools[0].bid.clean_price);
  ASSERT_EQ(json["attribution"].size(), 1u);
  const auto& lines = json["attribution"][0]["lines"];
  ASSERT_EQ(lines.size(), kFactorCount + 2);
  double sum = 0;
  for (const auto& l : lines) sum += l["points"].get<double>();
  // identity: the lines add up to the gap in the document too
  EXPECT_NEAR(sum, json["attribution"][0]["gap_points"].get<double>(), 1e-9);
  EXPECT_EQ(json["attribution"][0]["ahead"], "Brindlecote Home Loans");

  const std::vector<Scenario> scenarios = default_scenarios();
  const OutcomeMatrix m = outcome_matrix(pools, scenarios, curve, request);
  const std::string mtext = matrix_text(tapes, scenarios, curve, request, m);
  for (const Scenario& s : scenarios) EXPECT_NE(mtext.find(s.name), std::string::npos) << s.name;
  EXPECT_NE(mtext.find("Z-spread bp"), std::string::npos);
  const auto mjson =
      nlohmann::ordered_json::parse(matrix_json(tapes, scenarios, curve, request, m));
  EXPECT_EQ(keys_of(mjson),
            (std::vector<std::string>{"cutoff_date", "settlement_date", "payment_delay_days",
                                      "curve", "model", "advancing", "target", "common_price",
                                      "pools", "scenarios", "cells", "caution"}));
  ASSERT_EQ(mjson["cells"].size(), 8u);
  EXPECT_EQ(mjson["cells"][7]["pool"], "Sallowmere Funding");
  EXPECT_EQ(mjson["cells"][7]["scenario"], "severe_downturn");
  EXPECT_EQ(mjson["cells"][7]["cum_default_pct"].get<double>(), m.at(1, 3).cum_default_pct);
  EXPECT_EQ(mjson["common_price"]["scenario"], "base");
  // Tapes and matrix that do not match are refused.
  const std::vector<const TapeRead*> one = {&demo.strict};
  EXPECT_THROW(matrix_text(one, scenarios, curve, request, m), std::invalid_argument);
  EXPECT_THROW(compare_json(one, curve, request, c), std::invalid_argument);
}

}  // namespace
}  // namespace poolbid
