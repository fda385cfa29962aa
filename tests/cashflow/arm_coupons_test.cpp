// Tests arm_coupon_paths: reset months, periodic and lifetime caps, floors, index paths held past
// their end, the changes it lists, errors, and the paths driving project_pool (a fixed-rate twin,
// re-amortisation, the same bits as the month-by-month form).
#include <gtest/gtest.h>

#include <cmath>
#include <cstdint>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include "cashflow/cashflow.h"
#include "tests/cashflow/flows_support.h"

namespace poolbid {
namespace {

using namespace testing_support;

// A 5/1-style ARM on SOFR30A: first reset at loan month 61, then yearly; margin 2.75%, periodic
// cap 2%, lifetime cap the 4% start rate + 5%, floor the margin. 58 months old, 302 to go.
TestLoan five_one(std::string id = "ARM") {
  return {.id = std::move(id),
          .upb = 250'000,
          .rate = 0.04,
          .remaining = 302,
          .age = 58,
          .servicing = 0.0025,
          .original_term = 360,
          .amortization = Amortization::arm,
          .arm_index = "SOFR30A",
          .arm_margin = 0.0275,
          .arm_periodic_cap = 0.02,
          .arm_lifetime_cap = 0.09,
          .arm_floor = 0.0275,
          .arm_first_reset = 61,
          .arm_reset_period = 12};
}

// An ARM with only a margin: no caps, no floor (so the floor is the margin).
TestLoan bare_arm(double rate, double margin, int age, int first_reset, int period) {
  return {.id = "BARE",
          .upb = 100'000,
          .rate = rate,
          .remaining = 360 - age,
          .age = age,
          .servicing = 0.0025,
          .original_term = 360,
          .amortization = Amortization::arm,
          .arm_index = "SOFR30A",
          .arm_margin = margin,
          .arm_first_reset = first_reset,
          .arm_reset_period = period};
}

IndexPaths one_index(std::vector<double> rates, std::string name = "SOFR30A") {
  IndexPaths p;
  p.months = static_cast<int>(rates.size());
  p.names = {std::move(name)};
  p.rates = {std::move(rates)};
  return p;
}

IndexPaths constant_index(double rate, int months, std::string name = "SOFR30A") {
  return one_index(std::vector<double>(static_cast<std::size_t>(months), rate), std::move(name));
}

// The changes as arm_coupon_paths promises them: one run per listed loan, months strictly
// ascending from 1, each moving the rate (from the note rate, for the first), none at the note
// rate in month 1.
void expect_well_formed(const CouponPaths& c, const LoanArrays& loans) {
  if (c.loans.empty()) {
    EXPECT_TRUE(c.begin.empty() && c.changes.empty());
    return;
  }
  ASSERT_EQ(c.begin.size(), c.loans.size() + 1);
  EXPECT_EQ(c.begin.front(), 0u);
  EXPECT_EQ(c.begin.back(), c.changes.size());
  for (std::size_t k = 0; k < c.loans.size(); ++k) {
    ASSERT_LE(c.begin[k], c.begin[k + 1]) << k;
    double held = loans.note_rate[c.loans[k]];
    int month = 0;
    for (std::uint32_t j = c.begin[k]; j < c.begin[k + 1]; ++j) {
      EXPECT_GT(c.changes[j].month, month) << "loan " << k << " change " << j;
      EXPECT_NE(c.changes[j].rate, held) << "loan " << k << " change " << j;
      month = c.changes[j].month;
      held = c.changes[j].rate;
    }
  }
}

// Runs of (months, rate), concatenated.
std::vector<double> runs(const std::vector<std::pair<int, double>>& parts) {
  std::vector<double> out;
  for (const auto& [n, r] : parts) out.insert(out.end(), static_cast<std::size_t>(n), r);
  return out;
}

// The k-th listed loan's rate month by month over as many months as `want` has.
void expect_path(const CouponPaths& c, std::size_t k, const LoanArrays& loans,
                 const std::vector<double>& want) {
  expect_series_near("path " + std::to_string(k),
                     coupon_path(c, k, loans, static_cast<int>(want.size())), want, 0, 1e-12);
}

// The only loan's rate month by month over the index paths' months, checked to be the only one.
std::vector<double> only_path(const LoanArrays& loans, const IndexPaths& index) {
  const CouponPaths c = arm_coupon_paths(loans, index);
  EXPECT_EQ(c.loans, std::vector<std::uint32_t>{0});
  expect_well_formed(c, loans);
  return c.loans.size() == 1 ? coupon_path(c, 0, loans, index.months) : std::vector<double>{};
}

// ---- reset schedule and limits

TEST(ArmCouponPaths, FiveOneArmUnderARisingIndex) {
  // Index 3.5% in month 1, up 0.25% a month: month t reads 3.5% + 0.25% (t - 1).
  std::vector<double> index;
  for (int t = 1; t <= 40; ++t) index.push_back(0.035 + 0.0025 * (t - 1));
  const LoanArrays loans = make_loans({five_one()});
  const CouponPaths c = arm_coupon_paths(loans, one_index(index));
  ASSERT_EQ(c.loans, std::vector<std::uint32_t>{0});
  expect_well_formed(c, loans);
  // hand-computed: age 58, so loan months 61, 73, 85, 97 are projection months 3, 15, 27, 39.
  //   month 3:  4.00% + 2.75% = 6.75%, periodic cap 4% + 2% -> 6%
  //   month 15: 7.00% + 2.75% = 9.75%, periodic cap 6% + 2% -> 8%
  //   month 27: 10.00% + 2.75% = 12.75%, periodic cap 10%, lifetime cap -> 9%
  //   month 39: 13.00% + 2.75% = 15.75%, periodic cap 11%, lifetime cap -> 9%
  expect_path(c, 0, loans, runs({{2, 0.04}, {12, 0.06}, {12, 0.08}, {14, 0.09}}));
  // The changes themselves: the resets that move the rate; month 39's 9% repeats month 27's.
  ASSERT_EQ(c.changes.size(), 3u);
  EXPECT_EQ(c.changes[0].month, 3);
  EXPECT_EQ(c.changes[1].month, 15);
  EXPECT_EQ(c.changes[2].month, 27);
  EXPECT_EQ(c.changes[2].rate, 0.09);
}

TEST(ArmCouponPaths, IndexPlusMarginWithinTheLimitsIsTheNewRate) {
  const std::vector<double> p =
      only_path(make_loans({five_one()}), constant_index(0.0225, 20));
  // hand-computed: 2.25% + 2.75% = 5%, within 4% +/- 2%, above the floor, below 9%.
  expect_series_near("path", p, runs({{2, 0.04}, {18, 0.05}}), 0, 1e-12);
}

TEST(ArmCouponPaths, PeriodicCapBindsDownThenUp) {
  TestLoan loan = five_one();
  loan.rate = 0.07;
  loan.arm_lifetime_cap = 0.12;
  // Index 1% at the first two resets (months 3, 15), then 9% (month 27).
  const std::vector<double> index = runs({{26, 0.01}, {4, 0.09}});
  // hand-computed: month 3: 1% + 2.75% = 3.75%, held to 7% - 2% = 5%; month 15: 3.75%, within
  // 5% +/- 2%; month 27: 9% + 2.75% = 11.75%, held to 3.75% + 2% = 5.75%.
  expect_series_near("path", only_path(make_loans({loan}), one_index(index)),
                     runs({{2, 0.07}, {12, 0.05}, {12, 0.0375}, {4, 0.0575}}), 0, 1e-12);
}

TEST(ArmCouponPaths, LifetimeCapBinds) {
  TestLoan loan = bare_arm(0.05, 0.025, 58, 61, 12);
  loan.arm_lifetime_cap = 0.08;
  // hand-computed: 7% + 2.5% = 9.5%, above the 8% lifetime cap (no periodic cap).
  expect_series_near("path", only_path(make_loans({loan}), constant_index(0.07, 10)),
                     runs({{2, 0.05}, {8, 0.08}}), 0, 1e-12);
}

TEST(ArmCouponPaths, FloorBinds) {
  TestLoan loan = bare_arm(0.05, 0.025, 58, 61, 12);
  loan.arm_floor = 0.045;
  // hand-computed: 0.5% + 2.5% = 3%, below the 4.5% floor.
  expect_series_near("path", only_path(make_loans({loan}), constant_index(0.005, 10)),
                     runs({{2, 0.05}, {8, 0.045}}), 0, 1e-12);
}

TEST(ArmCouponPaths, MissingFloorIsTheMargin) {
  const LoanArrays loans = make_loans({bare_arm(0.05, 0.025, 58, 61, 12)});
  // common practice: with no floor stated the rate does not go below the margin.
  // hand-computed: -0.2% + 2.5% = 2.3% -> the 2.5% margin.
  expect_series_near("path", only_path(loans, constant_index(-0.002, 10)),
                     runs({{2, 0.05}, {8, 0.025}}), 0, 1e-12);
  // hand-computed: 0.1% + 2.5% = 2.6%, above the margin: not floored.
  expect_series_near("path", only_path(loans, constant_index(0.001, 10)),
                     runs({{2, 0.05}, {8, 0.026}}), 0, 1e-12);
}

TEST(ArmCouponPaths, MissingCapsAreUnlimited) {
  // hand-computed: 15% + 2.5% = 17.5%, 12.5 points above the note rate in one reset; then 1%
  // + 2.5% = 3.5%, 14 points down.
  const std::vector<double> index = runs({{14, 0.15}, {6, 0.01}});
  expect_series_near("path",
                     only_path(make_loans({bare_arm(0.05, 0.025, 58, 61, 12)}), one_index(index)),
                     runs({{2, 0.05}, {12, 0.175}, {6, 0.035}}), 0, 1e-12);
}

TEST(ArmCouponPaths, NeverBelowTheServicingFee) {
  // A zero margin, so the floor (the margin) is 0: -0.4% + 0 -> 0 -> the 0.25% servicing fee.
  expect_series_near("path",
                     only_path(make_loans({bare_arm(0.03, 0.0, 58, 61, 12)}),
                               constant_index(-0.004, 10)),
                     runs({{2, 0.03}, {8, 0.0025}}), 0, 1e-12);
  // A stated floor below the fee: 0.1% floor, 0.5% fee -> 0.5%.
  TestLoan loan = bare_arm(0.03, 0.0, 58, 61, 12);
  loan.arm_floor = 0.001;
  loan.servicing = 0.005;
  expect_series_near("path", only_path(make_loans({loan}), constant_index(-0.004, 10)),
                     runs({{2, 0.03}, {8, 0.005}}), 0, 1e-12);
}

TEST(ArmCouponPaths, LoanPastItsFirstResetResetsOnTheSchedule) {
  // Index 1% + t/1000 in month t, margin 2.5%, no caps.
  std::vector<double> index;
  for (int t = 1; t <= 30; ++t) index.push_back(0.01 + t / 1000.0);
  // hand-computed: age 70, first reset 61, every 12: next loan month 73 = projection month 3,
  // then 85 = month 15, 97 = month 27. Rates 2.5% + 1.3%, 1.5%, 2.7%.
  expect_series_near("age 70",
                     only_path(make_loans({bare_arm(0.06, 0.025, 70, 61, 12)}), one_index(index)),
                     runs({{2, 0.06}, {12, 0.038}, {12, 0.050}, {4, 0.062}}), 0, 1e-12);
  // hand-computed: age 73, the reset at loan month 73 is past: next at 85 = projection month 12.
  expect_series_near("age 73",
                     only_path(make_loans({bare_arm(0.06, 0.025, 73, 61, 12)}), one_index(index)),
                     runs({{11, 0.06}, {12, 0.047}, {7, 0.059}}), 0, 1e-12);
  // hand-computed: age 61, month 61 (the first reset) was paid before cut-off: next at 73 =
  // projection month 12.
  expect_series_near("age 61",
                     only_path(make_loans({bare_arm(0.06, 0.025, 61, 61, 12)}), one_index(index)),
                     runs({{11, 0.06}, {12, 0.047}, {7, 0.059}}), 0, 1e-12);
  // hand-computed: age 60, the first reset (61) falls in projection month 1, which the tape's
  // note rate already includes; the path resets from month 7, every 6 months.
  expect_series_near("age 60",
                     only_path(make_loans({bare_arm(0.06, 0.025, 60, 61, 6)}), one_index(index)),
                     runs({{6, 0.06}, {6, 0.042}, {6, 0.048}, {6, 0.054}, {6, 0.060}}), 0, 1e-12);
  // hand-computed: a monthly-reset ARM past its first reset changes from month 2 on.
  std::vector<double> monthly = {0.06};
  for (int t = 2; t <= 30; ++t) monthly.push_back(0.035 + t / 1000.0);
  expect_series_near("monthly",
                     only_path(make_loans({bare_arm(0.06, 0.025, 70, 61, 1)}), one_index(index)),
                     monthly, 0, 1e-12);
}

TEST(ArmCouponPaths, ResetAfterTheIndexPathGetsItsLastValue) {
  // Index rates for 4 months only, in paths that run 20 months.
  IndexPaths index = one_index({0.01, 0.02, 0.03, 0.04});
  index.months = 20;
  // hand-computed: resets at months 3 (3% + 2.5%) and 15 (past the index's end: 4% + 2.5%).
  expect_series_near("path",
                     only_path(make_loans({bare_arm(0.06, 0.025, 58, 61, 12)}), index),
                     runs({{2, 0.06}, {12, 0.055}, {6, 0.065}}), 0, 1e-12);
}

TEST(ArmCouponPaths, ListsArmsOnlyInLoanOrder) {
  TestLoan fixed = five_one("FIXED");
  fixed.amortization = Amortization::fixed;  // carries ARM columns, as sellers' tapes do
  TestLoan io = five_one("IO");
  io.amortization = Amortization::interest_only;
  io.io_months = 120;
  io.arm_index = "CMT1Y";  // not projected: no matter, it is not an ARM
  TestLoan second = bare_arm(0.05, 0.02, 58, 61, 12);
  second.arm_index = "CMT1Y";
  IndexPaths index;
  index.months = 5;
  index.names = {"CMT1Y", "SOFR30A"};
  index.rates = {std::vector<double>(5, 0.04), std::vector<double>(5, 0.01)};
  const LoanArrays loans = make_loans({fixed, five_one("A1"), io, second, fixed});
  const CouponPaths c = arm_coupon_paths(loans, index);
  ASSERT_EQ(c.loans, (std::vector<std::uint32_t>{1, 3}));
  expect_well_formed(c, loans);
  EXPECT_EQ(c.begin, (std::vector<std::uint32_t>{0, 1, 2}));
  // hand-computed: A1 (SOFR30A) 1% + 2.75% = 3.75%; the other (CMT1Y) 4% + 2% = 6%.
  expect_path(c, 0, loans, runs({{2, 0.04}, {3, 0.0375}}));
  expect_path(c, 1, loans, runs({{2, 0.05}, {3, 0.06}}));
}

TEST(ArmCouponPaths, NoArmsGiveAnEmptyListTheEngineAccepts) {
  TestLoan fixed = five_one("FIXED");
  fixed.amortization = Amortization::fixed;
  const LoanArrays loans = make_loans({fixed});
  const CouponPaths c = arm_coupon_paths(loans, IndexPaths{});
  EXPECT_TRUE(c.loans.empty());
  EXPECT_TRUE(c.begin.empty());
  EXPECT_TRUE(c.changes.empty());
  ProjectionOptions o = one_thread();
  o.coupons = &c;
  EXPECT_EQ(project_pool(loans, Assumptions{}, o).pool.months, 302);
}

// ---- errors

TEST(ArmCouponPaths, UnknownIndexNamesTheLoanRowAndIndex) {
  TestLoan loan = five_one("LN-0042");
  loan.arm_index = "CMT1Y";
  const LoanArrays loans = make_loans({five_one("LN-0001"), loan});
  try {
    arm_coupon_paths(loans, constant_index(0.03, 12));
    FAIL() << "no exception";
  } catch (const std::invalid_argument& e) {
    const std::string what = e.what();
    EXPECT_NE(what.find("LN-0042"), std::string::npos) << what;
    EXPECT_NE(what.find("row 3"), std::string::npos) << what;
    EXPECT_NE(what.find("CMT1Y"), std::string::npos) << what;
  }
  // Exact names only: a differently spelt name is not the same index.
  EXPECT_THROW(arm_coupon_paths(make_loans({five_one()}), constant_index(0.03, 12, "sofr30a")),
               std::invalid_argument);
}

TEST(ArmCouponPaths, ArmWithoutAnIndexOrMarginIsAnError) {
  TestLoan no_index = five_one("NOIDX");
  no_index.arm_index = "";
  EXPECT_THROW(arm_coupon_paths(make_loans({no_index}), constant_index(0.03, 12)),
               std::invalid_argument);
  TestLoan no_margin = five_one("NOMARGIN");
  no_margin.arm_margin = kNaN;
  try {
    arm_coupon_paths(make_loans({no_margin}), constant_index(0.03, 12));
    FAIL() << "no exception";
  } catch (const std::invalid_argument& e) {
    EXPECT_NE(std::string(e.what()).find("NOMARGIN"), std::string::npos) << e.what();
  }
  TestLoan no_period = five_one("NOPERIOD");
  no_period.arm_reset_period = 0;
  EXPECT_THROW(arm_coupon_paths(make_loans({no_period}), constant_index(0.03, 12)),
               std::invalid_argument);
  EXPECT_THROW(arm_coupon_paths(make_loans({five_one()}), constant_index(kNaN, 12)),
               std::invalid_argument);
  EXPECT_THROW(arm_coupon_paths(make_loans({five_one()}), IndexPaths{}), std::invalid_argument);
}

// ---- the paths in the projection

TEST(ArmCouponPaths, ArmWhoseIndexPlusMarginIsItsNoteRateFlowsLikeAFixedTwin) {
  // identity: index 3% + margin 2.5% = the 5.5% note rate at every reset, no caps, so the ARM
  // pays like the same loan at a fixed 5.5%.
  TestLoan arm = bare_arm(0.055, 0.025, 30, 61, 12);
  TestLoan fixed = arm;
  fixed.amortization = Amortization::fixed;
  const Assumptions a{.prepay = constant_curve(0.08),
                      .default_rate = constant_curve(0.01),
                      .lag_months = 6,
                      .advancing = Advancing::interest};
  const LoanArrays arm_loans = make_loans({arm});
  const CouponPaths c = arm_coupon_paths(arm_loans, constant_index(0.03, 330));
  ASSERT_EQ(c.loans.size(), 1u);
  for (const CouponChange& change : c.changes) ASSERT_NEAR(change.rate, 0.055, 1e-15);
  ProjectionOptions o = one_thread();
  o.coupons = &c;
  const PoolFlows got = project_pool(arm_loans, a, o).pool;
  const PoolFlows want = project_pool(make_loans({fixed}), a, one_thread()).pool;
  ASSERT_EQ(got.months, want.months);
  for (const DollarColumn& col : kDollarColumns)
    expect_series_near(col.name, got.*col.member, want.*col.member, 1e-9, 1e-9);
}

TEST(ArmCouponPaths, ResetToANewRateReamortisesTheBalanceLeft) {
  // Index 4.5% + margin 2.5% = 7% at the first reset (loan month 61 = projection month 3) for a
  // 4% ARM; no caps. No prepayment or default.
  const TestLoan arm = bare_arm(0.04, 0.025, 58, 61, 12);
  const LoanArrays loans = make_loans({arm});
  const CouponPaths c = arm_coupon_paths(loans, constant_index(0.045, 302));
  ProjectionOptions o = one_thread();
  o.coupons = &c;
  const PoolFlows f = project_pool(loans, Assumptions{}, o).pool;
  ASSERT_EQ(f.months, 302);

  // hand-computed: two level payments at 4% over 302 months, then the balance left re-amortised
  // at 7% over the 300 months left.
  const double first = level_payment(100'000, 0.04, 302);
  for (int t = 1; t <= 2; ++t) EXPECT_NEAR(scheduled_payment(f, t), first, 1e-8) << t;
  const double balance = balance_after(100'000, 0.04, 302, 2);
  ASSERT_NEAR(f.begin_balance[2], balance, 1e-6);
  const double reset = level_payment(balance, 0.07, 300);
  for (int t = 3; t <= 302; ++t)
    ASSERT_NEAR(scheduled_payment(f, t), reset, 1e-7) << t;
  EXPECT_NEAR(f.gross_interest[2], balance * 0.07 / 12, 1e-8);
  EXPECT_NEAR(f.net_interest[2], balance * (0.07 - 0.0025) / 12, 1e-8);

  // identity: from month 3 on, the same as a fixed 7% loan of that balance with 300 months left.
  TestLoan twin = arm;
  twin.amortization = Amortization::fixed;
  twin.upb = f.begin_balance[2];
  twin.rate = 0.07;
  twin.remaining = 300;
  twin.age = 60;
  const PoolFlows g = project_pool(make_loans({twin}), Assumptions{}, one_thread()).pool;
  ASSERT_EQ(g.months, 300);
  for (const DollarColumn& col : kDollarColumns) {
    const std::vector<double>& v = f.*col.member;
    expect_series_near(col.name, {v.begin() + 2, v.end()}, g.*col.member, 1e-9, 1e-9);
  }
}

TEST(ArmCouponPaths, PathsShorterThanTheProjectionHoldTheirLastRate) {
  // identity: paths for 20 months project the same as those paths held to maturity by hand.
  const TestLoan arm = bare_arm(0.04, 0.025, 58, 61, 12);
  const LoanArrays loans = make_loans({arm});
  std::vector<double> index;
  for (int t = 1; t <= 302; ++t) index.push_back(0.02 + t / 10'000.0);
  const CouponPaths full = arm_coupon_paths(loans, one_index(index));
  IndexPaths short_index = one_index(index);
  short_index.months = 20;
  const CouponPaths held = arm_coupon_paths(loans, short_index);
  ASSERT_EQ(held.changes.size(), 2u);  // resets in months 3 and 15 only
  EXPECT_GT(full.changes.size(), held.changes.size());  // the full index path resets again
  std::vector<double> padded = coupon_path(held, 0, loans, 20);
  padded.resize(302, padded.back());
  const CouponPaths by_hand = coupon_changes({0}, 302, padded);
  const Assumptions a{.prepay = constant_curve(0.06)};
  ProjectionOptions o1 = one_thread(), o2 = one_thread();
  o1.coupons = &held;
  o2.coupons = &by_hand;
  const PoolFlows f1 = project_pool(loans, a, o1).pool;
  const PoolFlows f2 = project_pool(loans, a, o2).pool;
  for (const DollarColumn& col : kDollarColumns)
    EXPECT_EQ(f1.*col.member, f2.*col.member) << col.name;
}

TEST(ArmCouponPaths, ChangesProjectToTheSameBitsAsTheirMonthByMonthForm) {
  // identity: the engine reads arm_coupon_paths' changes (no month-1 entries at the note rate)
  // exactly as the same rates month by month through coupon_changes (a month-1 entry for every
  // loan), to the bit, on a random tape whose ARMs carry varied reset terms and a moving index.
  std::vector<TestLoan> tape = random_test_loans(4'000, 2718);
  for (std::size_t i = 0; i < tape.size(); ++i) {
    TestLoan& t = tape[i];
    if (t.amortization != Amortization::arm) continue;
    t.arm_index = i % 2 ? "SOFR30A" : "CMT1Y";
    t.arm_margin = 0.02 + 0.0025 * static_cast<double>(i % 5);
    if (i % 3) t.arm_periodic_cap = 0.01 * static_cast<double>(i % 3);
    if (i % 4) t.arm_lifetime_cap = t.rate + 0.05;
    t.arm_first_reset = 1 + static_cast<int>(i % 84);
    t.arm_reset_period = i % 3 == 0 ? 1 : i % 3 == 1 ? 6 : 12;
  }
  const LoanArrays loans = make_loans(tape);
  IndexPaths index;
  index.months = 300;
  index.names = {"CMT1Y", "SOFR30A"};
  index.rates.resize(2);
  for (int t = 1; t <= 300; ++t) {
    index.rates[0].push_back(0.03 + 0.02 * std::sin(t / 17.0));
    index.rates[1].push_back(0.025 + 0.015 * std::cos(t / 23.0) + (t > 120 ? 0.01 : 0.0));
  }
  const CouponPaths sparse = arm_coupon_paths(loans, index);
  ASSERT_GT(sparse.loans.size(), 100u);
  expect_well_formed(sparse, loans);
  const CouponPaths dense =
      coupon_changes(sparse.loans, index.months, coupon_rates(sparse, loans, index.months));
  ASSERT_GT(dense.changes.size(), sparse.changes.size());

  const Assumptions a{.prepay = standard_curve(CurveShape::psa, 2.0),
                      .default_rate = constant_curve(0.02),
                      .lag_months = 6,
                      .advancing = Advancing::interest};
  expect_same_bits_as_month_by_month(loans, a, sparse, dense,
                                     monthly_discount_factors(0.05, 1 + 480 + 6 + 1));
}

}  // namespace
}  // namespace poolbid
