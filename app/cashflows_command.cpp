// `poolbid cashflows`: project the accepted loans month by month and write the pool and loan tables.
#include <fmt/core.h>

#include <cstdio>
#include <memory>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "app/support.h"
#include "cashflow/cashflow.h"
#include "report/report.h"
#include "tape/tape.h"

namespace poolbid::app {

namespace {

struct CashflowArgs {
  TapeArgs tape;
  AssumptionArgs assumption;
  ModelArgs model;
  std::string csv;    // "" = none; "-" = standard output
  std::string loans;  // "" = none; "-" = standard output (only beside --csv FILE)
  std::string curve;  // "" = none: ARMs keep their note rate
  unsigned threads = 0;
  int delay_days = 17;  // illustrative (DESIGN.md section 5): cash paid on the 18th

  void add_to(CLI::App& cmd) {
    tape.add_dated_to(cmd);
    assumption.add_to(cmd);
    model.add_to(cmd);
    cmd.add_option("--csv", csv, "write the monthly pool table as CSV to FILE ('-': stdout)")
        ->excludes("--json");
    cmd.add_option("--loans", loans, "write per-loan lifetime totals as CSV to FILE");
    cmd.add_option("--curve", curve,
                   "yield curve whose index forwards reset the ARMs: a curve file, or a flat "
                   "rate in percent (without it ARMs keep their note rate; the model needs it "
                   "for the market mortgage rate)");
    add_threads_and_delay(cmd, threads, delay_days);
  }
};

void check_outputs(const CashflowArgs& args) {
  if (args.loans == "-" && (args.csv.empty() || args.csv == "-"))
    throw UsageError("--loans -: standard output already carries the report; give --loans a "
                     "file, or --csv a file");
  const std::vector<std::pair<std::string, std::string>> inputs = {
      {"the tape", args.tape.tape},
      {"the column map", args.tape.map},
      {"the assumptions file", args.assumption.file},
      {"the curve file", CurveOption{args.curve, std::nullopt}.file_path()},
      {"the model file", args.model.model_file},
      {"the scenarios file", args.model.scenarios_file}};
  refuse_overwriting_inputs("--csv", args.csv, inputs);
  refuse_overwriting_inputs("--loans", args.loans, inputs);
  if (!args.csv.empty() && args.csv != "-" && !args.loans.empty() && args.loans != "-" &&
      same_file(args.csv, args.loans))
    throw UsageError(fmt::format("--csv and --loans name one file '{}'", args.csv));
}

// Read, project, write. Rejected rows are listed on stderr when stdout carries a CSV table, in the
// report otherwise; either way the exit code is 3.
int run_cashflows(const CashflowArgs& args) {
  check_outputs(args);
  args.model.refuse_with(args.assumption);
  if (args.model.explain && !args.csv.empty())
    throw UsageError("--explain adds the loan's explanation to the text or JSON report, which "
                     "--csv replaces with the monthly table: leave out --csv, or use --json");
  if (args.model.used() && args.curve.empty())
    throw UsageError(fmt::format("{}: the loan-level model needs a yield curve for the market "
                                 "mortgage rate its refinancing reads: give --curve FILE or a "
                                 "flat --curve RATE",
                                 args.model.option_given()));
  const ReadOptions read_options = args.tape.read_options();
  const Assumptions assumptions = args.assumption.assumptions(args.model.used());
  std::optional<CreditModel> credit_model;
  std::optional<Scenario> scenario;
  if (args.model.used()) {
    credit_model = args.model.credit_model();
    scenario = args.model.chosen_scenario();
  }
  CurveOption curve_option{args.curve, std::nullopt};
  if (!args.curve.empty()) curve_option.load();
  const TapeRead tape = read_tape(args.tape.tape, read_options);
  const Date cutoff = require_cutoff(tape, "cash flows");
  std::optional<std::size_t> explained;
  if (args.model.explain) explained = find_loan(tape.loans, *args.model.explain);

  ProjectionOptions options;
  options.threads = args.threads;
  options.loan_totals = !args.loans.empty();
  std::optional<YieldCurve> arm_curve;
  std::optional<ModelRun> run;
  int horizon = projection_horizon(tape.loans, assumptions);
  if (!args.curve.empty()) {
    arm_curve = curve_option.curve(cutoff);
    if (scenario) {
      // The scenario's rate shock moves the curve for the mortgage rate and the ARM indexes.
      const CurveShift& shock = scenario->rate_shock;
      if (shock.parallel_bp != 0 || !shock.key_bp.empty())
        arm_curve = shift_curve(*arm_curve, shock);
      ModelRun probe;
      probe.model = &*credit_model;
      horizon = projection_horizon(tape.loans, assumptions, &probe);
      run = model_run(*credit_model, *scenario, *arm_curve, cutoff, horizon);
      options.model = &*run;
    }
  }
  std::optional<CouponPaths> coupons;
  if (arm_curve) {
    coupons = arm_coupon_paths(tape.loans, *arm_curve, cutoff, horizon);
    options.coupons = &*coupons;
  }
  std::optional<LoanExplanation> explanation;
  if (explained) explanation = explain_loan(tape.loans, *explained, *run);
  std::optional<ModelNote> note;
  if (run)
    note = ModelNote{args.model.tables(), args.model.scenarios(), &*scenario,
                     explanation ? &*explanation : nullptr};
  const ModelNote* model_note = note ? &*note : nullptr;
  const YieldCurve* arm_curve_used = arm_curve ? &*arm_curve : nullptr;
  const Projection projection = project_pool(tape.loans, assumptions, options);

  std::vector<OutputFile> files;
  std::string document;  // standard output
  if (args.csv == "-") {
    document = cashflow_csv(projection.pool, cutoff, args.delay_days);
  } else if (!args.csv.empty()) {
    files.push_back({args.csv, [&](std::ostream& out) {
                       out << cashflow_csv(projection.pool, cutoff, args.delay_days);
                     }});
  } else if (args.tape.json) {
    document = cashflow_json(tape, assumptions, projection.pool, args.delay_days, arm_curve_used,
                             model_note);
  } else {
    document = cashflow_text(tape, assumptions, projection.pool, args.delay_days, arm_curve_used,
                             model_note);
  }
  if (args.loans == "-") {
    document = loan_flows_csv(tape.loans, projection.loans);
  } else if (!args.loans.empty()) {
    files.push_back({args.loans, [&](std::ostream& out) {
                       write_loan_flows_csv(out, tape.loans, projection.loans);
                     }});
  }
  write_files_whole(files);
  if (!document.empty()) write_stdout(document);
  if (!args.csv.empty()) {
    const std::string rejects = rejected_rows_text(tape);
    if (!rejects.empty()) std::fwrite(rejects.data(), 1, rejects.size(), stderr);
  }
  return tape.rows_rejected > 0 ? kRowsRejected : kOk;
}

}  // namespace

Command add_cashflows(CLI::App& app) {
  auto args = std::make_shared<CashflowArgs>();
  CLI::App* cmd = app.add_subcommand(
      "cashflows", "project the accepted loans' monthly cash flows under stated assumptions");
  args->add_to(*cmd);
  return {cmd, [args] { return run_cashflows(*args); }};
}

}  // namespace poolbid::app
