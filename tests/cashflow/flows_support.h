// Test support for cashflow/: random loan tapes, independent level-payment arithmetic (payments,
// balances left), padding and summing PoolFlows, vector comparisons that report the first few
// mismatches, not thousands, bitwise comparisons of projections, coupon changes written out month
// by month, and monthly discount factors.
#pragma once

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <random>
#include <string>
#include <vector>

#include "cashflow/cashflow.h"
#include "tests/support/loans.h"

namespace poolbid::testing_support {

// Level payment on `balance` over `months` at annual rate `rate` (monthly rate rate / 12), by the
// annuity formula; straight line when the rate is zero. Written here, not taken from the engine.
inline double level_payment(double balance, double rate, int months) {
  if (rate == 0) return balance / months;
  const double r = rate / 12;
  return balance * r / (1 - std::pow(1 + r, -months));
}

// The balance left after `paid` level payments on `balance` at `rate` over `months`, amortised
// here month by month: the balance grows by rate / 12 and the payment comes off.
inline double balance_after(double balance, double rate, int months, int paid) {
  const double payment = level_payment(balance, rate, months);
  for (int t = 1; t <= paid; ++t) balance = balance * (1 + rate / 12) - payment;
  return balance;
}

// Month t's scheduled payment (1-based): scheduled principal plus gross interest.
inline double scheduled_payment(const PoolFlows& f, int t) {
  return f.sched_principal[t - 1] + f.gross_interest[t - 1];
}

// A random tape: balances $20k-$1.5M, rates 2-12% in 1/8 steps, servicing 0.125-0.5%, 15-, 20-,
// 30- and 40-year terms at any age; about 10% interest-only (60 or 120 months), 8% balloons (84,
// 120 or 180), 5% ARMs (which keep their note rate here), 8% delinquent in some stage; a handful of
// zero-rate loans (with no servicing fee) and loans in their last month.
inline std::vector<TestLoan> random_test_loans(std::size_t count, std::uint64_t seed) {
  std::mt19937_64 gen(seed);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  auto uniform_int = [&](int lo, int hi) {  // inclusive
    return std::uniform_int_distribution<int>(lo, hi)(gen);
  };
  std::vector<TestLoan> out;
  out.reserve(count);
  for (std::size_t i = 0; i < count; ++i) {
    TestLoan t{.id = "R" + std::to_string(i), .upb = 0, .rate = 0};
    t.upb = std::round((20'000 + 1'480'000 * u(gen) * u(gen)) * 100) / 100;
    t.rate = uniform_int(16, 96) / 800.0;  // 2% .. 12%
    t.servicing = uniform_int(1, 4) * 0.00125;
    static constexpr int kTerms[] = {180, 240, 360, 480};
    t.original_term = kTerms[uniform_int(0, 3)];
    t.age = uniform_int(0, t.original_term - 1);
    t.remaining = t.original_term - t.age;
    const double kind = u(gen);
    if (kind < 0.10) {
      t.amortization = Amortization::interest_only;
      t.io_months = uniform_int(0, 1) ? 120 : 60;
    } else if (kind < 0.18) {
      t.amortization = Amortization::balloon;
      static constexpr int kBalloons[] = {84, 120, 180};
      t.balloon_month = std::min(kBalloons[uniform_int(0, 2)], t.original_term);
      t.age = uniform_int(0, t.balloon_month - 1);  // the balloon is still ahead
      t.remaining = t.original_term - t.age;
    } else if (kind < 0.23) {
      t.amortization = Amortization::arm;
    }
    const double dq = u(gen);
    t.delinquency = dq < 0.02   ? Delinquency::dq30
                    : dq < 0.04 ? Delinquency::dq60
                    : dq < 0.06 ? Delinquency::dq90_plus
                    : dq < 0.08 ? Delinquency::foreclosure
                    : dq < 0.09 ? Delinquency::unknown
                                : Delinquency::current;
    // a zero-rate loan now and then, with no fee (a fee may not exceed the note rate)
    if (i % 97 == 5) t.rate = t.servicing = 0;
    if (i % 89 == 7) t.remaining = 1;  // and one in its last month
    out.push_back(t);
  }
  return out;
}

// The loan at `i` alone, as a one-loan LoanArrays (every field copied).
inline LoanArrays single_loan(const LoanArrays& a, std::size_t i) {
  LoanArrays o;
  o.seller_names = a.seller_names;
  o.arm_index_names = a.arm_index_names;
  o.loan_id = {a.loan_id[i]};
  o.row = {a.row[i]};
  o.seller = {a.seller[i]};
  o.current_balance = {a.current_balance[i]};
  o.original_balance = {a.original_balance[i]};
  o.note_rate = {a.note_rate[i]};
  o.servicing_fee = {a.servicing_fee[i]};
  o.original_term = {a.original_term[i]};
  o.remaining_term = {a.remaining_term[i]};
  o.age = {a.age[i]};
  o.amortization = {a.amortization[i]};
  o.io_months = {a.io_months[i]};
  o.balloon_month = {a.balloon_month[i]};
  o.arm_index = {a.arm_index[i]};
  o.arm_margin = {a.arm_margin[i]};
  o.arm_periodic_cap = {a.arm_periodic_cap[i]};
  o.arm_lifetime_cap = {a.arm_lifetime_cap[i]};
  o.arm_floor = {a.arm_floor[i]};
  o.arm_first_reset = {a.arm_first_reset[i]};
  o.arm_reset_period = {a.arm_reset_period[i]};
  o.credit_score = {a.credit_score[i]};
  o.original_ltv = {a.original_ltv[i]};
  o.combined_ltv = {a.combined_ltv[i]};
  o.dti = {a.dti[i]};
  o.property_value = {a.property_value[i]};
  o.property_value_date = {a.property_value_date[i]};
  o.occupancy = {a.occupancy[i]};
  o.property_type = {a.property_type[i]};
  o.purpose = {a.purpose[i]};
  o.documentation = {a.documentation[i]};
  o.state = {a.state[i]};
  o.delinquency = {a.delinquency[i]};
  return o;
}

// The dollar vectors of PoolFlows, by name, for loops over "every column".
struct DollarColumn {
  const char* name;
  std::vector<double> PoolFlows::*member;
};
inline constexpr DollarColumn kDollarColumns[] = {
    {"begin_balance", &PoolFlows::begin_balance},
    {"sched_principal", &PoolFlows::sched_principal},
    {"prepayment", &PoolFlows::prepayment},
    {"defaults", &PoolFlows::defaults},
    {"loss", &PoolFlows::loss},
    {"recovery", &PoolFlows::recovery},
    {"gross_interest", &PoolFlows::gross_interest},
    {"servicing", &PoolFlows::servicing},
    {"net_interest", &PoolFlows::net_interest},
    {"advanced_interest", &PoolFlows::advanced_interest},
    {"total_principal", &PoolFlows::total_principal},
    {"cash_flow", &PoolFlows::cash_flow},
    {"end_balance", &PoolFlows::end_balance},
};

// Every vector of PoolFlows, dollars and speeds, for bitwise comparisons.
inline std::vector<std::pair<const char*, const std::vector<double>*>> all_columns(
    const PoolFlows& f) {
  std::vector<std::pair<const char*, const std::vector<double>*>> out;
  for (const DollarColumn& c : kDollarColumns) out.push_back({c.name, &(f.*c.member)});
  out.push_back({"smm", &f.smm});
  out.push_back({"mdr", &f.mdr});
  out.push_back({"cpr", &f.cpr});
  out.push_back({"cdr", &f.cdr});
  out.push_back({"cum_loss_pct", &f.cum_loss_pct});
  return out;
}

// Month t (1-based) of a column, 0 past its end.
inline double month_value(const std::vector<double>& v, int t) {
  return t >= 1 && static_cast<std::size_t>(t) <= v.size() ? v[t - 1] : 0.0;
}

// Every column of PoolFlows has `months` entries.
inline void expect_sized(const PoolFlows& f) {
  for (const auto& [name, v] : all_columns(f))
    EXPECT_EQ(v->size(), static_cast<std::size_t>(f.months)) << name;
}

// Compares two series month by month: |got - want| <= rel |want| + abs. Reports the first three
// mismatches and the count, so a wrong engine does not print thousands of lines. True if all match.
inline bool expect_series_near(const std::string& what, const std::vector<double>& got,
                               const std::vector<double>& want, double rel, double abs = 0) {
  const std::size_t n = std::max(got.size(), want.size());
  std::size_t bad = 0;
  for (std::size_t k = 0; k < n; ++k) {
    const double g = k < got.size() ? got[k] : 0.0;
    const double w = k < want.size() ? want[k] : 0.0;
    if (std::abs(g - w) <= rel * std::abs(w) + abs) continue;
    if (++bad <= 3)
      ADD_FAILURE() << what << " month " << k + 1 << ": got " << ::testing::PrintToString(g)
                    << ", want " << ::testing::PrintToString(w) << " (diff " << g - w << ")";
  }
  if (bad > 3) ADD_FAILURE() << what << ": " << bad << " months differ in all";
  return bad == 0;
}

// Stops a loop over many loans after a few have failed: `if (budget.spent(ok)) break;`.
struct FailureBudget {
  int loans_left = 5;
  bool spent(bool ok) {
    if (ok || --loans_left > 0) return false;
    ADD_FAILURE() << "stopped after 5 failing loans";
    return true;
  }
};

// Scalars the same way, for per-loan totals.
inline bool near(double got, double want, double rel, double abs = 0) {
  return std::abs(got - want) <= rel * std::abs(want) + abs;
}

// Bitwise equality of two double vectors (== would also pass -0.0 against 0.0 and fail NaN).
inline void expect_same_bits(const std::vector<double>& a, const std::vector<double>& b,
                             const std::string& what) {
  ASSERT_EQ(a.size(), b.size()) << what;
  EXPECT_EQ(std::memcmp(a.data(), b.data(), a.size() * sizeof(double)), 0) << what;
}

// Bitwise equality of two projections: every pool vector and every per-loan total.
inline void expect_same_projection(const Projection& a, const Projection& b) {
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

// The k-th listed loan's rate in months 1 .. months, written out from its changes: its note rate
// until the first change, each change's rate from its month on.
inline std::vector<double> coupon_path(const CouponPaths& c, std::size_t k,
                                       const LoanArrays& loans, int months) {
  std::vector<double> out(static_cast<std::size_t>(months), loans.note_rate[c.loans[k]]);
  for (std::uint32_t j = c.begin[k]; j < c.begin[k + 1]; ++j)
    for (int t = c.changes[j].month; t <= months; ++t)
      out[static_cast<std::size_t>(t - 1)] = c.changes[j].rate;
  return out;
}

// Every listed loan's path over `months`, one after another (coupon_changes' input).
inline std::vector<double> coupon_rates(const CouponPaths& c, const LoanArrays& loans,
                                        int months) {
  std::vector<double> out;
  for (std::size_t k = 0; k < c.loans.size(); ++k) {
    const std::vector<double> path = coupon_path(c, k, loans, months);
    out.insert(out.end(), path.begin(), path.end());
  }
  return out;
}

// `count` discount factors at `rate` a year compounded monthly: entry t is (1 + rate / 12)^-t.
inline std::vector<double> monthly_discount_factors(double rate, std::size_t count) {
  std::vector<double> out(count);
  for (std::size_t t = 0; t < count; ++t) out[t] = std::pow(1 + rate / 12, -static_cast<double>(t));
  return out;
}

// identity: `sparse` coupon changes and `dense`, the same rates month by month through
// coupon_changes, project to the same bits (every pool vector and loan total, present values at
// `discount`). Returns the projection from `sparse`.
inline Projection expect_same_bits_as_month_by_month(const LoanArrays& loans,
                                                     const Assumptions& a,
                                                     const CouponPaths& sparse,
                                                     const CouponPaths& dense,
                                                     const std::vector<double>& discount) {
  ProjectionOptions o;
  o.loan_totals = true;
  o.discount = discount;
  o.coupons = &sparse;
  Projection from_sparse = project_pool(loans, a, o);
  o.coupons = &dense;
  expect_same_projection(from_sparse, project_pool(loans, a, o));  // memcmp of every vector
  return from_sparse;
}

// ProjectionOptions with one worker thread (for many small projections).
inline ProjectionOptions one_thread() {
  ProjectionOptions o;
  o.threads = 1;
  return o;
}

}  // namespace poolbid::testing_support
