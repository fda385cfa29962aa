// Benchmark and cross-check loans and assumption sets (see cashflow_cases.h). Every formula here is
// repeated in bench/numpy_cashflow.py; change both together.
#include "bench/cashflow_cases.h"

#include <cmath>
#include <limits>
#include <string>
#include <utility>

namespace poolbid::bench {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

std::uint64_t splitmix64(std::uint64_t x) {
  std::uint64_t z = x + 0x9E3779B97F4A7C15ULL;
  z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
  z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
  return z ^ (z >> 31);
}

// Uniform on [0, 1) with 53 bits, for loan j and draw `stream` (0-7).
double uniform(std::uint64_t seed, std::size_t j, unsigned stream) {
  const std::uint64_t key = (seed << 40) + static_cast<std::uint64_t>(j) * 8 + stream;
  return static_cast<double>(splitmix64(key) >> 11) * 0x1.0p-53;
}

struct FixedLoan {
  double balance, rate, fee;
  int original_term, remaining_term, age;
  Delinquency delinquency;
};

void append(LoanArrays& a, const FixedLoan& f) {
  const std::size_t i = a.size();
  std::string id(1, 'L');
  id += std::to_string(i + 1);
  a.loan_id.push_back(std::move(id));
  a.row.push_back(static_cast<std::uint32_t>(i + 2));
  a.seller.push_back(0);
  a.current_balance.push_back(f.balance);
  a.original_balance.push_back(kNaN);
  a.note_rate.push_back(f.rate);
  a.servicing_fee.push_back(f.fee);
  a.original_term.push_back(f.original_term);
  a.remaining_term.push_back(f.remaining_term);
  a.age.push_back(f.age);
  a.amortization.push_back(Amortization::fixed);
  a.io_months.push_back(0);
  a.balloon_month.push_back(0);
  a.arm_index.push_back(0);
  a.arm_margin.push_back(kNaN);
  a.arm_periodic_cap.push_back(kNaN);
  a.arm_lifetime_cap.push_back(kNaN);
  a.arm_floor.push_back(kNaN);
  a.arm_first_reset.push_back(0);
  a.arm_reset_period.push_back(0);
  a.credit_score.push_back(kNaN);
  a.original_ltv.push_back(kNaN);
  a.combined_ltv.push_back(kNaN);
  a.dti.push_back(kNaN);
  a.property_value.push_back(kNaN);
  a.property_value_date.push_back(kNoDate);
  a.occupancy.push_back(Occupancy::unknown);
  a.property_type.push_back(PropertyType::unknown);
  a.purpose.push_back(Purpose::unknown);
  a.documentation.push_back(Documentation::unknown);
  a.state.push_back(0);
  a.delinquency.push_back(f.delinquency);
}

void reserve(LoanArrays& a, std::size_t n) {
  a.loan_id.reserve(n);
  a.row.reserve(n);
  a.seller.reserve(n);
  a.current_balance.reserve(n);
  a.original_balance.reserve(n);
  a.note_rate.reserve(n);
  a.servicing_fee.reserve(n);
  a.original_term.reserve(n);
  a.remaining_term.reserve(n);
  a.age.reserve(n);
  a.amortization.reserve(n);
  a.io_months.reserve(n);
  a.balloon_month.reserve(n);
  a.arm_index.reserve(n);
  a.arm_margin.reserve(n);
  a.arm_periodic_cap.reserve(n);
  a.arm_lifetime_cap.reserve(n);
  a.arm_floor.reserve(n);
  a.arm_first_reset.reserve(n);
  a.arm_reset_period.reserve(n);
  a.credit_score.reserve(n);
  a.original_ltv.reserve(n);
  a.combined_ltv.reserve(n);
  a.dti.reserve(n);
  a.property_value.reserve(n);
  a.property_value_date.reserve(n);
  a.occupancy.reserve(n);
  a.property_type.reserve(n);
  a.purpose.reserve(n);
  a.documentation.reserve(n);
  a.state.reserve(n);
  a.delinquency.reserve(n);
}

void append_generated(LoanArrays& a, std::size_t count, std::uint64_t seed) {
  for (std::size_t j = 0; j < count; ++j) {
    // Products only inside floor(): no multiply-add a compiler could fuse and round differently.
    const double skewed = uniform(seed, j, 0) * uniform(seed, j, 1);
    const double balance = 50.0 * (1200.0 + std::floor(18000.0 * skewed));
    const int eighths = 40 + static_cast<int>(std::floor(uniform(seed, j, 2) * 25.0));
    const int age = static_cast<int>(std::floor(uniform(seed, j, 3) * 61.0));
    const bool delinquent = uniform(seed, j, 4) < 0.02;
    append(a, {balance, eighths / 800.0, 0.0025, 360, 360 - age, age,
               delinquent ? Delinquency::dq90_plus : Delinquency::current});
  }
}

LoanArrays empty_pool(std::size_t count) {
  LoanArrays a;
  a.seller_names = {"benchmark pool"};
  a.arm_index_names = {""};
  reserve(a, count);
  return a;
}

SpeedCurve curve(CurveShape shape, CurveClock clock, double value) {
  SpeedCurve c;
  c.shape = shape;
  c.clock = clock;
  c.value = value;
  return c;
}
SpeedCurve constant(double annual) {
  return curve(CurveShape::constant, CurveClock::projection_month, annual);
}
SpeedCurve psa(double multiple) { return curve(CurveShape::psa, CurveClock::loan_age, multiple); }
SpeedCurve sda(double multiple) { return curve(CurveShape::sda, CurveClock::loan_age, multiple); }

// CPR in month k = 2% + (37k mod 101) / 10 percent: 2% to 12%, jumping about.
SpeedCurve cpr_vector() {
  SpeedCurve c = curve(CurveShape::vector, CurveClock::projection_month, 0);
  for (int k = 1; k <= 360; ++k) c.values.push_back((2.0 + (37 * k % 101) / 10.0) / 100.0);
  return c;
}

// Severity by loan age k = 1..24: 30% + (k - 1)%, so 30% to 53%; the last value holds.
SpeedCurve severity_vector() {
  SpeedCurve c = curve(CurveShape::vector, CurveClock::loan_age, 0);
  for (int k = 1; k <= 24; ++k) c.values.push_back((29.0 + k) / 100.0);
  return c;
}

TightTable tight_table(const MonthlyTable& table) {
  return {table.by_month, table.hold, table.clock == CurveClock::loan_age};
}

}  // namespace

LoanArrays make_fixed_loans(std::size_t count, std::uint64_t seed) {
  LoanArrays a = empty_pool(count);
  append_generated(a, count, seed);
  return a;
}

LoanArrays make_check_loans(std::size_t count, std::uint64_t seed) {
  LoanArrays a = empty_pool(count);
  append(a, {300000.0, 0.065, 0.0025, 360, 358, 2, Delinquency::current});
  append(a, {150000.5, 0.0525, 0.0025, 360, 300, 60, Delinquency::dq90_plus});
  append(a, {425000.0, 0.07875, 0.00375, 180, 170, 10, Delinquency::current});
  if (count > 3) append_generated(a, count - 3, seed);
  return a;
}

std::vector<CashflowCase> bench_cases() {
  std::vector<CashflowCase> cases;
  Assumptions a;
  a.prepay = constant(0.08);
  a.default_rate = constant(0.01);
  a.severity = constant(0.40);
  a.lag_months = 12;
  cases.push_back({"constant", a});

  a.prepay = psa(1.5);
  a.default_rate = sda(2.0);
  cases.push_back({"psa_sda", a});

  a.prepay = cpr_vector();
  a.default_rate = constant(0.01);
  cases.push_back({"cpr_vector", a});

  a.prepay = psa(1.5);
  a.default_rate = sda(2.0);
  a.advancing = Advancing::interest;
  a.delinquent_default = true;
  cases.push_back({"all_options", a});
  return cases;
}

std::vector<CashflowCase> check_cases() {
  std::vector<CashflowCase> cases = bench_cases();
  Assumptions a;
  a.prepay = constant(0.08);
  a.default_rate = constant(0.02);
  a.severity = severity_vector();
  a.lag_months = 0;
  a.advancing = Advancing::interest;
  a.delinquent_default = true;
  cases.push_back({"sev_vector_lag0", a});
  return cases;
}

std::int64_t loan_months(const LoanArrays& loans, const Assumptions& assumptions) {
  std::int64_t months = 0;
  for (std::size_t i = 0; i < loans.size(); ++i) {
    const bool gone = assumptions.delinquent_default &&
                      (loans.delinquency[i] == Delinquency::dq90_plus ||
                       loans.delinquency[i] == Delinquency::foreclosure);
    months += gone ? 1 : loans.remaining_term[i];
  }
  return months;
}

TightAssumptions tight_assumptions(const Assumptions& assumptions) {
  TightAssumptions t;
  t.smm = tight_table(monthly_rate_table(assumptions.prepay));
  t.mdr = tight_table(monthly_rate_table(assumptions.default_rate));
  t.severity = tight_table(monthly_share_table(assumptions.severity));
  t.lag_months = assumptions.lag_months;
  t.advance_interest = assumptions.advancing == Advancing::interest;
  return t;
}

TightLoans tight_loans(const LoanArrays& loans, const Assumptions& assumptions,
                       std::vector<std::uint8_t>& flags) {
  flags.clear();
  if (assumptions.delinquent_default) {
    flags.reserve(loans.size());
    for (const Delinquency d : loans.delinquency)
      flags.push_back(d == Delinquency::dq90_plus || d == Delinquency::foreclosure ? 1 : 0);
  }
  return {loans.current_balance, loans.note_rate, loans.servicing_fee, loans.remaining_term,
          loans.age, flags};
}

}  // namespace poolbid::bench
