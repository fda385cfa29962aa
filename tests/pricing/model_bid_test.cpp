// The bid under the loan-level model: underwriting shows up in price (the strict demo seller above
// the loose one, lower scores and higher LTVs priced lower), the scenario's rate shock moves the
// curve, risk measures re-project every loan, and thread counts do not change a bit.
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "pricing/pricing.h"
#include "tests/support/command_constants.h"
#include "tests/support/loans.h"

namespace poolbid {
namespace {

using testing_support::make_loans;
using testing_support::TestLoan;

constexpr Date kCutoff{std::chrono::year{2026}, std::chrono::month{12}, std::chrono::day{1}};
const std::string kRoot = POOLBID_SOURCE_DIR;

LoanArrays strict_pool() {
  ReadOptions options;
  options.cutoff = kCutoff;
  return read_tape(kRoot + "/" + testing_support::kStrict, options).loans;
}
LoanArrays loose_pool() {
  ReadOptions options;
  options.map = load_column_map(kRoot + "/" + testing_support::kLooseMap);
  return read_tape(kRoot + "/" + testing_support::kLoose, options).loans;
}

struct Desk {
  CreditModel model = default_credit_model();
  YieldCurve curve = load_yield_curve(kRoot + "/demo-pools/curve-2026-12-01.json");
  BidRequest request;
  Desk() {
    request.target = BidTarget::yield;
    request.value = 0.065;
    request.settlement = Settlement{kCutoff, kCutoff, 17};
    request.model = &model;
    request.scenario = find_scenario(default_scenarios(), "base");
    request.key_rate_years = {};
  }
  BidResult price(const LoanArrays& loans) const { return price_pool(loans, curve, request); }
};

TEST(ModelBid, StrictSellerPricesAboveLooseSeller) {
  Desk desk;
  desk.request.risk = false;
  const BidResult strict = desk.price(strict_pool());
  const BidResult loose = desk.price(loose_pool());
  EXPECT_GT(strict.clean_price, loose.clean_price + 0.5);
  EXPECT_LT(strict.cum_default_pct, loose.cum_default_pct);
  EXPECT_LT(strict.expected_loss_pct, loose.expected_loss_pct);
  EXPECT_LT(strict.credit_cost_bp, loose.credit_cost_bp);
  EXPECT_EQ(strict.scenario, "base");
  // A worse economy lowers both bids.
  desk.request.scenario = find_scenario(default_scenarios(), "severe_downturn");
  EXPECT_LT(desk.price(strict_pool()).clean_price, strict.clean_price);
  EXPECT_LT(desk.price(loose_pool()).clean_price, loose.clean_price);
}

TEST(ModelBid, WeakerCreditPricesLower) {
  Desk desk;
  desk.request.risk = false;
  TestLoan t{.id = "A", .upb = 300000, .rate = 0.0625};
  t.original_balance = 310000;
  auto price_of = [&](const TestLoan& loan) { return desk.price(make_loans({loan})).clean_price; };
  double previous = 1e9;
  for (double score : {800.0, 740.0, 680.0, 620.0, 580.0}) {
    TestLoan s = t;
    s.score = score;
    const double p = price_of(s);
    EXPECT_LT(p, previous) << "score " << score;
    previous = p;
  }
  previous = 1e9;
  for (double ltv : {0.60, 0.75, 0.85, 0.95}) {
    TestLoan s = t;
    s.ltv = s.cltv = ltv;
    const double p = price_of(s);
    EXPECT_LT(p, previous) << "LTV " << ltv;
    previous = p;
  }
}

TEST(ModelBid, ScenarioRateShockMovesTheCurve) {
  Desk desk;
  desk.request.risk = false;
  desk.request.target = BidTarget::spread;
  desk.request.value = 0.01;
  const LoanArrays loans = strict_pool();
  const BidResult base = desk.price(loans);
  desk.request.scenario.rate_shock.parallel_bp = 100;
  const BidResult shocked = desk.price(loans);
  EXPECT_EQ(shocked.curve.parallel_shift_bp, 100);
  EXPECT_LT(shocked.clean_price, base.clean_price);   // higher rates: worth less at one spread
  EXPECT_GT(shocked.loss_adjusted.wal_years, base.loss_adjusted.wal_years);  // slower prepayment
}

TEST(ModelBid, RiskMeasuresMoveEveryLoanAndAreThreadFree) {
  Desk desk;
  const LoanArrays loans = strict_pool();
  desk.request.threads = 1;
  const BidResult one = desk.price(loans);
  desk.request.threads = 2;
  const BidResult two = desk.price(loans);
  EXPECT_EQ(one.clean_price, two.clean_price);
  EXPECT_EQ(one.effective_duration, two.effective_duration);
  EXPECT_GT(one.effective_duration, 0.5);
  // Prepayment reads rates, so the flows move with the curve: the effective duration is not the
  // duration of the flows held fixed (a discount pool gains from faster prepayment when rates
  // fall, so it is longer here).
  EXPECT_GT(std::abs(one.effective_duration - one.loss_adjusted.modified_duration), 0.05);
}

}  // namespace
}  // namespace poolbid
