// The loan-level model in the projection: monotone responses to credit and house prices, severity
// by hand, refinancing under water, lag groups, neutral factors and thread determinism.
#include <gtest/gtest.h>

#include <cmath>
#include <numeric>
#include <random>
#include <string>
#include <vector>

#include "cashflow/cashflow.h"
#include "curves/curves.h"
#include "tests/support/loans.h"

namespace poolbid {
namespace {

using testing_support::make_loans;
using testing_support::TestLoan;

constexpr Date kCutoff{std::chrono::year{2026}, std::chrono::month{12}, std::chrono::day{1}};

Scenario flat_prices(double annual = 0.0) {
  Scenario s;
  s.name = "test";
  s.house_price_annual = {annual};
  return s;
}

struct ModelCase {
  CreditModel model = default_credit_model();
  Scenario scenario = flat_prices(0.03);
  YieldCurve curve = flat_yield_curve(0.04, kCutoff);
  FactorSet neutral = 0;
  Advancing advancing = Advancing::none;
  bool no_defaults = false;
  unsigned threads = 1;
  bool totals = false;

  Projection project(const LoanArrays& loans, ModelRun* keep = nullptr) const {
    ModelRun probe;
    probe.model = &model;
    Assumptions a;
    a.advancing = advancing;
    const int months = projection_horizon(loans, a, &probe);
    const ModelRun run = model_run(model, scenario, curve, kCutoff, months, neutral);
    ProjectionOptions options;
    options.model = &run;
    options.no_defaults = no_defaults;
    options.threads = threads;
    options.loan_totals = totals;
    if (keep) *keep = run;
    return project_pool(loans, a, options);
  }
};

double total(const std::vector<double>& v) { return std::accumulate(v.begin(), v.end(), 0.0); }

// Lifetime defaults and loss as shares of the cut-off balance.
struct Outcome {
  double defaults = 0, loss = 0, severity = 0, prepaid = 0;
};
Outcome outcome(const Projection& p) {
  Outcome o;
  const double b = p.pool.cutoff_balance;
  o.defaults = total(p.pool.defaults) / b;
  o.loss = total(p.pool.loss) / b;
  o.severity = o.defaults > 0 ? o.loss / o.defaults : 0;
  o.prepaid = total(p.pool.prepayment) / b;
  return o;
}

// A 30-year loan near the market rate (little refinance incentive on the 4% curve), 85% LTV.
TestLoan base_loan() {
  TestLoan t{.id = "L1", .upb = 250000, .rate = 0.055};
  t.remaining = 340;
  t.age = 20;
  t.original_balance = 262000;
  t.ltv = 0.85;
  t.cltv = 0.85;
  return t;
}

TEST(LoanModel, LowerScoreDefaultsMore) {
  ModelCase run;
  double previous = 0;
  for (double score : {800.0, 760.0, 720.0, 680.0, 640.0, 600.0, 560.0}) {
    TestLoan t = base_loan();
    t.score = score;
    const Outcome o = outcome(run.project(make_loans({t})));
    EXPECT_GT(o.defaults, previous) << "score " << score;
    previous = o.defaults;
  }
}

TEST(LoanModel, HigherLtvDefaultsMoreAndLosesMore) {
  ModelCase run;
  Outcome previous;
  for (double ltv : {0.55, 0.65, 0.75, 0.85, 0.95, 1.05}) {
    TestLoan t = base_loan();
    t.ltv = t.cltv = ltv;
    const Outcome o = outcome(run.project(make_loans({t})));
    EXPECT_GT(o.defaults, previous.defaults) << "LTV " << ltv;
    EXPECT_GE(o.severity, previous.severity) << "LTV " << ltv;
    previous = o;
  }
  EXPECT_GT(previous.severity, 0.10);  // under water: the sale does not cover the loan
}

TEST(LoanModel, HigherDtiAndWeakerDocumentsDefaultMore) {
  ModelCase run;
  double previous = 0;
  for (double dti : {0.25, 0.33, 0.40, 0.47, 0.55}) {
    TestLoan t = base_loan();
    t.dti = dti;
    const double d = outcome(run.project(make_loans({t}))).defaults;
    EXPECT_GT(d, previous) << "DTI " << dti;
    previous = d;
  }
  previous = 0;
  for (Documentation doc : {Documentation::full, Documentation::limited, Documentation::none}) {
    TestLoan t = base_loan();
    t.documentation = doc;
    const double d = outcome(run.project(make_loans({t}))).defaults;
    EXPECT_GT(d, previous) << to_string(doc);
    previous = d;
  }
}

TEST(LoanModel, DeeperHousePriceFallDefaultsMoreAndLosesMore) {
  // Defaults step up as the updated LTV crosses band bounds (never down); severity rises with
  // every fall in the sale price.
  Outcome previous, first;
  for (double change : {0.05, 0.0, -0.05, -0.10, -0.20}) {
    ModelCase run;
    run.scenario.house_price_annual = {change, change, 0.0};
    const Outcome o = outcome(run.project(make_loans({base_loan()})));
    if (change == 0.05) {
      first = o;
    } else {
      EXPECT_GE(o.defaults, previous.defaults) << "house prices " << change;
      EXPECT_GT(o.severity, previous.severity) << "house prices " << change;
    }
    previous = o;
  }
  EXPECT_GT(previous.defaults, 1.5 * first.defaults);
}

// source: DESIGN.md section 7 (severity definition), worked by hand here.
// A loan in foreclosure rolls to default in month 1 (share 100% over 1 month): balance $180,000,
// property $200,000, flat prices, timeline 12 months, distressed discount 12%, sale cost 6%,
// carrying 3% a year of value, foreclosure cost $5,000:
//   sale 200,000 x 0.88 x 0.94 = 165,440; carrying 0.03 / 12 x 200,000 x 12 = 6,000;
//   proceeds 165,440 - 5,000 - 6,000 = 154,440; loss 180,000 - 154,440 = 25,560 (14.2%).
// With interest advanced at the net rate 6% for 12 months (10,800) repaid from the proceeds:
//   recovery 143,640, loss 36,360 (20.2% = 14.2% + 6.0% lost interest).
TEST(LoanModel, SeverityByHand) {
  ModelCase run;
  run.scenario = flat_prices(0.0);
  run.model.distressed_discount = 0.12;
  run.model.sale_cost = 0.06;
  run.model.carrying_cost = 0.03;
  run.model.foreclosure_cost = 5000;
  run.model.timeline_months = {{"GA", 12}};
  run.model.delinquency_roll = {{"foreclosure", DelinquencyRoll{1.0, 1}}};
  TestLoan t = base_loan();
  t.upb = 180000;
  t.rate = 0.0625;
  t.servicing = 0.0025;
  t.property_value = 200000;
  t.state = "GA";
  t.delinquency = Delinquency::foreclosure;
  const LoanArrays loans = make_loans({t});

  Projection p = run.project(loans);
  ASSERT_GE(p.pool.months, 13);
  EXPECT_NEAR(p.pool.defaults[0], 180000, 1e-6);
  EXPECT_NEAR(p.pool.recovery[12], 154440, 1e-6);
  EXPECT_NEAR(p.pool.loss[12], 25560, 1e-6);
  EXPECT_NEAR(total(p.pool.loss), 25560, 1e-6);

  run.advancing = Advancing::interest;
  ModelRun kept;
  p = run.project(loans, &kept);
  EXPECT_NEAR(p.pool.recovery[12], 143640, 1e-6);
  EXPECT_NEAR(p.pool.loss[12], 36360, 1e-6);
  for (int m = 0; m < 12; ++m) EXPECT_NEAR(p.pool.advanced_interest[m], 900, 1e-9) << m;
  EXPECT_EQ(p.pool.advanced_interest[12], 0.0);
  EXPECT_NEAR(explain_loan(loans, 0, kept).severity_month1, 36360.0 / 180000.0, 1e-12);
}

TEST(LoanModel, FullUpdatedLtvBarelyRefinances) {
  ModelCase run;
  run.scenario = flat_prices(0.0);
  run.curve = flat_yield_curve(0.01, kCutoff);  // market mortgage rate far below the note rate
  TestLoan under = base_loan();
  under.rate = 0.09;
  under.cltv = under.ltv = 0.80;
  under.property_value = under.upb / 1.00;  // updated LTV 100%
  TestLoan dry = under;
  dry.property_value = under.upb / 0.60;    // updated LTV 60%
  ModelRun kept;
  run.project(make_loans({under}), &kept);
  const LoanExplanation wet = explain_loan(make_loans({under}), 0, kept);
  const LoanExplanation fine = explain_loan(make_loans({dry}), 0, kept);
  EXPECT_GT(wet.incentive_month1, 0.03);
  EXPECT_NEAR(wet.updated_ltv, 1.0, 1e-12);
  EXPECT_LT(wet.refi_cpr_month1, 0.05);  // barely refinances whatever the incentive
  EXPECT_GT(fine.refi_cpr_month1, 0.30);
  // Whatever the incentive: the market rate from 6.5% down to about 1.5%.
  for (double rate : {0.05, 0.04, 0.03, 0.02, 0.01, 0.0}) {
    run.curve = flat_yield_curve(rate, kCutoff);
    run.project(make_loans({under}), &kept);
    const LoanExplanation e = explain_loan(make_loans({under}), 0, kept);
    EXPECT_LT(e.refi_cpr_month1, 0.05) << "curve " << rate;
  }
}

TEST(LoanModel, DelinquentBorrowersBarelyRefinance) {
  ModelCase run;
  run.curve = flat_yield_curve(0.02, kCutoff);  // a large incentive
  TestLoan current = base_loan();
  current.rate = 0.075;
  TestLoan late = current;
  late.delinquency = Delinquency::dq60;
  ModelRun kept;
  run.project(make_loans({current}), &kept);
  const LoanExplanation a = explain_loan(make_loans({current}), 0, kept);
  const LoanExplanation b = explain_loan(make_loans({late}), 0, kept);
  EXPECT_GT(a.refi_cpr_month1, 0.20);
  EXPECT_LT(b.refi_cpr_month1, 0.2 * a.refi_cpr_month1);
}

// Month 1 of a one-loan projection reads the same rates as the explanation.
TEST(LoanModel, ExplanationMatchesTheLoop) {
  ModelCase run;
  TestLoan t = base_loan();
  t.score = 655;
  t.dti = 0.45;
  t.documentation = Documentation::limited;
  t.occupancy = Occupancy::investor;
  t.cltv = 0.95;
  const LoanArrays loans = make_loans({t});
  ModelRun kept;
  const Projection p = run.project(loans, &kept);
  const LoanExplanation e = explain_loan(loans, 0, kept);
  EXPECT_NEAR(p.pool.cdr[0] / 100, e.cdr_month1, 1e-12);
  EXPECT_NEAR(p.pool.cpr[0] / 100, e.cpr_month1, 1e-12);
  EXPECT_NEAR(e.junior_liens, (0.95 - 0.85) * 262000 / 0.85, 1e-6);
  EXPECT_GT(e.default_multiplier, 4.0);
}

// Random loans across many states (many lag groups in a block): the pool equals the sum of every
// loan projected alone, for every column, and loan totals sum to the pool.
LoanArrays random_loans(int n, unsigned seed) {
  std::mt19937 rng(seed);
  std::uniform_real_distribution<double> u(0, 1);
  const std::vector<std::string> states = {"CA", "TX", "FL", "NY", "NJ", "GA", "IL", "OH", "", "WA"};
  std::vector<TestLoan> loans;
  for (int i = 0; i < n; ++i) {
    TestLoan t{.id = "R" + std::to_string(i), .upb = 50000 + 400000 * u(rng),
               .rate = 0.03 + 0.06 * u(rng)};
    t.remaining = 60 + static_cast<int>(290 * u(rng));
    t.age = 360 - t.remaining - static_cast<int>(10 * u(rng));
    t.age = t.age < 0 ? 0 : t.age;
    t.score = u(rng) < 0.05 ? testing_support::kNaN : 560 + 260 * u(rng);
    t.ltv = 0.5 + 0.5 * u(rng);
    t.cltv = t.ltv + (u(rng) < 0.2 ? 0.1 : 0.0);
    t.dti = 0.2 + 0.35 * u(rng);
    t.state = states[i % states.size()];
    t.delinquency = i % 23 == 0 ? Delinquency::dq60 : (i % 31 == 0 ? Delinquency::foreclosure
                                                                    : Delinquency::current);
    t.property_value = u(rng) < 0.3 ? testing_support::kNaN : t.upb / t.ltv;
    t.documentation = i % 7 == 0 ? Documentation::none : Documentation::full;
    if (i % 9 == 0) t.ltv = testing_support::kNaN;
    loans.push_back(t);
  }
  return make_loans(loans);
}

TEST(LoanModel, PoolIsTheSumOfItsLoans) {
  const LoanArrays loans = random_loans(300, 7);
  for (Advancing advancing : {Advancing::none, Advancing::interest}) {
    ModelCase run;
    run.advancing = advancing;
    run.scenario.house_price_annual = {-0.08, 0.02};
    run.totals = true;
    const Projection pool = run.project(loans);
    std::vector<double> cash(pool.pool.months + 200, 0.0), loss(cash.size(), 0.0),
        advanced(cash.size(), 0.0);
    for (std::size_t i = 0; i < loans.size(); ++i) {
      const std::uint32_t index = static_cast<std::uint32_t>(i);
      const Projection one = run.project(select_loans(loans, {&index, 1}));
      for (int m = 0; m < one.pool.months; ++m) {
        cash[m] += one.pool.cash_flow[m];
        loss[m] += one.pool.loss[m];
        advanced[m] += one.pool.advanced_interest[m];
      }
      EXPECT_NEAR(pool.loans.cash_flow[i], total(one.pool.cash_flow), 1e-6) << i;
      EXPECT_NEAR(pool.loans.loss[i], total(one.pool.loss), 1e-6) << i;
    }
    for (int m = 0; m < pool.pool.months; ++m) {
      EXPECT_NEAR(pool.pool.cash_flow[m], cash[m], 1e-6) << m;  // identity: pool = sum of loans
      EXPECT_NEAR(pool.pool.loss[m], loss[m], 1e-6) << m;
      EXPECT_NEAR(pool.pool.advanced_interest[m], advanced[m], 1e-6) << m;
    }
    EXPECT_NEAR(total(pool.pool.loss) + total(pool.pool.recovery), total(pool.pool.defaults),
                1e-6);  // identity: every defaulted dollar is liquidated
    for (int m = 0; m < pool.pool.months; ++m) {  // identity: the balance roll
      EXPECT_NEAR(pool.pool.begin_balance[m] - pool.pool.end_balance[m],
                  pool.pool.sched_principal[m] + pool.pool.prepayment[m] + pool.pool.defaults[m],
                  1e-6);
    }
    EXPECT_NEAR(total(pool.loans.cash_flow), total(pool.pool.cash_flow), 1e-5);
  }
}

TEST(LoanModel, ThreadCountDoesNotChangeABit) {
  const LoanArrays loans = random_loans(9000, 11);  // three chunks
  ModelCase run;
  run.advancing = Advancing::interest;
  run.totals = true;
  run.threads = 1;
  const Projection one = run.project(loans);
  for (unsigned threads : {2u, 3u}) {
    run.threads = threads;
    const Projection many = run.project(loans);
    EXPECT_EQ(one.pool.cash_flow, many.pool.cash_flow);
    EXPECT_EQ(one.pool.loss, many.pool.loss);
    EXPECT_EQ(one.loans.cash_flow, many.loans.cash_flow);
  }
}

TEST(LoanModel, NeutralFactorsReadEveryLoanAlike) {
  TestLoan strict = base_loan();
  strict.score = 790;
  strict.dti = 0.25;
  TestLoan loose = strict;
  loose.score = 610;
  loose.dti = 0.49;
  loose.documentation = Documentation::none;
  loose.occupancy = Occupancy::investor;
  loose.purpose = Purpose::cash_out_refi;
  loose.property_type = PropertyType::condo;
  loose.ltv = loose.cltv = 0.95;
  loose.delinquency = Delinquency::dq30;
  ModelCase run;
  EXPECT_GT(outcome(run.project(make_loans({loose}))).defaults,
            2 * outcome(run.project(make_loans({strict}))).defaults);
  run.neutral = (FactorSet{1} << kFactorCount) - 1;
  const Projection a = run.project(make_loans({strict}));
  const Projection b = run.project(make_loans({loose}));
  EXPECT_EQ(a.pool.cash_flow, b.pool.cash_flow);
}

TEST(LoanModel, NoDefaultsViewHasNoLoss) {
  ModelCase run;
  run.no_defaults = true;
  const Projection p = run.project(random_loans(200, 3));
  EXPECT_EQ(total(p.pool.defaults), 0.0);
  EXPECT_EQ(total(p.pool.loss), 0.0);
  EXPECT_GT(total(p.pool.prepayment), 0.0);
}

}  // namespace
}  // namespace poolbid
