// Identities project_pool must keep on random tapes under many assumption sets: balances roll,
// defaults liquidate after the lag, the pool is the sum of its loans, per-loan totals add up, cash
// is interest plus principal, the monthly step follows DESIGN.md section 4, and (without losses)
// discounting at the net rate gives back the balance at any prepayment speed.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <map>
#include <string>
#include <vector>

#include "cashflow/cashflow.h"
#include "tests/cashflow/flows_support.h"

namespace poolbid {
namespace {

using namespace testing_support;

constexpr std::size_t kLoans = 300;
constexpr std::uint64_t kSeed = 20'270'101;

struct Scenario {
  const char* name;
  Assumptions a;
};

std::vector<Scenario> scenarios() {
  std::vector<Scenario> s;
  s.push_back({"none", Assumptions{}});
  s.push_back({"constant",
               {.prepay = constant_curve(0.08),
                .default_rate = constant_curve(0.02),
                .severity = constant_curve(0.35),
                .lag_months = 12}});
  s.push_back({"constant_lag0_advancing",
               {.prepay = constant_curve(0.08),
                .default_rate = constant_curve(0.02),
                .severity = constant_curve(0.35),
                .lag_months = 0,
                .advancing = Advancing::interest}});
  s.push_back({"psa_sda_by_age_advancing",
               {.prepay = standard_curve(CurveShape::psa, 1.5),
                .default_rate = standard_curve(CurveShape::sda, 2.0),
                .severity = constant_curve(0.45),
                .lag_months = 12,
                .advancing = Advancing::interest}});
  s.push_back(
      {"vectors",
       {.prepay = vector_curve({0.02, 0.04, 0.06, 0.08, 0.10, 0.12, 0.09}),
        .default_rate = vector_curve({0.0, 0.01, 0.02, 0.03, 0.04, 0.05}, CurveClock::loan_age),
        .severity = vector_curve({0.10, 0.20, 0.30, 0.40, 0.50, 0.60, 0.45}),
        .lag_months = 6}});
  s.push_back({"ramps_delinquent_advancing",
               {.prepay = ramp_curve(0.02, 0.15, 24),
                .default_rate = ramp_curve(0.0, 0.05, 36, CurveClock::loan_age),
                .severity = ramp_curve(0.60, 0.30, 24),
                .lag_months = 12,
                .advancing = Advancing::interest,
                .delinquent_default = true}});
  s.push_back({"delinquent_only_total_loss",
               {.prepay = constant_curve(0),
                .default_rate = constant_curve(0),
                .severity = constant_curve(1.0),
                .lag_months = 12,
                .advancing = Advancing::interest,
                .delinquent_default = true}});
  s.push_back({"heavy_default_long_lag_advancing",
               {.prepay = constant_curve(0.05),
                .default_rate = constant_curve(0.30),
                .severity = constant_curve(0.90),
                .lag_months = 24,
                .advancing = Advancing::interest}});
  s.push_back(
      {"prepay_only_psa", {.prepay = standard_curve(CurveShape::psa, 3.0), .default_rate = constant_curve(0)}});
  return s;
}

// The loan's last month of payments: remaining term, or the balloon month if that comes first.
int final_month(const LoanArrays& l, std::size_t i) {
  int m = l.remaining_term[i];
  if (l.amortization[i] == Amortization::balloon && l.balloon_month[i] > 0)
    m = std::min(m, l.balloon_month[i] - l.age[i]);
  return m;
}

// The curve month a loan reads in projection month t.
int curve_month(const SpeedCurve& c, const LoanArrays& l, std::size_t i, int t) {
  return c.clock == CurveClock::loan_age ? l.age[i] + t : t;
}

bool defaults_at_once(const Assumptions& a, const LoanArrays& l, std::size_t i) {
  return a.delinquent_default && (l.delinquency[i] == Delinquency::dq90_plus ||
                                  l.delinquency[i] == Delinquency::foreclosure);
}

// One scenario projected once: the pool (with per-loan totals) and every loan alone.
struct ScenarioRun {
  Scenario scenario;
  LoanArrays loans;
  Projection pool;
  std::vector<PoolFlows> singles;
};

const ScenarioRun& projected(std::size_t k) {
  static std::map<std::size_t, ScenarioRun> cache;
  auto it = cache.find(k);
  if (it != cache.end()) return it->second;
  ScenarioRun r{scenarios().at(k), make_loans(random_test_loans(kLoans, kSeed)), {}, {}};
  for (std::size_t i = 0; i < r.loans.size(); ++i)
    if (r.loans.note_rate[i] == 0) r.loans.servicing_fee[i] = 0;  // no negative net rate
  ProjectionOptions o;
  o.threads = 2;
  o.loan_totals = true;
  r.pool = project_pool(r.loans, r.scenario.a, o);
  for (std::size_t i = 0; i < r.loans.size(); ++i)
    r.singles.push_back(project_pool(single_loan(r.loans, i), r.scenario.a, one_thread()).pool);
  return cache.emplace(k, std::move(r)).first->second;
}

class Identities : public ::testing::TestWithParam<std::size_t> {
 protected:
  const ScenarioRun& r() const { return projected(GetParam()); }
};

// ---- (a) amortisation to zero
// ----------------------------------------------------------------------

// Failures recorded so far in the running test, to tell whether a block added any.
int failures_so_far() {
  return ::testing::UnitTest::GetInstance()->current_test_info()->result()->total_part_count();
}

TEST_P(Identities, EveryLoanEndsAtZeroInItsFinalMonth) {
  const ScenarioRun& x = r();
  FailureBudget budget;
  auto check = [&](std::size_t i) {
    const PoolFlows& f = x.singles[i];
    const int last = final_month(x.loans, i);
    SCOPED_TRACE(::testing::Message() << "loan " << i << " final month " << last);
    expect_sized(f);
    ASSERT_GE(f.months, 1);
    if (defaults_at_once(x.scenario.a, x.loans, i)) {
      // the whole balance defaults in month 1 and nothing is paid after it
      EXPECT_EQ(f.defaults[0], x.loans.current_balance[i]);
      EXPECT_EQ(f.end_balance[0], 0.0);
      EXPECT_EQ(f.months, 1 + x.scenario.a.lag_months);
      return;
    }
    ASSERT_GE(f.months, last);
    // identity: a loan amortises to exactly zero in its final month (balloon or last payment)
    EXPECT_EQ(f.end_balance[last - 1], 0.0);
    EXPECT_GT(f.begin_balance[last - 1], 0.0);
    for (int t = last + 1; t <= f.months; ++t) {
      ASSERT_EQ(month_value(f.begin_balance, t), 0.0) << t;
      ASSERT_EQ(month_value(f.sched_principal, t) + month_value(f.prepayment, t) +
                    month_value(f.defaults, t) + month_value(f.gross_interest, t),
                0.0)
          << t;
    }
    // the table runs to the final month, plus the lag if the loan defaulted at all
    bool any_default = false;
    for (double d : f.defaults) any_default |= d > 0;
    const int lag = x.scenario.a.lag_months;
    int last_default = 0;
    for (int t = 1; t <= f.months; ++t)
      if (month_value(f.defaults, t) > 0) last_default = t;
    EXPECT_EQ(f.months, any_default ? std::max(last, last_default + lag) : last);
  };
  for (std::size_t i = 0; i < x.loans.size(); ++i) {
    const int before = failures_so_far();
    check(i);
    if (budget.spent(failures_so_far() == before)) break;
  }
}

TEST_P(Identities, PoolEndsAtZero) {
  const ScenarioRun& x = r();
  const PoolFlows& p = x.pool.pool;
  expect_sized(p);
  ASSERT_GT(p.months, 0);
  EXPECT_EQ(p.end_balance.back(), 0.0);  // identity: every loan is paid off or defaulted
  int longest = 0;
  for (const PoolFlows& f : x.singles) longest = std::max(longest, f.months);
  EXPECT_EQ(p.months, longest);
}

// ---- (b) balance roll
// -------------------------------------------------------------------------------

bool expect_balance_roll(const PoolFlows& f, const std::string& what) {
  std::size_t bad = 0;
  for (int k = 0; k < f.months; ++k) {
    const double lhs = f.begin_balance[k] - f.end_balance[k];
    const double rhs = f.sched_principal[k] + f.prepayment[k] + f.defaults[k];
    // identity: begin - end = scheduled principal + prepayment + defaults
    if (std::abs(lhs - rhs) <= 1e-7 * f.begin_balance[k] + 1e-7) continue;
    if (++bad <= 3)
      ADD_FAILURE() << what << " month " << k + 1 << ": begin - end " << lhs
                    << " vs sched + prepay + defaults " << rhs;
  }
  return bad == 0;
}

TEST_P(Identities, BalanceRolls) {
  const ScenarioRun& x = r();
  expect_balance_roll(x.pool.pool, "pool");
  FailureBudget budget;
  for (std::size_t i = 0; i < x.singles.size(); ++i)
    if (budget.spent(expect_balance_roll(x.singles[i], "loan " + std::to_string(i)))) break;
}

// ---- (c) liquidation after the lag; advances
// ------------------------------------------------------

TEST_P(Identities, DefaultsLiquidateAfterTheLag) {
  const ScenarioRun& x = r();
  const int lag = x.scenario.a.lag_months;
  auto check = [&](const PoolFlows& f, const std::string& what) {
    bool ok = true;
    std::vector<double> liquidated(f.months), shifted(f.months);
    for (int t = 1; t <= f.months; ++t) {
      liquidated[t - 1] = f.loss[t - 1] + f.recovery[t - 1];
      shifted[t - 1] = month_value(f.defaults, t - lag);
    }
    // identity: loss + recovery in month t + lag = defaults in month t
    ok &= expect_series_near(what + " loss + recovery vs defaults lag months earlier", liquidated,
                             shifted, 1e-7, 1e-7);
    // every default is liquidated inside the table
    for (int t = std::max(1, f.months - lag + 1); t <= f.months; ++t) {
      EXPECT_EQ(f.defaults[t - 1], 0.0) << what << " month " << t;
      ok &= f.defaults[t - 1] == 0.0;
    }
    return ok;
  };
  check(x.pool.pool, "pool");
  FailureBudget budget;
  for (std::size_t i = 0; i < x.singles.size(); ++i)
    if (budget.spent(check(x.singles[i], "loan " + std::to_string(i)))) break;
}

TEST_P(Identities, RecoveryAndAdvancesPerLoan) {
  const ScenarioRun& x = r();
  const Assumptions& a = x.scenario.a;
  const int lag = a.lag_months;
  const bool advancing = a.advancing == Advancing::interest;
  std::vector<double> pool_advances(x.pool.pool.months, 0.0);
  FailureBudget budget;
  for (std::size_t i = 0; i < x.singles.size(); ++i) {
    const PoolFlows& f = x.singles[i];
    const double net_rate = x.loans.note_rate[i] - x.loans.servicing_fee[i];
    std::vector<double> advances(f.months, 0.0), recovery(f.months, 0.0), loss(f.months, 0.0);
    for (int t = 1; t <= f.months; ++t) {
      const double d = f.defaults[t - 1];
      if (d == 0) continue;
      const double monthly = advancing ? d * net_rate / 12 : 0.0;
      for (int u = t; u <= t + lag - 1 && u <= f.months; ++u) advances[u - 1] += monthly;
      const double severity = curve_value(a.severity, curve_month(a.severity, x.loans, i, t));
      if (t + lag > f.months) continue;  // reported by DefaultsLiquidateAfterTheLag
      // DESIGN.md 4.6-4.7: recovery = max(0, (1 - severity) D - advances), loss = D - recovery
      recovery[t + lag - 1] += std::max(0.0, (1 - severity) * d - lag * monthly);
      loss[t + lag - 1] += d - std::max(0.0, (1 - severity) * d - lag * monthly);
    }
    const std::string what = "loan " + std::to_string(i);
    bool ok =
        expect_series_near(what + " advanced_interest", f.advanced_interest, advances, 1e-9, 1e-9);
    ok &= expect_series_near(what + " recovery", f.recovery, recovery, 1e-9, 1e-9);
    ok &= expect_series_near(what + " loss", f.loss, loss, 1e-9, 1e-9);
    for (int t = 1; t <= f.months && t <= x.pool.pool.months; ++t)
      pool_advances[t - 1] += advances[t - 1];
    if (budget.spent(ok)) return;
  }
  // identity: the pool advances the sum over the default cohorts still awaiting liquidation
  expect_series_near("pool advanced_interest", x.pool.pool.advanced_interest, pool_advances, 1e-9,
                     1e-9);
}

// ---- the monthly step, loan by loan (DESIGN.md section 4)
// -----------------------------------------

TEST_P(Identities, MonthlyStepPerLoan) {
  const ScenarioRun& x = r();
  const Assumptions& a = x.scenario.a;
  FailureBudget budget;
  for (std::size_t i = 0; i < x.singles.size(); ++i) {
    const PoolFlows& f = x.singles[i];
    const double c = x.loans.note_rate[i], s = x.loans.servicing_fee[i];
    const int last = final_month(x.loans, i);
    std::vector<double> defaults, sched, prepay, gross, servicing;
    for (int t = 1; t <= f.months; ++t) {
      const double b = f.begin_balance[t - 1];
      double d;
      if (t == 1 && defaults_at_once(a, x.loans, i))
        d = b;
      else
        d = mdr_from_cdr(curve_value(a.default_rate, curve_month(a.default_rate, x.loans, i, t))) *
            b;
      const double perf = b - f.defaults[t - 1];  // A, from the engine's own default
      double sp = 0;
      if (perf > 0 && t <= last) {
        const bool balloon = x.loans.amortization[i] == Amortization::balloon &&
                             t == x.loans.balloon_month[i] - x.loans.age[i];
        const bool io = x.loans.amortization[i] == Amortization::interest_only &&
                        x.loans.age[i] + t <= x.loans.io_months[i];
        if (balloon || t == last)
          sp = perf;
        else if (!io)
          sp = level_payment(perf, c, x.loans.remaining_term[i] - t + 1) - perf * c / 12;
      }
      const double smm = smm_from_cpr(curve_value(a.prepay, curve_month(a.prepay, x.loans, i, t)));
      defaults.push_back(d);
      sched.push_back(sp);
      prepay.push_back(smm * (perf - f.sched_principal[t - 1]));
      gross.push_back(perf * c / 12);
      servicing.push_back(perf * s / 12);
    }
    const std::string what = "loan " + std::to_string(i);
    const double scale = 1e-9 * x.loans.current_balance[i];
    // DESIGN.md 4.1: D = MDR x B
    bool ok = expect_series_near(what + " defaults", f.defaults, defaults, 1e-12, scale);
    // DESIGN.md 4.2 and 4.4: SP = level payment over the months left - interest; IO, balloon
    ok &= expect_series_near(what + " sched_principal", f.sched_principal, sched, 1e-9, scale);
    // DESIGN.md 4.5: P = SMM x (A - SP)
    ok &= expect_series_near(what + " prepayment", f.prepayment, prepay, 1e-12, scale);
    // DESIGN.md 4.3: gross A c / 12, servicing A s / 12
    ok &= expect_series_near(what + " gross_interest", f.gross_interest, gross, 1e-12, scale);
    ok &= expect_series_near(what + " servicing", f.servicing, servicing, 1e-12, scale);
    if (budget.spent(ok)) return;
  }
}

// ---- (d) the pool is the sum of its loans
// ---------------------------------------------------------

TEST_P(Identities, PoolIsTheSumOfItsLoans) {
  const ScenarioRun& x = r();
  const PoolFlows& p = x.pool.pool;
  double cutoff = 0;
  for (const PoolFlows& f : x.singles) cutoff += f.cutoff_balance;
  EXPECT_NEAR(p.cutoff_balance, cutoff, 1e-12 * cutoff);
  for (const DollarColumn& c : kDollarColumns) {
    std::vector<double> sum(p.months, 0.0);
    for (const PoolFlows& f : x.singles) {
      const std::vector<double>& v = f.*c.member;
      for (std::size_t k = 0; k < v.size(); ++k) {
        if (k < sum.size())
          sum[k] += v[k];
        else if (v[k] != 0)
          ADD_FAILURE() << c.name << ": a loan has cash in month " << k + 1 << " past the pool's "
                        << p.months;
      }
    }
    // identity: pool = sum of the loans projected alone
    expect_series_near(std::string("pool ") + c.name, p.*c.member, sum, 1e-9, 1e-9);
  }
}

// ---- (e) per-loan totals
// ----------------------------------------------------------------------------

struct TotalColumn {
  const char* name;
  std::vector<double> LoanFlows::*total;
  std::vector<double> PoolFlows::*monthly;
};
constexpr TotalColumn kTotals[] = {
    {"sched_principal", &LoanFlows::sched_principal, &PoolFlows::sched_principal},
    {"prepayment", &LoanFlows::prepayment, &PoolFlows::prepayment},
    {"defaults", &LoanFlows::defaults, &PoolFlows::defaults},
    {"loss", &LoanFlows::loss, &PoolFlows::loss},
    {"recovery", &LoanFlows::recovery, &PoolFlows::recovery},
    {"gross_interest", &LoanFlows::gross_interest, &PoolFlows::gross_interest},
    {"servicing", &LoanFlows::servicing, &PoolFlows::servicing},
    {"net_interest", &LoanFlows::net_interest, &PoolFlows::net_interest},
    {"advanced_interest", &LoanFlows::advanced_interest, &PoolFlows::advanced_interest},
    {"cash_flow", &LoanFlows::cash_flow, &PoolFlows::cash_flow},
};

double total(const std::vector<double>& v) {
  double s = 0;
  for (double x : v) s += x;
  return s;
}

TEST_P(Identities, LoanTotalsAddUp) {
  const ScenarioRun& x = r();
  const LoanFlows& l = x.pool.loans;
  const std::size_t n = x.loans.size();
  ASSERT_EQ(l.size(), n);
  EXPECT_TRUE(l.present_value.empty());  // no discount factors given
  for (const TotalColumn& c : kTotals) {
    ASSERT_EQ((l.*c.total).size(), n) << c.name;
    // identity: per-loan totals sum to the pool's total over all months
    const double pool_total = total(x.pool.pool.*c.monthly);
    EXPECT_NEAR(total(l.*c.total), pool_total, 1e-9 * std::abs(pool_total) + 1e-9) << c.name;
    // identity: each loan's totals are its own projection's totals
    std::size_t bad = 0;
    for (std::size_t i = 0; i < n; ++i) {
      const double want = total(x.singles[i].*c.monthly);
      if (!near((l.*c.total)[i], want, 1e-9, 1e-9) && ++bad <= 3)
        ADD_FAILURE() << c.name << " loan " << i << ": total " << (l.*c.total)[i]
                      << ", its own projection sums to " << want;
    }
  }
  std::size_t bad = 0;
  for (std::size_t i = 0; i < n; ++i) {
    const PoolFlows& f = x.singles[i];
    double weighted = 0, principal = 0;
    int last = 0;
    for (int t = 1; t <= f.months; ++t) {
      const double p = f.sched_principal[t - 1] + f.prepayment[t - 1] + f.recovery[t - 1];
      weighted += t / 12.0 * p;
      principal += p;
      if (f.cash_flow[t - 1] != 0) last = t;
    }
    const double wal = principal > 0 ? weighted / principal : 0.0;
    // DESIGN.md 5: WAL = sum (t/12) principal_t / sum principal_t
    if (!near(l.wal_years[i], wal, 1e-9, 1e-12) && ++bad <= 3)
      ADD_FAILURE() << "wal_years loan " << i << ": " << l.wal_years[i] << " want " << wal;
    if (l.last_month[i] != last && ++bad <= 3)
      ADD_FAILURE() << "last_month loan " << i << ": " << l.last_month[i] << " want " << last;
  }
}

// ---- (f) cash, principal and the balance chain
// ------------------------------------------------------

bool expect_cash_identities(const PoolFlows& f, double cutoff, const std::string& what) {
  std::vector<double> principal(f.months), cash(f.months), net(f.months), begin_next(f.months);
  std::vector<double> smm, mdr, cpr, cdr, cum(f.months);
  double cum_loss = 0;
  for (int k = 0; k < f.months; ++k) {
    principal[k] = f.sched_principal[k] + f.prepayment[k] + f.recovery[k];
    cash[k] = f.net_interest[k] + f.total_principal[k];
    net[k] = f.gross_interest[k] - f.servicing[k] + f.advanced_interest[k];
    if (k + 1 < f.months) begin_next[k] = f.begin_balance[k + 1];
    cum_loss += f.loss[k];
    cum[k] = 100 * cum_loss / cutoff;
  }
  bool ok = true;
  // identity: total principal = scheduled + prepaid + recovered
  ok &= expect_series_near(what + " total_principal", f.total_principal, principal, 1e-12, 1e-9);
  // identity: cash flow = net interest + total principal
  ok &= expect_series_near(what + " cash_flow", f.cash_flow, cash, 1e-12, 1e-9);
  // identity: net interest = gross - servicing + advanced
  ok &= expect_series_near(what + " net_interest", f.net_interest, net, 1e-9, 1e-9);
  // identity: the next month begins where this one ended
  ok &= expect_series_near(what + " end_balance vs next begin", f.end_balance, begin_next, 1e-12,
                           1e-9);
  // identity: cumulative loss in percent of the cut-off balance
  ok &= expect_series_near(what + " cum_loss_pct", f.cum_loss_pct, cum, 1e-9, 1e-12);
  std::size_t bad = 0;
  for (int k = 0; k < f.months; ++k) {
    for (double v : {f.smm[k], f.mdr[k], f.cpr[k], f.cdr[k]})
      if (!(std::isfinite(v) && v >= 0) && ++bad <= 3)
        ADD_FAILURE() << what << " month " << k + 1 << ": speed " << v;
    const double b = f.begin_balance[k];
    const double left = b - f.defaults[k] - f.sched_principal[k];
    if (left > 1e-6 * b && b > 0) {
      // identity: smm = prepayment / (begin - defaults - sched), cpr its annual percent
      if (!near(f.smm[k], f.prepayment[k] / left, 1e-9, 1e-15) && ++bad <= 3)
        ADD_FAILURE() << what << " month " << k + 1 << ": smm " << f.smm[k] << " want "
                      << f.prepayment[k] / left;
    }
    if (b > 0 && !near(f.mdr[k], f.defaults[k] / b, 1e-9, 1e-15) && ++bad <= 3)
      ADD_FAILURE() << what << " month " << k + 1 << ": mdr " << f.mdr[k];
    // identity: cpr = 100 (1 - (1 - smm)^12), cdr likewise from mdr
    if (!near(f.cpr[k], 100 * (1 - std::pow(1 - f.smm[k], 12)), 1e-9, 1e-12) && ++bad <= 3)
      ADD_FAILURE() << what << " month " << k + 1 << ": cpr " << f.cpr[k];
    if (!near(f.cdr[k], 100 * (1 - std::pow(1 - f.mdr[k], 12)), 1e-9, 1e-12) && ++bad <= 3)
      ADD_FAILURE() << what << " month " << k + 1 << ": cdr " << f.cdr[k];
  }
  return ok && bad == 0;
}

TEST_P(Identities, CashIsInterestPlusPrincipal) {
  const ScenarioRun& x = r();
  expect_cash_identities(x.pool.pool, x.pool.pool.cutoff_balance, "pool");
  FailureBudget budget;
  for (std::size_t i = 0; i < x.singles.size(); ++i)
    if (budget.spent(expect_cash_identities(x.singles[i], x.loans.current_balance[i],
                                            "loan " + std::to_string(i))))
      break;
}

INSTANTIATE_TEST_SUITE_P(Scenarios, Identities,
                         ::testing::Range<std::size_t>(0, scenarios().size()),
                         [](const ::testing::TestParamInfo<std::size_t>& info) {
                           return std::string(scenarios()[info.param].name);
                         });

// ---- (g) par identity
// ---------------------------------------------------------------------------------

TEST(ParIdentity, PresentValueAtTheNetRateIsTheBalance) {
  struct RateGroup {
    double note, servicing;
  };
  const RateGroup groups[] = {{0.06, 0.0025}, {0.03, 0.005}, {0.12, 0.00125}, {0.0, 0.0}};
  const SpeedCurve speeds[] = {constant_curve(0.0),
                               constant_curve(0.08),
                               constant_curve(0.60),
                               standard_curve(CurveShape::psa, 3.0),
                               vector_curve({0.05, 0.5, 0.01, 0.2, 0.07}),
                               ramp_curve(0.0, 0.3, 40)};
  std::uint64_t seed = 7;
  for (const RateGroup& g : groups) {
    std::vector<TestLoan> tape = random_test_loans(120, ++seed);
    for (TestLoan& t : tape) {
      t.rate = g.note;
      t.servicing = g.servicing;
    }
    const LoanArrays loans = make_loans(tape);
    const double n = g.note - g.servicing;
    std::vector<double> discount(1 + 480 + 12);  // longest term + the default lag
    for (std::size_t t = 0; t < discount.size(); ++t)
      discount[t] = std::pow(1 + n / 12, -static_cast<double>(t));
    for (const SpeedCurve& prepay : speeds) {
      SCOPED_TRACE(::testing::Message()
                   << "note " << g.note << " net " << n << ", prepay " << prepay_text(prepay));
      Assumptions a;
      a.prepay = prepay;  // no default
      ProjectionOptions o;
      o.threads = 2;
      o.loan_totals = true;
      o.discount = discount;
      const Projection p = project_pool(loans, a, o);
      ASSERT_EQ(p.loans.present_value.size(), loans.size());
      std::size_t bad = 0;
      for (std::size_t i = 0; i < loans.size(); ++i) {
        // identity: PV at the net rate, no delay, no losses = balance (DESIGN.md 5, par identity)
        if (!near(p.loans.present_value[i], loans.current_balance[i], 1e-8) && ++bad <= 3)
          ADD_FAILURE() << "loan " << i << ": PV " << p.loans.present_value[i] << ", balance "
                        << loans.current_balance[i];
      }
      double pv = 0;
      for (int t = 1; t <= p.pool.months; ++t) pv += p.pool.cash_flow[t - 1] * discount[t];
      // identity: the pool's PV from its table is the cut-off balance too
      EXPECT_NEAR(pv, p.pool.cutoff_balance, 1e-8 * p.pool.cutoff_balance);
    }
  }
}

}  // namespace
}  // namespace poolbid
