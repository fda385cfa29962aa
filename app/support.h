// What the `poolbid` commands share: exit codes, whole-file output, the tape, assumption, curve,
// target and settlement options, and the runner type each command file hands to main.cpp.
#pragma once

#include <CLI/CLI.hpp>

#include <functional>
#include <iosfwd>
#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "curves/curves.h"
#include "pricing/pricing.h"
#include "tape/tape.h"

namespace poolbid::app {

enum ExitCode : int {
  kOk = 0,             // every row accepted (warnings allowed)
  kInternal = 1,       // a bug: please report it
  kUsage = 2,          // the command line is wrong
  kRowsRejected = 3,   // the command ran; some tape rows were rejected (listed)
  kUnusableTape = 4,   // the tape cannot be read as a tape at all; nothing written
  kUnusableInput = 5,  // a column map, option value or other input file is unusable
  kCannotWrite = 6,    // an output file could not be written; nothing left behind
  kNoSolution = 7,     // no price meets the target, or a measure has no solution; nothing written
};

int exit_code_for(const TapeError& e);

// A registered command: its CLI11 subcommand and what to run when it was the one given (the
// options are parsed by then). `run` returns the exit code and may throw the errors
// run_with_exit_codes maps.
struct Command {
  CLI::App* app = nullptr;
  std::function<int()> run;
};

// Runs a command, turning the errors every command can raise into their exit codes with one line
// on standard error: TapeError (4 or 5), AssumptionError and CurveError (5), PricingError (7),
// UsageError (2), WriteError (6). Anything else propagates (main: internal error, 1).
int run_with_exit_codes(const std::function<int()>& run);

// An output file that could not be written.
struct WriteError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

// An output path that would overwrite one of the inputs, two outputs on one path, or options that
// do not go together (exit 2).
struct UsageError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

// Files written through a temporary `PATH.partial` each and renamed into place only when every one
// was written, so a failure leaves no partial file and no file without its companions. A symbolic
// link is followed (the file it names is replaced, not the link); a path that exists and is not a
// regular file (a device, a pipe) is written directly, since renaming over it would replace it.
// `write` fills a file's stream. Throws WriteError naming the file and the reason.
struct OutputFile {
  std::string path;
  std::function<void(std::ostream&)> write;
};
void write_files_whole(const std::vector<OutputFile>& files);
void write_file_whole(const std::string& path, const std::function<void(std::ostream&)>& write);
// Writes a whole document to standard output. Throws WriteError if it did not all get there
// (a closed pipe, a full disk behind a redirection).
void write_stdout(std::string_view document);

// An option value that is unusable (exit 5).
[[noreturn]] void bad_option(const std::string& option, const std::string& value,
                             const std::string& message);

// True when both paths name one file, existing or not.
bool same_file(const std::string& a, const std::string& b);
// Throws UsageError if output `path` (given as `option`; "" and "-" are skipped) names one of the
// inputs: pairs of (what, path), e.g. {"the tape", "pool.csv"}; empty input paths are skipped.
void refuse_overwriting_inputs(const std::string& option, const std::string& path,
                               const std::vector<std::pair<std::string, std::string>>& inputs);

std::string iso_text(Date d);

// Options shared by every command that reads a tape.
struct TapeArgs {
  std::string tape;
  std::string map;
  std::string cutoff;
  std::optional<double> servicing_fee_percent;
  bool json = false;

  void add_to(CLI::App& cmd);
  // The same, with --cutoff described as needed for payment dates (cashflows, price, ...).
  void add_dated_to(CLI::App& cmd);
  ReadOptions read_options() const;
};

// The tape's cut-off date; commands that date their cash need one. `what` completes "... need one":
// "cash flows", "prices".
Date require_cutoff(const TapeRead& tape, std::string_view what);

// Writes the report and gives the exit code: 3 when rows were rejected, else 0.
int finish_tape_command(const TapeRead& tape, const std::string& document);

// The assumption options shared by `cashflows` and `price`.
struct AssumptionArgs {
  std::string file;
  std::optional<std::string> prepay, default_rate, severity, lag, advancing;
  bool delinquent_default = false;

  void add_to(CLI::App& cmd);
  // The assumptions file, if any, then each option given over it. Throws AssumptionError.
  Assumptions assumptions(bool model = false) const;  // model: advancing defaults to interest
  // The pool-wide curve options given on the command line ("--prepay", ...), for refusing them
  // beside the loan-level model; --advancing is not among them (the model reads it).
  std::vector<std::string> curve_options_given() const;
};

// The loan-level model options shared by `cashflows` and `price`: --model, --model-file,
// --scenario, --scenarios, --explain. Each of the others implies --model.
struct ModelArgs {
  bool model = false;
  std::string model_file;  // "" = the built-in tables
  std::optional<std::string> scenario;  // default "base"
  std::string scenarios_file;           // "" = default_scenarios()
  std::optional<std::string> explain;   // a loan id

  void add_to(CLI::App& cmd);
  // True when any of the options was given (--scenarios too: a set is only read by the model).
  bool used() const;
  // The model option given first (--model, --model-file, --scenario, --scenarios, --explain), for
  // messages; "" when none.
  std::string option_given() const;
  std::string scenario_name() const { return scenario ? *scenario : std::string("base"); }
  // Throws UsageError naming both options when the model is used beside a pool-wide curve option
  // (--prepay, --default, --severity, --lag, --delinquent-default).
  void refuse_with(const AssumptionArgs& assumption) const;
  // The tables (built-in, or the file's overrides) and the chosen scenario; AssumptionError when a
  // file is bad or the scenario is not in the set (the message lists the names there are).
  CreditModel credit_model() const;
  std::vector<Scenario> scenario_set() const;
  Scenario chosen_scenario() const;
  // "built-in" or the file, for reports.
  std::string tables() const { return model_file.empty() ? std::string("built-in") : model_file; }
  std::string scenarios() const {
    return scenarios_file.empty() ? std::string("built-in") : scenarios_file;
  }
};

// The index of the loan whose id is `loan_id`; TapeError (bad_option, exit 5) naming --explain and
// the id when no accepted loan has it.
std::size_t find_loan(const LoanArrays& loans, const std::string& loan_id,
                      const std::string& option = "--explain");

void add_threads_and_delay(CLI::App& cmd, unsigned& threads, int& delay_days);

// `--curve`: a curve file, read before the tape so a bad curve stops the command at once; or a
// flat rate in percent ("4.25"), dated at the tape's cut-off.
struct CurveOption {
  std::string text;
  std::optional<YieldCurve> file;

  bool flat() const;
  void load();  // reads the file, or checks the flat rate; throws CurveError / TapeError
  std::string file_path() const;  // "" for a flat rate
  // "4.1" is read as "4.1e-2", so the rate is the double nearest 0.041 (not 4.1 / 100).
  YieldCurve curve(Date cutoff) const;
};

// The bid target: exactly one of --target-yield Y (percent), --target-spread BP, --price P (clean,
// percent of UPB).
struct TargetArgs {
  std::optional<double> target_yield, target_spread, price;

  void add_to(CLI::App& cmd);
  // Throws UsageError naming `command` when none was given.
  void require(std::string_view command) const;
  // Sets request.target and request.value (decimals for yield and spread).
  void apply(BidRequest& request) const;
};

// --settle parsed (nullopt when not given); TapeError (bad_option) when it is not a date.
std::optional<Date> parse_settle(const std::string& settle_text);
// The settlement date: `settle` or, when not given, the cut-off or the curve's date if later;
// refused (exit 5) before the cut-off, before the curve's date, or on or after the first payment
// date. `settle_text` is --settle as given ("" = not given), for messages.
Date resolve_settlement(std::optional<Date> settle, const std::string& settle_text, Date cutoff,
                        const YieldCurve& curve, int delay_days);

// Nothing to price: lists the rejected rows on standard error and gives the exit code (3, or 5
// when the tape had no row at all). `what` ends "no accepted loan to ...": "price".
int no_accepted_loans(const TapeRead& tape, std::string_view what);

}  // namespace poolbid::app
