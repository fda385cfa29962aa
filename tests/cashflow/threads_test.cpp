// Tests that project_pool gives bit-identical pool tables and per-loan totals for any thread count.
#include <gtest/gtest.h>

#include <cmath>
#include <cstring>
#include <string>
#include <vector>

#include "cashflow/cashflow.h"
#include "tests/cashflow/flows_support.h"

namespace poolbid {
namespace {

using namespace testing_support;

// Bitwise equality of two double vectors (== would also pass -0.0 against 0.0 and fail NaN).
void expect_same_bits(const std::vector<double>& a, const std::vector<double>& b,
                      const std::string& what) {
  ASSERT_EQ(a.size(), b.size()) << what;
  EXPECT_EQ(std::memcmp(a.data(), b.data(), a.size() * sizeof(double)), 0) << what;
}

void expect_same_projection(const Projection& a, const Projection& b) {
  EXPECT_EQ(a.pool.months, b.pool.months);
  EXPECT_EQ(std::memcmp(&a.pool.cutoff_balance, &b.pool.cutoff_balance, sizeof(double)), 0);
  const auto ca = all_columns(a.pool), cb = all_columns(b.pool);
  ASSERT_EQ(ca.size(), cb.size());
  for (std::size_t k = 0; k < ca.size(); ++k)
    expect_same_bits(*ca[k].second, *cb[k].second, std::string("pool ") + ca[k].first);
  const std::pair<const char*, std::vector<double> LoanFlows::*> loan_columns[] = {
      {"sched_principal", &LoanFlows::sched_principal},
      {"prepayment", &LoanFlows::prepayment},
      {"defaults", &LoanFlows::defaults},
      {"loss", &LoanFlows::loss},
      {"recovery", &LoanFlows::recovery},
      {"gross_interest", &LoanFlows::gross_interest},
      {"servicing", &LoanFlows::servicing},
      {"net_interest", &LoanFlows::net_interest},
      {"advanced_interest", &LoanFlows::advanced_interest},
      {"cash_flow", &LoanFlows::cash_flow},
      {"wal_years", &LoanFlows::wal_years},
      {"present_value", &LoanFlows::present_value},
  };
  for (const auto& [name, member] : loan_columns)
    expect_same_bits(a.loans.*member, b.loans.*member, std::string("loans ") + name);
  EXPECT_EQ(a.loans.last_month, b.loans.last_month);
}

TEST(Threads, SameBitsForAnyThreadCount) {
  const LoanArrays loans = make_loans(random_test_loans(20'000, 424'242));
  // Coupon paths for every 50th loan: a step up after a year, then a step down.
  CouponPaths paths;
  paths.months = 36;
  for (std::uint32_t i = 0; i < loans.size(); i += 50) {
    paths.loans.push_back(i);
    for (int t = 1; t <= paths.months; ++t)
      paths.rates.push_back(loans.note_rate[i] + (t > 12 ? 0.02 : 0.0) - (t > 30 ? 0.01 : 0.0));
  }
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
