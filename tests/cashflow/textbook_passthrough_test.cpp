// Tests project_pool against the textbook 100 PSA pass-through (DESIGN.md section 8), and that
// splitting the pool into identical loans changes no pool row.
#include <gtest/gtest.h>

#include <cmath>
#include <string>
#include <vector>

#include "cashflow/cashflow.h"
#include "tests/cashflow/flows_support.h"

namespace poolbid {
namespace {

using testing_support::expect_series_near;
using testing_support::kDollarColumns;
using testing_support::make_loans;
using testing_support::TestLoan;

// $400,000,000 of 8.125% mortgages, 0.625% servicing (7.5% pass-through), 357 months remaining,
// 3 months seasoned, split into `pieces` identical loans.
LoanArrays textbook_pool(int pieces) {
  std::vector<TestLoan> loans;
  for (int k = 0; k < pieces; ++k)
    loans.push_back({.id = "P" + std::to_string(k),
                     .upb = 400'000'000.0 / pieces,
                     .rate = 0.08125,
                     .remaining = 357,
                     .age = 3,
                     .servicing = 0.00625,
                     .original_term = 360});
  return make_loans(loans);
}

Assumptions psa_100() {
  Assumptions a;
  a.prepay = standard_curve(CurveShape::psa, 1.0);  // 100 PSA on the loan-age clock
  return a;                                 // no default
}

TEST(TextbookPassThrough, MonthOne) {
  const PoolFlows f = project_pool(textbook_pool(1), psa_100()).pool;
  ASSERT_GE(f.months, 100);
  // source: Fabozzi, Bond Markets, Analysis and Strategies, 100 PSA pass-through exhibit
  // (values as quoted in DESIGN.md section 8), month 1.
  EXPECT_NEAR(f.smm[0], 0.00067, 5e-6);                                     // source: Fabozzi
  EXPECT_NEAR(f.sched_principal[0] + f.gross_interest[0], 2'975'868, 1.0);  // source: Fabozzi
  EXPECT_NEAR(f.net_interest[0], 2'500'000, 1.0);                           // source: Fabozzi
  EXPECT_NEAR(f.sched_principal[0], 267'535, 1.0);                          // source: Fabozzi
  EXPECT_NEAR(f.prepayment[0], 267'470, 1.0);                               // source: Fabozzi
  EXPECT_NEAR(f.total_principal[0], 535'005, 1.0);                          // source: Fabozzi
  EXPECT_NEAR(f.cash_flow[0], 3'035'005, 1.0);                              // source: Fabozzi
  EXPECT_DOUBLE_EQ(f.begin_balance[0], 400'000'000);  // identity: the cut-off balance
  EXPECT_DOUBLE_EQ(f.cutoff_balance, 400'000'000);    // identity: the cut-off balance
}

TEST(TextbookPassThrough, MonthHundred) {
  const PoolFlows f = project_pool(textbook_pool(1), psa_100()).pool;
  ASSERT_GE(f.months, 100);
  const int k = 99;  // month 100
  // source: Fabozzi, Bond Markets, Analysis and Strategies, 100 PSA pass-through exhibit
  // (values as quoted in DESIGN.md section 8), month 100.
  EXPECT_NEAR(f.begin_balance[k], 231'249'776, 1.0);                        // source: Fabozzi
  EXPECT_NEAR(f.sched_principal[k] + f.gross_interest[k], 1'898'682, 1.0);  // source: Fabozzi
  EXPECT_NEAR(f.net_interest[k], 1'445'311, 1.0);                           // source: Fabozzi
  EXPECT_NEAR(f.sched_principal[k], 332'928, 1.0);                          // source: Fabozzi
}

TEST(TextbookPassThrough, RunsToTheLastMonth) {
  const PoolFlows f = project_pool(textbook_pool(1), psa_100()).pool;
  EXPECT_EQ(f.months, 357);              // identity: 357 months remaining, no defaults
  EXPECT_EQ(f.end_balance.back(), 0.0);  // identity: fully amortised
  // 100 PSA from month 27 on (loan age 30+): 6% CPR, SMM 0.0051430.
  // source: SMM formula as taught in standard fixed-income texts, e.g. Fabozzi (DESIGN.md 8)
  EXPECT_NEAR(f.smm[26], 0.0051430, 5e-8);
  EXPECT_NEAR(f.cpr[26], 6.0, 1e-9);          // identity: 100 PSA at age 30, in percent
  EXPECT_NEAR(f.cpr[0], 6.0 * 4 / 30, 1e-9);  // identity: 100 PSA at age 4
}

TEST(TextbookPassThrough, SplitIntoIdenticalLoans) {
  const PoolFlows one = project_pool(textbook_pool(1), psa_100()).pool;
  for (int pieces : {2, 5, 8, 1000}) {
    SCOPED_TRACE(::testing::Message() << pieces << " loans");
    const PoolFlows many = project_pool(textbook_pool(pieces), psa_100()).pool;
    ASSERT_EQ(many.months, one.months);
    EXPECT_NEAR(many.cutoff_balance, one.cutoff_balance, 1e-12 * one.cutoff_balance);
    // identity: n loans of B/n give the pool rows of one loan of B (up to the rounding of sums).
    for (const auto& c : kDollarColumns)
      expect_series_near(c.name, many.*c.member, one.*c.member, 1e-12, 1e-6);
    expect_series_near("smm", many.smm, one.smm, 1e-9, 1e-15);
    expect_series_near("cpr", many.cpr, one.cpr, 1e-9, 1e-12);
  }
}

}  // namespace
}  // namespace poolbid
