// `poolbid shock`: a held pool repriced after a shock -- the base scenario at the held price, the
// shocked scenario at the same Z-spread -- and the P&L.
#include <fmt/core.h>

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "app/support.h"
#include "pricing/pricing.h"
#include "report/report.h"
#include "tape/tape.h"

namespace poolbid::app {

namespace {

struct ShockArgs {
  TapeArgs tape;
  std::string curve;
  double held_price = 0;
  std::string scenario;
  std::string base_scenario = "base";
  ModelArgs model;  // only its files: --model-file, --scenarios
  std::string settle;
  std::string loans;  // "" = none
  unsigned threads = 0;
  int delay_days = 17;

  void add_to(CLI::App& cmd) {
    tape.add_dated_to(cmd);
    cmd.add_option("--curve", curve,
                   "yield curve: a curve file (JSON quotes), or one number for a flat "
                   "continuously compounded rate in percent (4.25)")
        ->required();
    cmd.add_option("--held-price", held_price,
                   "the clean price the pool is held at, percent of cut-off UPB")
        ->required()
        ->check(CLI::Range(0.001, 1000.0));
    cmd.add_option("--scenario", scenario,
                   "the shocked scenario: its house prices, multipliers and rate shock")
        ->required();
    cmd.add_option("--base-scenario", base_scenario,
                   "the scenario the held price is read under")
        ->capture_default_str();
    cmd.add_option("--scenarios", model.scenarios_file,
                   "scenario set (JSON) to pick both scenarios from (default: the built-in set)");
    cmd.add_option("--model-file", model.model_file,
                   "model file (JSON): overrides of the loan-level model's tables");
    cmd.add_option("--settle", settle,
                   "settlement date YYYY-MM-DD (default: the cut-off date, or the curve's date "
                   "if later)");
    cmd.add_option("--loans", loans,
                   "write each loan's value before and after the shock and its P&L as CSV to "
                   "FILE");
    add_threads_and_delay(cmd, threads, delay_days);
  }
};

// Read, value before and after, write. Rejected rows are listed in the report and the exit code
// is 3; a held price with no Z-spread is 7.
int run_shock(const ShockArgs& args) {
  if (args.loans == "-")
    throw UsageError("--loans -: standard output already carries the report; give --loans a file");
  CurveOption curve_option{args.curve, std::nullopt};
  refuse_overwriting_inputs("--loans", args.loans,
                            {{"the tape", args.tape.tape},
                             {"the column map", args.tape.map},
                             {"the curve file", curve_option.file_path()},
                             {"the model file", args.model.model_file},
                             {"the scenarios file", args.model.scenarios_file}});
  const ReadOptions read_options = args.tape.read_options();
  const std::optional<Date> settle_given = parse_settle(args.settle);
  const CreditModel credit_model = args.model.credit_model();
  const std::vector<Scenario> scenarios = args.model.scenario_set();
  const Scenario base = find_scenario(scenarios, args.base_scenario, "--base-scenario");
  const Scenario shocked = find_scenario(scenarios, args.scenario, "--scenario");
  curve_option.load();

  const TapeRead tape = read_tape(args.tape.tape, read_options);
  if (tape.loans.size() == 0) return no_accepted_loans(tape, "reprice");
  const Date cutoff = require_cutoff(tape, "repricings");
  const YieldCurve curve = curve_option.curve(cutoff);
  const Date settle = resolve_settlement(settle_given, args.settle, cutoff, curve, args.delay_days);

  ShockRequest request;
  BidRequest& held = request.held;
  held.target = BidTarget::price;
  held.value = args.held_price;
  held.settlement = Settlement{cutoff, settle, args.delay_days};
  held.model = &credit_model;
  held.scenario = base;
  held.key_rate_years = {};  // effective duration only
  // The servicer advances interest until the sale and is repaid from it, so the severity counts
  // the interest lost while a defaulted loan waits (DESIGN.md section 7).
  held.assumptions.advancing = Advancing::interest;
  held.threads = args.threads;
  held.loan_values = !args.loans.empty();
  request.shocked = shocked;
  const ShockResult result = reprice_after_shock(tape.loans, curve, request);

  const ModelNote note{args.model.tables(), args.model.scenarios(), nullptr, nullptr};
  const std::string document = args.tape.json ? shock_json(tape, curve, request, result, note)
                                               : shock_text(tape, curve, request, result, note);
  if (!args.loans.empty())
    write_file_whole(args.loans, [&](std::ostream& out) {
      write_shock_loans_csv(out, tape.loans, result);
    });
  write_stdout(document);
  return tape.rows_rejected > 0 ? kRowsRejected : kOk;
}

}  // namespace

Command add_shock(CLI::App& app) {
  auto args = std::make_shared<ShockArgs>();
  CLI::App* cmd = app.add_subcommand(
      "shock", "reprice a held pool after a shock: its value at the held price under a base "
               "scenario, then under the shocked scenario at the same Z-spread, and the P&L");
  args->add_to(*cmd);
  return {cmd, [args] { return run_shock(*args); }};
}

}  // namespace poolbid::app
