// `poolbid price`: value the accepted loans on a yield curve and solve the bid for a target.
#include <fmt/core.h>

#include <charconv>
#include <memory>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "app/support.h"
#include "cashflow/cashflow.h"
#include "pricing/pricing.h"
#include "report/report.h"
#include "tape/tape.h"

namespace poolbid::app {

namespace {

// ---- Kick-outs: --kickouts [--box FILE] [--margin PCT] [--bad-loan-loss PCT] [--kickouts-csv FILE]
// Screens every loan with a credit box, weighs each decision, and prices the pool again without
// the loans kicked out (pricing.h "Kick-outs and decision analysis"). Any of these options asks
// for kick-outs.
struct KickoutArgs {
  bool on = false;
  std::string box;  // "" = default_credit_box()
  double margin_percent = 5;
  double bad_loan_loss_percent = 50;
  std::string csv;  // "" = none
  std::vector<CLI::Option*> given;

  void add_to(CLI::App& cmd) {
    given.push_back(cmd.add_flag(
        "--kickouts", on,
        "screen every loan (credit box, value at the bid, break-even default probability) and "
        "bid again without the loans kicked out"));
    given.push_back(cmd.add_option(
        "--box", box,
        "credit box file (JSON; default: the illustrative box, as demo-pools/credit-box.json)"));
    given.push_back(
        cmd.add_option("--margin", margin_percent,
                       "kick-outs: what declining a loan that would have paid costs, percent of "
                       "its balance")
            ->check(CLI::Range(0.01, 100.0))
            ->capture_default_str());
    given.push_back(
        cmd.add_option("--bad-loan-loss", bad_loan_loss_percent,
                       "kick-outs: what approving a loan that defaults costs, percent of its "
                       "balance")
            ->check(CLI::Range(0.01, 200.0))
            ->capture_default_str());
    given.push_back(cmd.add_option("--kickouts-csv", csv,
                                   "write every loan's kick-out decision as CSV to FILE"));
  }
  bool used() const {
    for (const CLI::Option* option : given)
      if (option->count() > 0) return true;
    return false;
  }
  DecisionEconomics economics() const {
    return {.margin = margin_percent / 100, .bad_loan_loss = bad_loan_loss_percent / 100};
  }
  // Checks the output paths and reads the box, before the tape, so a bad box stops the command at
  // once; nullopt without kick-outs. `inputs` as refuse_overwriting_inputs takes them.
  std::optional<CreditBox> prepare(const std::string& loans,
                                   std::vector<std::pair<std::string, std::string>> inputs) const {
    if (!used()) return std::nullopt;
    if (csv == "-")
      throw UsageError("--kickouts-csv -: standard output already carries the report; give "
                       "--kickouts-csv a file");
    refuse_overwriting_inputs("--loans", loans, {{"the credit box file", box}});
    inputs.emplace_back("the credit box file", box);
    refuse_overwriting_inputs("--kickouts-csv", csv, inputs);
    if (!csv.empty() && !loans.empty() && same_file(csv, loans))
      throw UsageError(fmt::format("--loans and --kickouts-csv name one file '{}'", csv));
    return box.empty() ? default_credit_box() : load_credit_box(box);
  }
};

struct PriceArgs {
  TapeArgs tape;
  AssumptionArgs assumption;
  ModelArgs model;
  std::string curve;  // a curve file, or a flat rate in percent
  TargetArgs target;
  std::string settle;
  std::string loans;  // "" = none
  double shock_bp = 25;
  std::string key_rates = "2,5,10,30";
  unsigned threads = 0;
  int delay_days = 17;
  KickoutArgs kickouts;

  void add_to(CLI::App& cmd) {
    tape.add_dated_to(cmd);
    cmd.add_option("--curve", curve,
                   "yield curve: a curve file (JSON quotes), or one number for a flat "
                   "continuously compounded rate in percent (4.25)")
        ->required();
    assumption.add_to(cmd);
    model.add_to(cmd);
    target.add_to(cmd);
    cmd.add_option("--settle", settle,
                   "settlement date YYYY-MM-DD (default: the cut-off date, or the curve's date "
                   "if later)");
    cmd.add_option("--loans", loans,
                   "write each loan's value at the pool's yield as CSV to FILE");
    cmd.add_option("--shock", shock_bp,
                   "curve move for effective duration, convexity and key-rate durations, bp")
        ->check(CLI::Range(0.01, 500.0))
        ->capture_default_str();
    cmd.add_option("--key-rates", key_rates,
                   "key-rate duration tenors in years, ascending (2,5,10,30), or none")
        ->capture_default_str();
    add_threads_and_delay(cmd, threads, delay_days);
    kickouts.add_to(cmd);
  }

  // --key-rates as years: "none" is no tenor. Throws TapeError (bad_option) on anything else.
  std::vector<double> key_rate_years() const;
};

std::vector<double> PriceArgs::key_rate_years() const {
  std::vector<double> years;
  if (key_rates == "none") return years;
  std::string_view rest = key_rates;
  while (true) {
    const std::size_t comma = rest.find(',');
    const std::string_view item = rest.substr(0, comma);
    double value = 0;
    const auto [ptr, ec] = std::from_chars(item.data(), item.data() + item.size(), value);
    if (item.empty() || ec != std::errc() || ptr != item.data() + item.size() ||
        !(value > 0 && value <= 50) || (!years.empty() && value <= years.back()))
      bad_option("--key-rates", key_rates,
                 "wants tenors in years above 0 and at most 50, ascending, separated by commas "
                 "(2,5,10,30), or none");
    years.push_back(value);
    if (comma == std::string_view::npos) break;
    rest.remove_prefix(comma + 1);
  }
  return years;
}

// Read, project, value, solve, write. Rejected rows are listed in the report and the exit code is
// 3; a target no price can meet is 7.
int run_price(const PriceArgs& args) {
  args.target.require("price");
  if (args.loans == "-")
    throw UsageError("--loans -: standard output already carries the report; give --loans a file");
  CurveOption curve_option{args.curve, std::nullopt};
  refuse_overwriting_inputs("--loans", args.loans,
                            {{"the tape", args.tape.tape},
                             {"the column map", args.tape.map},
                             {"the assumptions file", args.assumption.file},
                             {"the curve file", curve_option.file_path()},
                             {"the model file", args.model.model_file},
                             {"the scenarios file", args.model.scenarios_file}});
  args.model.refuse_with(args.assumption);
  // Kick-outs: the credit box, read before the tape.
  const std::optional<CreditBox> box =
      args.kickouts.prepare(args.loans, {{"the tape", args.tape.tape},
                                         {"the column map", args.tape.map},
                                         {"the assumptions file", args.assumption.file},
                                         {"the curve file", curve_option.file_path()},
                                         {"the model file", args.model.model_file},
                                         {"the scenarios file", args.model.scenarios_file}});
  const ReadOptions read_options = args.tape.read_options();
  const std::vector<double> key_rate_years = args.key_rate_years();
  const Assumptions assumptions = args.assumption.assumptions(args.model.used());
  const std::optional<Date> settle_given = parse_settle(args.settle);
  std::optional<CreditModel> credit_model;
  if (args.model.used()) credit_model = args.model.credit_model();
  const std::optional<Scenario> scenario =
      args.model.used() ? std::optional<Scenario>(args.model.chosen_scenario()) : std::nullopt;
  curve_option.load();

  const TapeRead tape = read_tape(args.tape.tape, read_options);
  if (tape.loans.size() == 0) return no_accepted_loans(tape, "price");
  const Date cutoff = require_cutoff(tape, "prices");
  const YieldCurve curve = curve_option.curve(cutoff);
  const Date settle = resolve_settlement(settle_given, args.settle, cutoff, curve, args.delay_days);
  std::optional<std::size_t> explained;
  if (args.model.explain) explained = find_loan(tape.loans, *args.model.explain);

  BidRequest request;
  args.target.apply(request);
  request.settlement = Settlement{cutoff, settle, args.delay_days};
  request.assumptions = assumptions;
  request.shock_bp = args.shock_bp;
  request.key_rate_years = key_rate_years;
  request.threads = args.threads;
  request.loan_values = !args.loans.empty();
  if (credit_model) {
    request.model = &*credit_model;
    request.scenario = *scenario;
  }
  // Kick-outs price the whole pool (with loan values) and then the kept loans.
  std::optional<KickoutResult> kicks;
  std::optional<BidResult> priced;
  if (box)
    kicks = price_with_kickouts(tape.loans, curve, request, *box, args.kickouts.economics());
  else
    priced = price_pool(tape.loans, curve, request);
  const BidResult& result = kicks ? kicks->whole : *priced;

  std::optional<ModelNote> note;
  std::optional<LoanExplanation> explanation;
  if (credit_model) {
    if (explained) {
      // The explanation reads the run price_pool valued: the scenario on the shocked curve.
      ModelRun probe;
      probe.model = &*credit_model;
      const int horizon = projection_horizon(tape.loans, request.assumptions, &probe);
      const ModelRun run = model_run(*credit_model, *scenario, result.curve, cutoff, horizon);
      explanation = explain_loan(tape.loans, *explained, run);
    }
    note = ModelNote{args.model.tables(), args.model.scenarios(), &request.scenario,
                     explanation ? &*explanation : nullptr};
  }
  const ModelNote* model_note = note ? &*note : nullptr;
  std::string document;
  if (kicks)
    document = args.tape.json ? price_kickouts_json(tape, curve, request, *kicks, model_note)
                              : price_kickouts_text(tape, curve, request, *kicks, model_note);
  else
    document = args.tape.json ? price_json(tape, curve, request, result, model_note)
                              : price_text(tape, curve, request, result, model_note);
  std::vector<OutputFile> files;
  if (!args.loans.empty())
    files.push_back({args.loans, [&](std::ostream& out) {
                       write_loan_values_csv(out, tape.loans, result);
                     }});
  if (kicks && !args.kickouts.csv.empty())
    files.push_back({args.kickouts.csv, [&](std::ostream& out) {
                       write_kickouts_csv(out, tape.loans, *kicks);
                     }});
  write_files_whole(files);
  write_stdout(document);
  return tape.rows_rejected > 0 ? kRowsRejected : kOk;
}

}  // namespace

Command add_price(CLI::App& app) {
  auto args = std::make_shared<PriceArgs>();
  CLI::App* cmd = app.add_subcommand(
      "price", "value the accepted loans on a yield curve and solve the bid for a target "
               "(exactly one of --target-yield, --target-spread, --price)");
  args->add_to(*cmd);
  return {cmd, [args] { return run_price(*args); }};
}

}  // namespace poolbid::app
