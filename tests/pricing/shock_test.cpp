// Repricing a held pool after a shock: a shock equal to the base scenario changes nothing, a severe
// downturn loses money, the loans' P&L adds up to the pool's, and the after-view keeps the
// before-view's Z-spread on the moved curve.
#include <gtest/gtest.h>

#include <chrono>
#include <cmath>
#include <numeric>
#include <stdexcept>
#include <string>

#include "pricing/pricing.h"
#include "tests/support/command_constants.h"
#include "tests/support/loans.h"

namespace poolbid {
namespace {

using testing_support::make_loans;
using testing_support::TestLoan;

constexpr Date kCutoff{std::chrono::year{2026}, std::chrono::month{12}, std::chrono::day{1}};
constexpr Date kSettle{std::chrono::year{2026}, std::chrono::month{12}, std::chrono::day{10}};
const std::string kRoot = POOLBID_SOURCE_DIR;

// A small pool with the spread of credit a downturn reads: scores, LTVs, a judicial state, an
// investor loan and a delinquent one.
LoanArrays held_pool() {
  TestLoan a{.id = "A", .upb = 400'000, .rate = 0.0650};
  TestLoan b{.id = "B", .upb = 250'000, .rate = 0.0700, .score = 640, .ltv = 0.95, .cltv = 0.95,
             .dti = 0.45, .state = "FL"};
  TestLoan c{.id = "C", .upb = 300'000, .rate = 0.0575, .remaining = 300, .age = 60,
             .score = 780, .ltv = 0.60, .cltv = 0.70, .state = "NJ",
             .occupancy = Occupancy::investor};
  TestLoan d{.id = "D", .upb = 150'000, .rate = 0.0725, .score = 600, .ltv = 0.90, .cltv = 0.90,
             .state = "GA", .delinquency = Delinquency::dq60};
  return make_loans({a, b, c, d});
}

struct Desk {
  CreditModel model = default_credit_model();
  YieldCurve curve = load_yield_curve(kRoot + "/demo-pools/curve-2026-12-01.json");
  ShockRequest request;
  Desk() {
    BidRequest& held = request.held;
    held.target = BidTarget::price;
    held.value = 99.25;
    held.settlement = Settlement{kCutoff, kSettle, 17};
    held.model = &model;
    held.scenario = find_scenario(default_scenarios(), "base");
    held.key_rate_years = {};
    held.loan_values = true;
    request.shocked = held.scenario;
  }
  ShockResult run(const LoanArrays& loans) const {
    return reprice_after_shock(loans, curve, request);
  }
};

TEST(Shock, AShockEqualToTheBaseChangesNothing) {
  Desk desk;
  const LoanArrays loans = held_pool();
  const ShockResult r = desk.run(loans);
  // identity: same scenario, same curve, same Z-spread -> the held price again (to the Z-spread
  // solve's 1e-12 tolerance).
  EXPECT_NEAR(r.pnl_points, 0, 1e-9);
  EXPECT_NEAR(r.pnl / r.before.cutoff_balance, 0, 1e-9);
  EXPECT_NEAR(r.before.clean_price, 99.25, 1e-9);
  EXPECT_EQ(r.expected_loss_change, 0);
  EXPECT_EQ(r.after.cum_default_pct, r.before.cum_default_pct);
  for (double loan : r.loan_pnl) EXPECT_NEAR(loan, 0, 1e-6);
}

TEST(Shock, ASevereDownturnLosesMoneyAndRaisesExpectedLoss) {
  Desk desk;
  desk.request.shocked = find_scenario(default_scenarios(), "severe_downturn");
  const ShockResult r = desk.run(held_pool());
  EXPECT_LT(r.pnl, 0);
  EXPECT_LT(r.pnl_points, 0);
  EXPECT_GT(r.expected_loss_change, 0);
  EXPECT_GT(r.after.cum_default_pct, r.before.cum_default_pct);
  EXPECT_EQ(r.before.scenario, "base");
  EXPECT_EQ(r.after.scenario, "severe_downturn");
  // identity: the after-view is valued at the before-view's loss-adjusted Z-spread.
  EXPECT_NEAR(r.after.loss_adjusted.z_spread, r.before.loss_adjusted.z_spread, 1e-9);
  // The downturn's rate shock moved the curve the after-view discounts on.
  EXPECT_EQ(r.after.curve.parallel_shift_bp, desk.request.shocked.rate_shock.parallel_bp);
  // identity: P&L in points is the P&L in dollars over the cut-off balance.
  EXPECT_NEAR(r.pnl_points, 100 * r.pnl / r.before.cutoff_balance, 1e-9);
  EXPECT_NEAR(r.expected_loss_change_pct, 100 * r.expected_loss_change / r.before.cutoff_balance,
              1e-12);
}

TEST(Shock, LoanPnlAddsUpToThePoolPnl) {
  Desk desk;
  desk.request.shocked = find_scenario(default_scenarios(), "mild_downturn");
  const LoanArrays loans = held_pool();
  const ShockResult r = desk.run(loans);
  ASSERT_EQ(r.loan_pnl.size(), loans.size());
  const double sum = std::accumulate(r.loan_pnl.begin(), r.loan_pnl.end(), 0.0);
  // identity: loan values add up to each view's dirty value, and accrued interest is the same on
  // both sides, so the loans' P&L adds up to the pool's clean P&L.
  EXPECT_NEAR(sum, r.pnl, 1e-6 * r.before.cutoff_balance * 1e-3);
  EXPECT_NE(r.pnl, 0);
}

TEST(Shock, ABoomIsAGainOnTheDemoPool) {
  Desk desk;
  ReadOptions options;
  options.cutoff = kCutoff;
  const LoanArrays loans = read_tape(kRoot + "/" + testing_support::kStrict, options).loans;
  desk.request.held.loan_values = false;
  desk.request.shocked = find_scenario(default_scenarios(), "boom");
  const ShockResult r = desk.run(loans);
  // Rates 50 bp lower at the same spread and fewer defaults: the held pool is worth more.
  EXPECT_GT(r.pnl, 0);
  EXPECT_LT(r.expected_loss_change, 0);
  EXPECT_TRUE(r.loan_pnl.empty());
}

TEST(Shock, NeedsTheModelAndAPriceTarget) {
  Desk desk;
  const LoanArrays loans = held_pool();
  ShockRequest no_model = desk.request;
  no_model.held.model = nullptr;
  EXPECT_THROW(reprice_after_shock(loans, desk.curve, no_model), std::invalid_argument);
  ShockRequest yield_target = desk.request;
  yield_target.held.target = BidTarget::yield;
  EXPECT_THROW(reprice_after_shock(loans, desk.curve, yield_target), std::invalid_argument);
}

}  // namespace
}  // namespace poolbid
