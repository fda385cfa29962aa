// Speed of the loan-level model: project_pool with the model (default tables, base scenario, the
// demo swap curve's mortgage rate) against the same engine on pool-wide constant curves (8 CPR,
// 1 CDR, severity 40%, lag 12), on the same 100k and 1M loose-seller demo loans, 1 and 2 threads;
// and the outcome matrix's unit of work, price_pool with the model and no risk measures, on one
// 2,000-loan demo pool.
//
// Names: <constant|model>/loans:<n>/threads:<k>, price_pool_model/loans:2000. Counters:
// loan_months_per_s (each loan's remaining term over wall-clock time) and peak_rss_MiB (a
// high-water mark: run one benchmark alone to read its own). bench/README.md has the figures.
#include <benchmark/benchmark.h>
#include <sys/resource.h>

#include <cstdint>
#include <filesystem>
#include <fstream>
#include <map>
#include <memory>
#include <string>

#include "cashflow/cashflow.h"
#include "curves/curves.h"
#include "pricing/pricing.h"
#include "tape/tape.h"

namespace {

using namespace poolbid;

constexpr Date kCutoff{std::chrono::year{2026}, std::chrono::month{12}, std::chrono::day{1}};

double peak_rss_mib() {
  rusage usage{};
  getrusage(RUSAGE_SELF, &usage);
  return static_cast<double>(usage.ru_maxrss) / 1024.0;  // Linux: KiB
}

// The loose demo seller's first `count` loans (seed 2026), written once under bench-data/ and read.
const LoanArrays& pool(std::size_t count) {
  static std::map<std::size_t, std::unique_ptr<LoanArrays>> pools;
  auto& slot = pools[count];
  if (!slot) {
    const std::filesystem::path dir = POOLBID_BENCH_DATA;
    std::filesystem::create_directories(dir);
    const std::filesystem::path path =
        dir / ("loose-canonical-" + std::to_string(count) + "-seed2026.csv");
    if (!std::filesystem::exists(path)) {
      std::ofstream out(path.string() + ".partial", std::ios::binary);
      DemoTapeOptions options;
      options.loans = count;
      options.profile = DemoProfile::loose;
      options.seed = 2026;
      write_demo_tape(out, options);
      out.close();
      std::filesystem::rename(path.string() + ".partial", path);
    }
    ReadOptions read;
    read.cutoff = kCutoff;
    slot = std::make_unique<LoanArrays>(read_tape(path.string(), read).loans);
  }
  return *slot;
}

const YieldCurve& curve() {
  static const YieldCurve c = load_yield_curve(POOLBID_SOURCE_DIR "/demo-pools/curve-2026-12-01.json");
  return c;
}

std::int64_t loan_months(const LoanArrays& loans) {
  std::int64_t months = 0;
  for (std::size_t i = 0; i < loans.size(); ++i) months += loans.remaining_term[i];
  return months;
}

void set_counters(benchmark::State& state, std::int64_t months) {
  state.counters["loan_months_per_s"] = benchmark::Counter(
      static_cast<double>(months) * static_cast<double>(state.iterations()),
      benchmark::Counter::kIsRate);
  state.counters["peak_rss_MiB"] = peak_rss_mib();
}

Assumptions constant_assumptions() {
  Assumptions a;
  a.prepay = constant_curve(0.08);
  a.default_rate = constant_curve(0.01);
  a.severity = constant_curve(0.40);
  a.lag_months = 12;
  return a;
}

void constant(benchmark::State& state, std::size_t count, unsigned threads) {
  const LoanArrays& loans = pool(count);
  ProjectionOptions options;
  options.threads = threads;
  const Assumptions a = constant_assumptions();
  for (auto _ : state) {
    Projection p = project_pool(loans, a, options);
    benchmark::DoNotOptimize(p.pool.cash_flow.data());
  }
  set_counters(state, loan_months(loans));
}

void model(benchmark::State& state, std::size_t count, unsigned threads) {
  const LoanArrays& loans = pool(count);
  static const CreditModel tables = default_credit_model();
  const Scenario base = find_scenario(default_scenarios(), "base");
  Assumptions a;
  ModelRun probe;
  probe.model = &tables;
  const ModelRun run =
      model_run(tables, base, curve(), kCutoff, projection_horizon(loans, a, &probe));
  ProjectionOptions options;
  options.threads = threads;
  options.model = &run;
  for (auto _ : state) {
    Projection p = project_pool(loans, a, options);
    benchmark::DoNotOptimize(p.pool.cash_flow.data());
  }
  set_counters(state, loan_months(loans));
}

void price_model(benchmark::State& state, std::size_t count) {
  const LoanArrays& loans = pool(count);
  static const CreditModel tables = default_credit_model();
  BidRequest request;
  request.target = BidTarget::yield;
  request.value = 0.065;
  request.settlement = Settlement{kCutoff, kCutoff, 17};
  request.model = &tables;
  request.scenario = find_scenario(default_scenarios(), "severe_downturn");
  request.risk = false;
  request.threads = 2;
  for (auto _ : state) {
    BidResult r = price_pool(loans, curve(), request);
    benchmark::DoNotOptimize(r.clean_price);
  }
  set_counters(state, 2 * loan_months(loans));  // loss-adjusted and no-loss projections
}

void register_all() {
  for (std::size_t count : {100'000, 1'000'000}) {
    for (unsigned threads : {1u, 2u}) {
      const std::string tail =
          "/loans:" + std::to_string(count) + "/threads:" + std::to_string(threads);
      benchmark::RegisterBenchmark(("constant" + tail).c_str(), constant, count, threads)
          ->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(3);
      benchmark::RegisterBenchmark(("model" + tail).c_str(), model, count, threads)
          ->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(3);
    }
  }
  benchmark::RegisterBenchmark("price_pool_model/loans:2000", price_model, 2000)
      ->Unit(benchmark::kMillisecond)->UseRealTime();
}

}  // namespace

int main(int argc, char** argv) {
  register_all();
  benchmark::Initialize(&argc, argv);
  benchmark::RunSpecifiedBenchmarks();
  benchmark::Shutdown();
  return 0;
}
