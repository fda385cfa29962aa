// `poolbid matrix` reports: every pool under every scenario in one table (a row per pool and
// scenario), as text and JSON.
#include <cstddef>
#include <span>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include <fmt/core.h>
#include <nlohmann/json.hpp>

#include "curves/curves.h"
#include "pricing/pricing.h"
#include "report/compare_parts.h"
#include "report/format.h"
#include "report/report.h"
#include "tape/tape.h"

namespace poolbid {
namespace {

using detail::Align;
using detail::Json;
using detail::number_or_null;

constexpr int kPriceDecimals = 3;
constexpr int kPctDecimals = 2;

void check_inputs(std::span<const TapeRead* const> tapes, std::span<const Scenario> scenarios,
                  const OutcomeMatrix& m) {
  if (tapes.size() != m.pools.size())
    throw std::invalid_argument(
        fmt::format("matrix report: {} tapes for {} pools", tapes.size(), m.pools.size()));
  if (scenarios.size() != m.scenarios.size())
    throw std::invalid_argument(fmt::format("matrix report: {} scenarios for a matrix of {}",
                                            scenarios.size(), m.scenarios.size()));
  if (m.cells.size() != m.pools.size() * m.scenarios.size())
    throw std::invalid_argument("matrix report: the matrix has the wrong number of cells");
  for (const TapeRead* t : tapes)
    if (t == nullptr) throw std::invalid_argument("matrix report: a tape is null");
}

// "the price of A (Brindlecote Home Loans) at the target in base", or "given".
std::string common_price_origin(const OutcomeMatrix& m) {
  if (m.price_given) return "given";
  return fmt::format("{}'s price at the target in scenario {}", detail::pool_letter(0),
                     detail::display_text(m.scenarios[m.price_scenario], 60));
}

}  // namespace

std::string matrix_text(std::span<const TapeRead* const> tapes, std::span<const Scenario> scenarios,
                        const YieldCurve& curve, const BidRequest& request,
                        const OutcomeMatrix& matrix, std::string_view model_source) {
  check_inputs(tapes, scenarios, matrix);
  std::string out =
      fmt::format("poolbid matrix: {} x {}\n", detail::count_of(tapes.size(), "pool", "pools"),
                  detail::count_of(scenarios.size(), "scenario", "scenarios"));
  out += detail::run_heading(tapes, curve, request, model_source);
  out += fmt::format(
      "common price: {:.{}f} clean ({});\n  the yield and spread columns are read at it\n",
      matrix.common_price, kPriceDecimals, common_price_origin(matrix));

  out += "\npools\n";
  {
    detail::TextTable table{{}, {Align::left, Align::left, Align::left, Align::right}, {}};
    for (std::size_t k = 0; k < tapes.size(); ++k)
      table.rows.push_back({detail::pool_letter(k), detail::display_text(matrix.pools[k], 60),
                            detail::display_text(tapes[k]->file, 200),
                            detail::count_of(tapes[k]->rows_accepted(), "loan", "loans")});
    out += detail::render(table);
  }
  out += "\nscenarios\n";
  {
    detail::TextTable table{{}, {Align::left, Align::left}, {}};
    constexpr std::size_t kColumn = detail::kTextWidth - 20;  // beside a scenario's name
    for (const Scenario& s : scenarios) {
      std::string name = detail::display_text(s.name, 60);
      for (const std::string& line : detail::wrapped(detail::scenario_text(s), kColumn))
        table.rows.push_back({std::exchange(name, std::string()), line});
      for (const std::string& line :
           detail::wrapped(detail::display_text(s.description, 1000), kColumn))
        table.rows.push_back({"", line});
    }
    out += detail::render(table);
  }

  out += fmt::format(
      "\noutcomes: defaults and loss lifetime, % of cut-off UPB; severity loss / defaults; price\n"
      "  clean, % of UPB, at the target; yield and Z-spread loss-adjusted at the common price\n"
      "  {:.{}f}, the spread over the scenario's curve\n",
      matrix.common_price, kPriceDecimals);
  detail::TextTable table{{"pool", "scenario", "defaults %", "loss %", "severity %", "price", "WAL",
                           "yield %", "Z-spread bp"},
                          {Align::left, Align::left, Align::right, Align::right, Align::right,
                           Align::right, Align::right, Align::right, Align::right},
                          {}};
  bool unsolved = false;
  for (std::size_t p = 0; p < matrix.pools.size(); ++p)
    for (std::size_t s = 0; s < matrix.scenarios.size(); ++s) {
      const MatrixCell& c = matrix.at(p, s);
      unsolved = unsolved || !c.at_common_price.solved;
      table.rows.push_back({s == 0 ? detail::pool_letter(p) : "",
                            detail::display_text(matrix.scenarios[s], 40),
                            detail::fixed_or_dash(c.cum_default_pct, kPctDecimals),
                            detail::fixed_or_dash(c.cum_loss_pct, kPctDecimals),
                            detail::fixed_or_dash(c.severity_pct, kPctDecimals),
                            detail::fixed_or_dash(c.clean_price, kPriceDecimals),
                            detail::fixed_or_dash(c.wal_years, 2),
                            detail::percent_text(c.at_common_price.loss_adjusted.bey),
                            detail::bp_text(c.at_common_price.loss_adjusted.z_spread)});
    }
  out += detail::render(table);
  if (unsolved)
    out += "  (\"-\": no yield or spread prices that pool's flows at the common price)\n";
  out += detail::rejects_and_caution_of(tapes, matrix.pools, "in the matrix");
  return out;
}

std::string matrix_json(std::span<const TapeRead* const> tapes, std::span<const Scenario> scenarios,
                        const YieldCurve& curve, const BidRequest& request,
                        const OutcomeMatrix& matrix, std::string_view model_source) {
  check_inputs(tapes, scenarios, matrix);
  Json document = detail::run_json_head(tapes, curve, request, model_source);
  document["target"] = detail::target_json(request);
  document["common_price"] =
      Json{{"clean_price", number_or_null(matrix.common_price)},
           {"from", matrix.price_given ? "given" : "first_pool"},
           {"scenario",
            matrix.price_given ? Json(nullptr) : Json(matrix.scenarios[matrix.price_scenario])}};
  Json pools = Json::array();
  for (std::size_t k = 0; k < tapes.size(); ++k) {
    Json pool = detail::tape_json(*tapes[k], matrix.pools[k]);
    pool["rejected"] = detail::rejected_json(*tapes[k]);
    pools.push_back(std::move(pool));
  }
  document["pools"] = std::move(pools);
  Json scenario_list = Json::array();
  for (const Scenario& s : scenarios) scenario_list.push_back(detail::scenario_json(s));
  document["scenarios"] = std::move(scenario_list);
  Json cells = Json::array();
  for (std::size_t p = 0; p < matrix.pools.size(); ++p)
    for (std::size_t s = 0; s < matrix.scenarios.size(); ++s) {
      const MatrixCell& c = matrix.at(p, s);
      const PoolAtPrice& a = c.at_common_price;
      cells.push_back(Json{
          {"pool", matrix.pools[p]},
          {"pool_index", p},
          {"scenario", matrix.scenarios[s]},
          {"cum_default_pct", number_or_null(c.cum_default_pct)},
          {"cum_loss_pct", number_or_null(c.cum_loss_pct)},
          {"severity_pct", number_or_null(c.severity_pct)},
          {"clean_price", number_or_null(c.clean_price)},
          {"wal_years", number_or_null(c.wal_years)},
          {"at_common_price", Json{{"cash_flow_yield", number_or_null(a.loss_adjusted.cfy)},
                                   {"bey", number_or_null(a.loss_adjusted.bey)},
                                   {"z_spread", number_or_null(a.loss_adjusted.z_spread)},
                                   {"spread_at_wal", number_or_null(a.loss_adjusted.spread_at_wal)},
                                   {"no_loss_z_spread", number_or_null(a.no_loss.z_spread)},
                                   {"credit_cost_bp", number_or_null(a.credit_cost_bp)},
                                   {"solved", a.solved}}}});
    }
  document["cells"] = std::move(cells);
  document["caution"] = std::string(caution_text());
  return detail::dump_json(document);
}

}  // namespace poolbid
