// What `poolbid compare` and `poolbid matrix` share: several tapes, each with its own column map
// (--map TAPE=MAP), read to one cut-off; the curve, target, common price, model and settlement
// options; and the pools and bid request built from them.
#pragma once

#include <CLI/CLI.hpp>

#include <optional>
#include <string>
#include <vector>

#include "app/support.h"
#include "curves/curves.h"
#include "pricing/pricing.h"
#include "tape/tape.h"

namespace poolbid::app {

struct PoolArgs {
  std::vector<std::string> tapes;
  std::vector<std::string> maps;  // "TAPE=MAP", TAPE one of `tapes` as given
  std::string cutoff;
  std::optional<double> servicing_fee_percent;
  bool json = false;
  std::string curve;
  std::optional<double> target_yield, target_spread, at_price;
  ModelArgs model;  // model_file, scenario, scenarios_file (no --model, --explain)
  std::optional<std::string> advancing;
  std::string settle;
  unsigned threads = 0;
  int delay_days = 17;
  bool one_scenario = false;  // --scenario: run one scenario of the set (compare)

  // The options; `scenario_option` adds --scenario NAME (compare runs one scenario; matrix all).
  void add_to(CLI::App& cmd, bool scenario_option);
};

// The tapes read and everything their pools are priced with.
struct PoolRun {
  std::vector<TapeRead> tapes;
  std::vector<std::string> names;  // each tape's seller, else its file name; made distinct
  CreditModel model;
  std::string model_source;         // the model file, "" for the built-in tables
  std::vector<Scenario> scenarios;  // the set (--scenarios, or the built-in one)
  Scenario scenario;                // --scenario (default base) in the set
  YieldCurve curve;
  Settlement settlement;
  BidTarget target = BidTarget::yield;
  double target_value = 0;
  Advancing advancing = Advancing::interest;  // the model's default (see AssumptionArgs)
  unsigned threads = 0;
  std::optional<int> stop;  // an exit code when a tape had no accepted loan

  std::vector<NamedPool> pools() const;  // point into `tapes`
  std::vector<const TapeRead*> tape_pointers() const;
  // Target, settlement, advancing, threads, the model (pointing at `model`) and `scenario`; risk
  // off (the reports show no durations).
  BidRequest request() const;
  bool rows_rejected() const;
};

// Checks the options, loads the model, scenarios and curve, reads every tape and resolves one
// cut-off and settlement. `command` names the command in messages. Throws what the commands map to
// exit codes; sets `stop` (having listed the rejected rows on standard error) when a tape has no
// accepted loan.
PoolRun prepare_pools(const PoolArgs& args, std::string_view command);

}  // namespace poolbid::app
