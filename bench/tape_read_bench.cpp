// Speed of reading and validating a loan tape (100k and 1M loans), and of writing demo tapes.
//
// The tapes are invented loose-profile canonical demo tapes, written once to bench-data/ in the
// build folder and reused; the 1M-loan one goes to $POOLBID_BENCH_TAPE instead when that is set.
// Delete them after changing the generator. Reports rows/s (items) and bytes/s on wall-clock
// time, and the process's peak resident memory so far (getrusage ru_maxrss) in MiB: a high-water
// mark, so run one benchmark alone (--benchmark_filter) to read its own peak.
#include <benchmark/benchmark.h>
#include <sys/resource.h>

#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <stdexcept>
#include <string>

#include "tape/tape.h"

namespace {

using namespace poolbid;

constexpr std::uint64_t kSeed = 2026;

double peak_rss_mib() {
  rusage usage{};
  getrusage(RUSAGE_SELF, &usage);
  return static_cast<double>(usage.ru_maxrss) / 1024.0;  // Linux: KiB
}

std::string tape_path(std::size_t loans) {
  if (loans == 1000000) {
    if (const char* path = std::getenv("POOLBID_BENCH_TAPE"); path && *path) return path;
  }
  return std::string(POOLBID_BENCH_DATA) + "/loose-canonical-" +
         std::to_string(loans) + "-seed" + std::to_string(kSeed) + ".csv";
}

// The tape for `loans`, written (to a temporary name, then renamed) if it is not there yet.
std::string ensure_tape(std::size_t loans) {
  const std::string path = tape_path(loans);
  if (std::filesystem::exists(path)) return path;
  const std::filesystem::path parent = std::filesystem::path(path).parent_path();
  if (!parent.empty()) std::filesystem::create_directories(parent);
  const std::string temp = path + ".partial";
  {
    std::ofstream out(temp, std::ios::binary | std::ios::trunc);
    if (!out) throw std::runtime_error("cannot write " + temp);
    DemoTapeOptions options;
    options.loans = loans;
    options.profile = DemoProfile::loose;
    options.layout = DemoLayout::canonical;
    options.seed = kSeed;
    write_demo_tape(out, options);
    out.flush();
    if (!out) throw std::runtime_error("cannot write " + temp + " (disk full?)");
  }
  std::filesystem::rename(temp, path);
  return path;
}

// Registered first, so its peak memory is not the 1M-loan read's.
void BM_write_demo_tape(benchmark::State& state) {
  DemoTapeOptions options;
  options.loans = static_cast<std::size_t>(state.range(0));
  options.profile = DemoProfile::loose;
  options.seed = kSeed;
  std::int64_t bytes = 0;
  for (auto _ : state) {
    std::ostringstream out;
    write_demo_tape(out, options);
    bytes = static_cast<std::int64_t>(out.tellp());
    benchmark::DoNotOptimize(bytes);
  }
  state.SetItemsProcessed(state.iterations() * static_cast<std::int64_t>(options.loans));
  state.SetBytesProcessed(state.iterations() * bytes);
  state.counters["peak_rss_MiB"] = peak_rss_mib();
}
BENCHMARK(BM_write_demo_tape)
    ->Arg(100000)
    ->Unit(benchmark::kMillisecond)
    ->Iterations(3)
    ->UseRealTime();

void BM_read_tape(benchmark::State& state) {
  const auto loans = static_cast<std::size_t>(state.range(0));
  const std::string path = ensure_tape(loans);
  const auto bytes = static_cast<std::int64_t>(std::filesystem::file_size(path));
  std::size_t rows = 0;
  for (auto _ : state) {
    const TapeRead tape = read_tape(path);
    if (tape.rows_rejected != 0 || tape.rows_read != loans) {
      state.SkipWithError("the benchmark tape did not read clean");
      break;
    }
    rows = tape.rows_read;
    benchmark::DoNotOptimize(tape.loans.current_balance.data());
  }
  state.SetItemsProcessed(state.iterations() * static_cast<std::int64_t>(rows));
  state.SetBytesProcessed(state.iterations() * bytes);
  state.counters["peak_rss_MiB"] = peak_rss_mib();
}
BENCHMARK(BM_read_tape)
    ->Arg(100000)
    ->Arg(1000000)
    ->Unit(benchmark::kMillisecond)
    ->Iterations(3)
    ->UseRealTime();

}  // namespace

BENCHMARK_MAIN();
