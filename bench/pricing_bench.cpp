// Speed of pricing: valuation and solves on a projected pool (payment grid, price from the target,
// both views' yield and Z-spread solves, par yield at WAL, the shifted curves' grids) against one
// projection of the same pool; the whole price_pool; and the ARM coupon paths, on 100k and 1M
// 30-year loans (bench/cashflow_cases.h), all fixed or one in seven an ARM, on the demo curve.
//
// Names: project/<pool>/loans:<n>, valuation/<pool>/loans:<n>, price_pool/<pool>/loans:<n>,
// coupon_paths/loans:<n>; 2 threads. Counters: loan_months_per_s where loans are projected,
// peak_rss_MiB (a high-water mark: run one benchmark alone to read its own).
#include <benchmark/benchmark.h>
#include <sys/resource.h>

#include <chrono>
#include <cstdint>
#include <map>
#include <memory>
#include <optional>
#include <string>

#include "bench/cashflow_cases.h"
#include "cashflow/cashflow.h"
#include "pricing/pricing.h"

namespace {

using namespace poolbid;
using namespace poolbid::bench;

constexpr std::uint64_t kSeed = 2026;
constexpr unsigned kThreads = 2;
constexpr Date kCutoff{std::chrono::year{2026}, std::chrono::month{12}, std::chrono::day{1}};
constexpr Date kSettle{std::chrono::year{2026}, std::chrono::month{12}, std::chrono::day{17}};

double peak_rss_mib() {
  rusage usage{};
  getrusage(RUSAGE_SELF, &usage);
  return static_cast<double>(usage.ru_maxrss) / 1024.0;  // Linux: KiB
}

// One in seven loans an ARM on SOFR30A: margin 2.75%, 2% periodic cap, lifetime cap note + 5%,
// first reset at loan month 61, then yearly.
LoanArrays with_arms(LoanArrays loans) {
  loans.arm_index_names = {"", "SOFR30A"};
  for (std::size_t i = 0; i < loans.size(); i += 7) {
    loans.amortization[i] = Amortization::arm;
    loans.arm_index[i] = 1;
    loans.arm_margin[i] = 0.0275;
    loans.arm_periodic_cap[i] = 0.02;
    loans.arm_lifetime_cap[i] = loans.note_rate[i] + 0.05;
    loans.arm_floor[i] = 0.0275;
    loans.arm_first_reset[i] = 61;
    loans.arm_reset_period[i] = 12;
  }
  return loans;
}

const LoanArrays& pool(std::size_t count, bool arms) {
  static std::map<std::pair<std::size_t, bool>, std::unique_ptr<LoanArrays>> pools;
  auto& slot = pools[{count, arms}];
  if (!slot) {
    LoanArrays loans = make_fixed_loans(count, kSeed);
    slot = std::make_unique<LoanArrays>(arms ? with_arms(std::move(loans)) : std::move(loans));
  }
  return *slot;
}

const YieldCurve& demo_curve() {
  static const YieldCurve curve =
      load_yield_curve(POOLBID_SOURCE_DIR "/demo-pools/curve-2026-12-01.json");
  return curve;
}

Assumptions assumptions() { return bench_cases()[1].assumptions; }  // 150 PSA, 200 SDA

BidRequest request() {
  BidRequest r;
  r.target = BidTarget::yield;
  r.value = 0.0725;
  r.settlement = Settlement{kCutoff, kSettle, 17};
  r.assumptions = assumptions();
  r.threads = kThreads;
  return r;
}

std::optional<CouponPaths> coupons_for(const LoanArrays& loans, const YieldCurve& curve,
                                       int months) {
  for (std::size_t i = 0; i < loans.size(); ++i)
    if (loans.amortization[i] == Amortization::arm) {
      const std::vector<std::string> names = {"SOFR30A"};
      return arm_coupon_paths(loans, index_paths(curve, names, kCutoff, months));
    }
  return std::nullopt;
}

void project(benchmark::State& state, std::size_t count, bool arms) {
  const LoanArrays& loans = pool(count, arms);
  const Assumptions a = assumptions();
  ProjectionOptions options;
  options.threads = kThreads;
  const std::optional<CouponPaths> coupons = coupons_for(loans, demo_curve(), 373);
  options.coupons = coupons ? &*coupons : nullptr;
  for (auto _ : state) {
    Projection p = project_pool(loans, a, options);
    benchmark::DoNotOptimize(p.pool.cash_flow.data());
  }
  state.counters["loan_months_per_s"] = benchmark::Counter(
      static_cast<double>(loan_months(loans, a)) * static_cast<double>(state.iterations()),
      benchmark::Counter::kIsRate);
  state.counters["peak_rss_MiB"] = peak_rss_mib();
}

// What price_pool does besides projecting: the grid, the price from the target, both views'
// solves and measures, and the shifted curves' grids and values.
void valuation(benchmark::State& state, std::size_t count, bool arms) {
  const LoanArrays& loans = pool(count, arms);
  const YieldCurve& curve = demo_curve();
  const BidRequest r = request();
  Assumptions no_loss = r.assumptions;
  no_loss.default_rate = constant_curve(0);
  ProjectionOptions options;
  options.threads = kThreads;
  const PoolFlows lossy = project_pool(loans, r.assumptions, options).pool;
  const PoolFlows clean = project_pool(loans, no_loss, options).pool;
  const int months = 373;
  for (auto _ : state) {
    const PaymentGrid grid = payment_grid(curve, r.settlement, months);
    const double pv = pv_at_yield(lossy.cash_flow, grid, cfy_from_bey(r.value));
    for (const PoolFlows* flows : {&lossy, &clean}) {
      const std::optional<Rate> y = yield_for_pv(flows->cash_flow, grid, pv);
      const std::optional<double> z = spread_for_pv(flows->cash_flow, grid, pv);
      const double wal = wal_years(*flows);
      benchmark::DoNotOptimize(par_yield(curve, wal));
      benchmark::DoNotOptimize(modified_duration(flows->cash_flow, grid, y.value()));
      benchmark::DoNotOptimize(z);
    }
    for (const double bp : {25.0, -25.0}) {
      const PaymentGrid moved = payment_grid(shift_curve(curve, bp), r.settlement, months);
      benchmark::DoNotOptimize(pv_at_spread(lossy.cash_flow, moved, 0.01));
    }
  }
  state.counters["peak_rss_MiB"] = peak_rss_mib();
}

void price(benchmark::State& state, std::size_t count, bool arms) {
  const LoanArrays& loans = pool(count, arms);
  const BidRequest r = request();
  for (auto _ : state) {
    BidResult result = price_pool(loans, demo_curve(), r);
    benchmark::DoNotOptimize(result.clean_price);
  }
  state.counters["loan_months_per_s"] = benchmark::Counter(
      static_cast<double>(loan_months(loans, r.assumptions)) *
          static_cast<double>(state.iterations()),
      benchmark::Counter::kIsRate);
  state.counters["peak_rss_MiB"] = peak_rss_mib();
}

void coupon_paths(benchmark::State& state, std::size_t count) {
  const LoanArrays& loans = pool(count, true);
  for (auto _ : state) {
    std::optional<CouponPaths> c = coupons_for(loans, demo_curve(), 373);
    benchmark::DoNotOptimize(c->changes.data());
  }
  state.counters["peak_rss_MiB"] = peak_rss_mib();
}

const int registered = [] {
  for (const std::size_t count : {std::size_t{100'000}, std::size_t{1'000'000}}) {
    for (const bool arms : {false, true}) {
      const std::string tag = std::string(arms ? "arms" : "fixed") +
                              "/loans:" + std::to_string(count);
      benchmark::RegisterBenchmark(("project/" + tag).c_str(),
                                   [=](benchmark::State& s) { project(s, count, arms); })
          ->Unit(benchmark::kMillisecond)->UseRealTime();
      benchmark::RegisterBenchmark(("valuation/" + tag).c_str(),
                                   [=](benchmark::State& s) { valuation(s, count, arms); })
          ->Unit(benchmark::kMillisecond)->UseRealTime();
      benchmark::RegisterBenchmark(("price_pool/" + tag).c_str(),
                                   [=](benchmark::State& s) { price(s, count, arms); })
          ->Unit(benchmark::kMillisecond)->UseRealTime();
    }
    benchmark::RegisterBenchmark(("coupon_paths/loans:" + std::to_string(count)).c_str(),
                                 [=](benchmark::State& s) { coupon_paths(s, count); })
        ->Unit(benchmark::kMillisecond)->UseRealTime();
  }
  return 0;
}();

}  // namespace

BENCHMARK_MAIN();
