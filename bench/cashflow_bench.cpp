// Speed of the cash-flow projection in loan-months per second: project_pool against the tight
// loop (bench/tight_loop.h, the same arithmetic with nothing else: the practical limit), on 100k
// and 1M 30-year fixed-rate loans (bench/cashflow_cases.h; about 330 months each), 1 and 2
// threads, for each assumption set of bench_cases() and, for the engine, with loan totals.
//
// Names: <engine|tight>/<case>/loans:<n>/threads:<k>. Counters: loan_months_per_s (loan-months
// actually projected: each loan's remaining term, or 1 for a loan defaulting in full in month 1,
// over wall-clock time) and peak_rss_MiB, the process's peak resident memory so far (getrusage
// ru_maxrss): a high-water mark, so run one benchmark alone (--benchmark_filter) to read its own.
// bench/README.md says how to run it and what it measured.
#include <benchmark/benchmark.h>
#include <sys/resource.h>

#include <cstdint>
#include <map>
#include <memory>
#include <string>

#include "bench/cashflow_cases.h"
#include "bench/tight_loop.h"
#include "cashflow/cashflow.h"

namespace {

using namespace poolbid;
using namespace poolbid::bench;

constexpr std::uint64_t kSeed = 2026;

double peak_rss_mib() {
  rusage usage{};
  getrusage(RUSAGE_SELF, &usage);
  return static_cast<double>(usage.ru_maxrss) / 1024.0;  // Linux: KiB
}

// The pool of `count` loans, built on first use and kept for the run.
const LoanArrays& pool(std::size_t count) {
  static std::map<std::size_t, std::unique_ptr<LoanArrays>> pools;
  auto& slot = pools[count];
  if (!slot) slot = std::make_unique<LoanArrays>(make_fixed_loans(count, kSeed));
  return *slot;
}

void set_counters(benchmark::State& state, std::int64_t loan_months) {
  state.counters["loan_months_per_s"] = benchmark::Counter(
      static_cast<double>(loan_months) * static_cast<double>(state.iterations()),
      benchmark::Counter::kIsRate);
  state.counters["peak_rss_MiB"] = peak_rss_mib();
}

void engine(benchmark::State& state, const CashflowCase& c, std::size_t count, unsigned threads,
            bool loan_totals) {
  const LoanArrays& loans = pool(count);
  ProjectionOptions options;
  options.threads = threads;
  options.loan_totals = loan_totals;
  for (auto _ : state) {
    Projection p = project_pool(loans, c.assumptions, options);
    benchmark::DoNotOptimize(p.pool.cash_flow.data());
    benchmark::ClobberMemory();
  }
  set_counters(state, loan_months(loans, c.assumptions));
}

void tight(benchmark::State& state, const CashflowCase& c, std::size_t count, unsigned threads) {
  const LoanArrays& loans = pool(count);
  std::vector<std::uint8_t> flags;
  const TightLoans tight_input = tight_loans(loans, c.assumptions, flags);
  const TightAssumptions assumptions = tight_assumptions(c.assumptions);
  for (auto _ : state) {
    TightPool p = tight_project(tight_input, assumptions, threads);
    benchmark::DoNotOptimize(p.net_interest.data());
    benchmark::ClobberMemory();
  }
  set_counters(state, loan_months(loans, c.assumptions));
}

std::string name(const char* program, const std::string& c, std::size_t count, unsigned threads) {
  return std::string(program) + "/" + c + "/loans:" + std::to_string(count) +
         "/threads:" + std::to_string(threads);
}

void register_all() {
  static const std::vector<CashflowCase> cases = bench_cases();
  for (const std::size_t count : {std::size_t{100000}, std::size_t{1000000}}) {
    for (const unsigned threads : {1u, 2u}) {
      for (const CashflowCase& c : cases) {
        benchmark::RegisterBenchmark(name("engine", c.name, count, threads).c_str(), engine, c,
                                     count, threads, false)
            ->Unit(benchmark::kMillisecond)
            ->UseRealTime();
        benchmark::RegisterBenchmark(name("tight", c.name, count, threads).c_str(), tight, c,
                                     count, threads)
            ->Unit(benchmark::kMillisecond)
            ->UseRealTime();
      }
      // Loan totals (one row of lifetime totals per loan) on the constant case.
      benchmark::RegisterBenchmark(name("engine", "constant+loan_totals", count, threads).c_str(),
                                   engine, cases.front(), count, threads, true)
          ->Unit(benchmark::kMillisecond)
          ->UseRealTime();
    }
  }
}

}  // namespace

int main(int argc, char** argv) {
  register_all();
  benchmark::Initialize(&argc, argv);
  if (benchmark::ReportUnrecognizedArguments(argc, argv)) return 1;
  benchmark::RunSpecifiedBenchmarks();
  benchmark::Shutdown();
  return 0;
}
