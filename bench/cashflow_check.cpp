// Pool totals of project_pool (1 and 2 threads, and summed from its loan totals) and of the tight
// loop on the cross-check pool, for every case of check_cases(), as JSON on stdout.
// bench/numpy_cashflow.py --check --against <this program> compares them with NumPy's.
//
// Usage: cashflow_check [--loans N] [--seed S]   (defaults: 5000 loans, seed 2026)
#include <cstdint>
#include <cstdlib>
#include <iostream>
#include <numeric>
#include <string>
#include <string_view>

#include <nlohmann/json.hpp>

#include "bench/cashflow_cases.h"
#include "bench/tight_loop.h"
#include "cashflow/cashflow.h"

namespace {

using namespace poolbid;
using namespace poolbid::bench;
using nlohmann::json;

double total(const std::vector<double>& v) { return std::accumulate(v.begin(), v.end(), 0.0); }

// Pool totals and the monthly cash flow of a pool table: the engine's PoolFlows and the tight
// loop's TightPool name their columns alike.
template <class Pool>
json pool_json(const Pool& p, const std::vector<double>& cash_by_month) {
  return {{"months", p.months},
          {"begin_balance", total(p.begin_balance)},
          {"defaults", total(p.defaults)},
          {"sched_principal", total(p.sched_principal)},
          {"prepayment", total(p.prepayment)},
          {"gross_interest", total(p.gross_interest)},
          {"servicing", total(p.servicing)},
          {"net_interest", total(p.net_interest)},
          {"advanced_interest", total(p.advanced_interest)},
          {"loss", total(p.loss)},
          {"recovery", total(p.recovery)},
          {"end_balance", total(p.end_balance)},
          {"cash_flow", total(cash_by_month)},
          {"cash_flow_by_month", cash_by_month}};
}

json engine_json(const PoolFlows& p) { return pool_json(p, p.cash_flow); }

json loan_totals_json(const LoanFlows& l) {
  return {{"defaults", total(l.defaults)},
          {"sched_principal", total(l.sched_principal)},
          {"prepayment", total(l.prepayment)},
          {"gross_interest", total(l.gross_interest)},
          {"servicing", total(l.servicing)},
          {"net_interest", total(l.net_interest)},
          {"advanced_interest", total(l.advanced_interest)},
          {"loss", total(l.loss)},
          {"recovery", total(l.recovery)},
          {"cash_flow", total(l.cash_flow)}};
}

json tight_json(const TightPool& p) {
  std::vector<double> cash(p.months);
  for (int m = 0; m < p.months; ++m)
    cash[m] = p.net_interest[m] + p.sched_principal[m] + p.prepayment[m] + p.recovery[m];
  return pool_json(p, cash);
}

std::uint64_t number(std::string_view option, const char* text) {
  char* end = nullptr;
  const unsigned long long value = std::strtoull(text, &end, 10);
  if (end == text || *end != '\0' || text[0] == '-') {
    std::cerr << "cashflow_check: " << option << " '" << text << "': not a whole number\n";
    std::exit(2);
  }
  return value;
}

}  // namespace

int main(int argc, char** argv) {
  std::size_t count = 5000;
  std::uint64_t seed = 2026;
  for (int i = 1; i < argc; ++i) {
    const std::string_view arg = argv[i];
    if ((arg == "--loans" || arg == "--seed") && i + 1 < argc) {
      const std::uint64_t value = number(arg, argv[++i]);
      (arg == "--loans" ? count : seed) = value;
    } else {
      std::cerr << "cashflow_check: unknown argument '" << arg
                << "'; usage: cashflow_check [--loans N] [--seed S]\n";
      return 2;
    }
  }
  if (count < 3) {
    std::cerr << "cashflow_check: --loans must be at least 3 (the hand-written loans)\n";
    return 2;
  }
  const LoanArrays loans = make_check_loans(count, seed);
  json out = {{"loans", count}, {"seed", seed}, {"cases", json::object()}};
  for (const CashflowCase& c : check_cases()) {
    json& row = out["cases"][c.name];
    for (const unsigned threads : {1u, 2u}) {
      ProjectionOptions options;
      options.threads = threads;
      row["engine_threads" + std::to_string(threads)] =
          engine_json(project_pool(loans, c.assumptions, options).pool);
      std::vector<std::uint8_t> flags;
      row["tight_threads" + std::to_string(threads)] =
          tight_json(tight_project(tight_loans(loans, c.assumptions, flags),
                                   tight_assumptions(c.assumptions), threads));
    }
    ProjectionOptions with_totals;
    with_totals.threads = 2;
    with_totals.loan_totals = true;
    row["engine_loan_totals"] = loan_totals_json(project_pool(loans, c.assumptions, with_totals).loans);
  }
  std::cout << out.dump() << '\n';
  return 0;
}
