// The options `poolbid compare` and `poolbid matrix` share, and reading their tapes to one cut-off.
#include "app/pool_args.h"

#include <fmt/core.h>

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <filesystem>
#include <string>
#include <utility>
#include <vector>

#include "report/report.h"

namespace poolbid::app {

void PoolArgs::add_to(CLI::App& cmd, bool scenario_option) {
  one_scenario = scenario_option;
  cmd.add_option("TAPES", tapes, "loan tapes (CSV with a header row); the first is pool A")
      ->required();
  cmd.add_option("--map", maps,
                 "TAPE=MAP: read TAPE (written as among the tapes) through column map MAP; "
                 "repeat for each tape that needs one");
  cmd.add_option("--cutoff", cutoff,
                 "cut-off date YYYY-MM-01 for every tape (else each tape's column map's); the "
                 "tapes must share one");
  cmd.add_option("--servicing-fee", servicing_fee_percent,
                 "pool servicing fee in percent per year (0.25), where a tape has none");
  cmd.add_flag("--json", json, "write JSON instead of text");
  cmd.add_option("--curve", curve,
                 "yield curve: a curve file (JSON quotes), or one number for a flat "
                 "continuously compounded rate in percent (4.25)")
      ->required();
  CLI::Option* y = cmd.add_option("--target-yield", target_yield,
                                  "price every pool at this loss-adjusted bond-equivalent yield, "
                                  "percent");
  CLI::Option* z = cmd.add_option("--target-spread", target_spread,
                                  "price every pool at this loss-adjusted Z-spread over the "
                                  "curve, bp");
  y->check(CLI::Range(-10.0, 100.0));
  z->check(CLI::Range(-5000.0, 10000.0));
  y->excludes(z);
  cmd.add_option("--at-price", at_price,
                 "read every pool's yield and spreads at this clean price, percent of UPB "
                 "(default: pool A's price at the target)")
      ->check(CLI::Range(0.001, 1000.0));
  cmd.add_option("--model-file", model.model_file,
                 "model file (JSON): overrides of the loan-level model's tables (default: the "
                 "built-in illustrative tables)");
  cmd.add_option("--scenarios", model.scenarios_file,
                 scenario_option ? "scenario set (JSON) to pick --scenario from (default: the "
                                   "built-in set)"
                                 : "scenario set (JSON) to run every pool under (default: the "
                                   "built-in set: boom, base, mild_downturn, severe_downturn)");
  if (scenario_option)
    cmd.add_option("--scenario", model.scenario,
                   "scenario the model runs under: house prices, rate shock, multipliers "
                   "(default base)");
  cmd.add_option("--advancing", advancing,
                 "what the servicer advances on defaulted loans: interest (default with the model: "
                 "repaid from the sale, so severity counts the interest lost) or none");
  cmd.add_option("--settle", settle,
                 "settlement date YYYY-MM-DD (default: the cut-off date, or the curve's date "
                 "if later)");
  add_threads_and_delay(cmd, threads, delay_days);
}

namespace {

// Splits each --map TAPE=MAP at the '=' whose left side is one of the tapes as given (a path may
// hold '=' itself); a map per tape, "" for none.
std::vector<std::string> maps_by_tape(const PoolArgs& args) {
  std::vector<std::string> maps(args.tapes.size());
  for (const std::string& text : args.maps) {
    bool matched = false;
    for (std::size_t eq = text.find('='); eq != std::string::npos && !matched;
         eq = text.find('=', eq + 1)) {
      const std::string tape = text.substr(0, eq), map = text.substr(eq + 1);
      for (std::size_t k = 0; k < args.tapes.size(); ++k) {
        if (args.tapes[k] != tape) continue;
        if (map.empty()) throw UsageError(fmt::format("--map '{}': no column map after '='", text));
        if (!maps[k].empty())
          throw UsageError(
              fmt::format("--map '{}': {} has a column map already ('{}')", text, tape, maps[k]));
        maps[k] = map;
        matched = true;
      }
    }
    if (!matched) {
      std::string given;
      for (const std::string& tape : args.tapes) given += (given.empty() ? "" : ", ") + tape;
      throw UsageError(fmt::format(
          "--map '{}': write TAPE=MAP, with TAPE one of the tapes exactly as given ({})", text,
          given));
    }
  }
  return maps;
}

// The seller's name when the tape has one seller, else the file's name without its folder.
std::string pool_name(const TapeRead& tape) {
  const std::vector<std::string>& sellers = tape.loans.seller_names;
  if (sellers.size() == 1 && !sellers.front().empty()) return sellers.front();
  const std::string file = std::filesystem::path(tape.file).filename().string();
  return file.empty() ? tape.file : file;
}

}  // namespace

PoolRun prepare_pools(const PoolArgs& args, std::string_view command) {
  if (!args.target_yield && !args.target_spread)
    throw UsageError(
        fmt::format("{}: say what to price every pool at: --target-yield Y "
                    "(percent) or --target-spread BP",
                    command));
  const std::vector<std::string> maps = maps_by_tape(args);
  PoolRun run;
  if (args.target_yield) {
    run.target = BidTarget::yield;
    run.target_value = *args.target_yield / 100;
  } else {
    run.target = BidTarget::spread;
    run.target_value = *args.target_spread / 1e4;
  }
  run.threads = args.threads;
  if (args.advancing) run.advancing = parse_advancing(*args.advancing);
  const std::optional<Date> settle_given = parse_settle(args.settle);
  std::vector<ReadOptions> read_options;
  for (std::size_t k = 0; k < args.tapes.size(); ++k) {
    TapeArgs tape{args.tapes[k], maps[k], args.cutoff, args.servicing_fee_percent, args.json};
    read_options.push_back(tape.read_options());
  }
  run.model = args.model.credit_model();
  run.model_source = args.model.model_file;
  run.scenarios = args.model.scenario_set();
  if (args.one_scenario) {
    const bool has_base = std::any_of(run.scenarios.begin(), run.scenarios.end(),
                                      [](const Scenario& s) { return s.name == "base"; });
    run.scenario = !args.model.scenario && !has_base && !run.scenarios.empty()
                       ? run.scenarios.front()
                       : find_scenario(run.scenarios, args.model.scenario_name());
  }
  CurveOption curve_option{args.curve, std::nullopt};
  curve_option.load();

  for (std::size_t k = 0; k < args.tapes.size(); ++k) {
    run.tapes.push_back(read_tape(args.tapes[k], read_options[k]));
    if (run.tapes.back().loans.size() == 0) {
      run.stop = no_accepted_loans(run.tapes.back(), command);
      return run;
    }
  }
  const Date cutoff = require_cutoff(run.tapes.front(), "prices");
  for (const TapeRead& tape : run.tapes) {
    const Date other = require_cutoff(tape, "prices");
    if (other != cutoff)
      bad_option("--cutoff", args.cutoff,
                 fmt::format("the tapes' cut-off dates differ ({} {}, {} {}): {} prices every "
                             "pool to one cut-off; give --cutoff or fix the column maps",
                             run.tapes.front().file, iso_text(cutoff), tape.file, iso_text(other),
                             command));
  }
  run.curve = curve_option.curve(cutoff);
  run.settlement = Settlement{
      cutoff, resolve_settlement(settle_given, args.settle, cutoff, run.curve, args.delay_days),
      args.delay_days};

  std::vector<std::string> names;
  for (const TapeRead& tape : run.tapes) names.push_back(pool_name(tape));
  for (std::size_t k = 0; k < names.size(); ++k) {
    const bool shared = std::count(names.begin(), names.end(), names[k]) > 1;
    run.names.push_back(shared ? fmt::format("{} ({})", names[k], args.tapes[k]) : names[k]);
  }
  return run;
}

std::vector<NamedPool> PoolRun::pools() const {
  std::vector<NamedPool> out;
  for (std::size_t k = 0; k < tapes.size(); ++k) out.push_back({names[k], &tapes[k].loans});
  return out;
}

std::vector<const TapeRead*> PoolRun::tape_pointers() const {
  std::vector<const TapeRead*> out;
  for (const TapeRead& tape : tapes) out.push_back(&tape);
  return out;
}

BidRequest PoolRun::request() const {
  BidRequest r;
  r.target = target;
  r.value = target_value;
  r.settlement = settlement;
  r.assumptions.advancing = advancing;
  r.threads = threads;
  r.model = &model;
  r.scenario = scenario;
  r.risk = false;
  return r;
}

bool PoolRun::rows_rejected() const {
  return std::any_of(tapes.begin(), tapes.end(),
                     [](const TapeRead& t) { return t.rows_rejected > 0; });
}

}  // namespace poolbid::app
