// Tests that project_pool gives bit-identical pool tables and per-loan totals for any thread count.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdint>
#include <string>
#include <utility>
#include <vector>

#include "cashflow/cashflow.h"
#include "tests/cashflow/flows_support.h"

namespace poolbid {
namespace {

using namespace testing_support;

TEST(Threads, SameBitsForAnyThreadCount) {
  const LoanArrays loans = make_loans(random_test_loans(20'000, 424'242));
  // Coupon paths for every 50th loan: a step up after a year, then a step down.
  const int months = 36;
  std::vector<std::uint32_t> listed;
  std::vector<double> rates;
  for (std::uint32_t i = 0; i < loans.size(); i += 50) {
    listed.push_back(i);
    for (int t = 1; t <= months; ++t)
      rates.push_back(loans.note_rate[i] + (t > 12 ? 0.02 : 0.0) - (t > 30 ? 0.01 : 0.0));
  }
  const CouponPaths paths = coupon_changes(std::move(listed), months, rates);
  std::vector<double> discount(1 + 480 + 24 + 1);
  for (std::size_t t = 0; t < discount.size(); ++t)
    discount[t] = std::pow(1 + 0.05 / 12, -static_cast<double>(t));

  const Assumptions sets[] = {
      {.prepay = standard_curve(CurveShape::psa, 1.5),
       .default_rate = standard_curve(CurveShape::sda, 2.0),
       .severity = constant_curve(0.45),
       .lag_months = 12,
       .advancing = Advancing::interest,
       .delinquent_default = true},
      {.prepay = ramp_curve(0.02, 0.15, 24),
       .default_rate = constant_curve(0.01),
       .severity = vector_curve({0.3, 0.4, 0.5}),
       .lag_months = 0},
      {.prepay = constant_curve(0.0), .default_rate = constant_curve(0.0)},
  };
  for (std::size_t s = 0; s < std::size(sets); ++s) {
    for (bool with_paths : {false, true}) {
      SCOPED_TRACE(::testing::Message() << "assumption set " << s << (with_paths ? ", paths" : ""));
      ProjectionOptions o;
      o.loan_totals = true;
      o.discount = discount;
      o.coupons = with_paths ? &paths : nullptr;
      o.threads = 1;
      const Projection one = project_pool(loans, sets[s], o);
      ASSERT_GT(one.pool.months, 0);
      ASSERT_EQ(one.loans.size(), loans.size());
      for (unsigned threads : {2u, 3u, 8u, 0u}) {
        SCOPED_TRACE(::testing::Message() << threads << " threads");
        o.threads = threads;
        // identity: results do not depend on the number of threads, to the bit
        expect_same_projection(project_pool(loans, sets[s], o), one);
      }
    }
  }
}

// Pool sums only (no per-loan totals) take the same path for every thread count as well.
TEST(Threads, PoolOnlySameBits) {
  const LoanArrays loans = make_loans(random_test_loans(20'000, 99));
  const Assumptions a{.prepay = constant_curve(0.1),
                      .default_rate = constant_curve(0.03),
                      .lag_months = 6,
                      .advancing = Advancing::interest};
  ProjectionOptions o;
  o.threads = 1;
  const Projection one = project_pool(loans, a, o);
  for (unsigned threads : {2u, 3u, 8u}) {
    SCOPED_TRACE(::testing::Message() << threads << " threads");
    o.threads = threads;
    const Projection many = project_pool(loans, a, o);
    EXPECT_EQ(many.loans.size(), 0u);
    expect_same_projection(many, one);
  }
}

}  // namespace
}  // namespace poolbid
