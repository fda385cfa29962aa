// The `poolbid` command: parses options, calls the libraries in data-flow order, writes results.
// Exit codes (stable, documented in the README): see ExitCode below.
#include <CLI/CLI.hpp>
#include <fmt/core.h>

#include <charconv>
#include <chrono>
#include <cstdio>
#include <cerrno>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <functional>
#include <fstream>
#include <iostream>
#include <optional>
#include <sstream>
#include <string>
#include <utility>
#include <vector>

#include "cashflow/cashflow.h"
#include "curves/curves.h"
#include "pricing/pricing.h"
#include "report/report.h"
#include "tape/tape.h"

namespace {

using namespace poolbid;

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

int exit_code_for(const TapeError& e) {
  switch (e.kind) {
    case ErrorKind::bad_map:
    case ErrorKind::bad_option:
      return kUnusableInput;
    default:
      return kUnusableTape;
  }
}

// An output file that could not be written.
struct WriteError : std::runtime_error {
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

std::string write_failure(const std::string& path) {
  const int error = errno;
  return error != 0 ? fmt::format("cannot write '{}': {}", path, std::strerror(error))
                    : fmt::format("cannot write '{}'", path);
}

void write_files_whole(const std::vector<OutputFile>& files) {
  std::error_code ignored;
  std::vector<std::string> staged;   // temporaries written so far ("" = written in place)
  std::vector<std::string> targets;  // where each file ends up
  auto remove_all = [&](const std::vector<std::string>& paths) {
    for (const std::string& p : paths)
      if (!p.empty()) std::filesystem::remove(p, ignored);
  };
  for (const OutputFile& file : files) {
    std::string target = file.path;
    std::error_code ec;
    if (std::filesystem::is_symlink(file.path, ec)) {
      const std::filesystem::path resolved = std::filesystem::weakly_canonical(file.path, ec);
      if (!ec) target = resolved.string();
    }
    const std::filesystem::file_status status = std::filesystem::status(target, ec);
    const bool in_place =
        std::filesystem::exists(status) && !std::filesystem::is_regular_file(status) &&
        !std::filesystem::is_directory(status);
    const std::string temp = in_place ? target : target + ".partial";
    errno = 0;
    std::ofstream out(temp, std::ios::binary | (in_place ? std::ios::out : std::ios::trunc));
    if (!out) {
      const std::string message = write_failure(file.path);
      remove_all(staged);
      throw WriteError(message);
    }
    staged.push_back(in_place ? std::string() : temp);
    targets.push_back(target);
    file.write(out);
    out.flush();
    if (!out) {
      const std::string message = write_failure(file.path);
      out.close();
      remove_all(staged);
      throw WriteError(message);
    }
  }
  std::vector<std::string> renamed;  // in place already; removed again if a later rename fails
  for (std::size_t i = 0; i < files.size(); ++i) {
    if (staged[i].empty()) continue;  // written in place
    std::error_code ec;
    std::filesystem::rename(staged[i], targets[i], ec);
    if (ec) {
      remove_all(renamed);
      remove_all(std::vector<std::string>(staged.begin() + static_cast<std::ptrdiff_t>(i),
                                          staged.end()));
      throw WriteError(fmt::format("cannot write '{}': {}", files[i].path, ec.message()));
    }
    renamed.push_back(targets[i]);
  }
}

void write_file_whole(const std::string& path, const std::function<void(std::ostream&)>& write) {
  write_files_whole({OutputFile{path, write}});
}

// Writes a whole document to standard output. Throws WriteError if it did not all get there
// (a closed pipe, a full disk behind a redirection).
void write_stdout(std::string_view document) {
  const std::size_t written = std::fwrite(document.data(), 1, document.size(), stdout);
  if (written != document.size() || std::fflush(stdout) != 0 || std::ferror(stdout))
    throw WriteError("cannot write to standard output");
}

// Options shared by every command that reads a tape.
struct TapeArgs {
  std::string tape;
  std::string map;
  std::string cutoff;
  std::optional<double> servicing_fee_percent;
  bool json = false;

  void add_to(CLI::App& cmd) {
    cmd.add_option("TAPE", tape, "loan tape (CSV with a header row)")->required();
    cmd.add_option("--map", map, "column map (JSON): the seller's header names and spellings");
    cmd.add_option("--cutoff", cutoff, "cut-off date YYYY-MM-DD (needed for date-only terms)");
    cmd.add_option("--servicing-fee", servicing_fee_percent,
                   "pool servicing fee in percent per year (0.25), where the tape has none");
    cmd.add_flag("--json", json, "write JSON instead of text");
  }

  ReadOptions read_options() const {
    ReadOptions options;
    if (!map.empty()) options.map = load_column_map(map);
    if (!cutoff.empty()) {
      options.cutoff = parse_date(cutoff);
      if (!options.cutoff)
        throw TapeError(ErrorKind::bad_option, "", 0, "--cutoff", cutoff,
                        fmt::format("--cutoff '{}': wants a date as YYYY-MM-DD or M/D/YYYY",
                                    cutoff));
    }
    if (servicing_fee_percent) {
      const double fee = *servicing_fee_percent;
      if (!(fee >= 0 && fee < 25))
        throw TapeError(ErrorKind::bad_option, "", 0, "--servicing-fee", fmt::format("{}", fee),
                        fmt::format("--servicing-fee '{}': wants a percent from 0 to below 25",
                                    fee));
      options.default_servicing_fee = fee / 100;
    }
    return options;
  }
};

// The assumption options shared by `cashflows` and `price`.
struct AssumptionArgs {
  std::string file;
  std::optional<std::string> prepay, default_rate, severity, lag, advancing;
  bool delinquent_default = false;

  void add_to(CLI::App& cmd) {
    cmd.add_option("--assumptions", file,
                   "assumptions file (JSON); the options below override it");
    cmd.add_option("--prepay", prepay,
                   "prepayment: cpr:8, psa:150, cpr:6,7,8, cpr:2..8/24 (default none)");
    cmd.add_option("--default", default_rate,
                   "default: cdr:1.5, sda:200, cdr:0.5,1,1.5, cdr:0..3/36 (default none)");
    cmd.add_option("--severity", severity,
                   "loss severity, percent of defaulted balance: 45, 45,40,35, 60..40/24 "
                   "(default 40)");
    cmd.add_option("--lag", lag, "months from default to liquidation (default 12)");
    cmd.add_option("--advancing", advancing,
                   "what the servicer advances on defaulted loans: none (default) or interest");
    cmd.add_flag("--delinquent-default", delinquent_default,
                 "loans 90+ days delinquent or in foreclosure default in month 1");
  }

  // The assumptions file, if any, then each option given over it. Throws AssumptionError.
  Assumptions assumptions() const {
    Assumptions a;
    if (!file.empty()) a = load_assumptions(file, a);
    if (prepay) a.prepay = parse_prepay(*prepay);
    if (default_rate) a.default_rate = parse_default(*default_rate);
    if (severity) a.severity = parse_severity(*severity);
    if (lag) a.lag_months = parse_lag(*lag);
    if (advancing) a.advancing = parse_advancing(*advancing);
    if (delinquent_default) a.delinquent_default = true;
    return a;
  }
};

void add_threads_and_delay(CLI::App& cmd, unsigned& threads, int& delay_days) {
  cmd.add_option("--threads", threads, "worker threads; 0 = every core (results do not change)")
      ->check(CLI::Range(0u, 4096u))
      ->capture_default_str();
  cmd.add_option("--delay", delay_days,
                 "payment delay: cash of a month is paid this many days after the first of "
                 "the next month")
      ->check(CLI::Range(0, 366))
      ->capture_default_str();
}

// Options of `poolbid cashflows` beyond the tape's.
struct CashflowArgs {
  TapeArgs tape;
  AssumptionArgs assumption;
  std::string csv;    // "" = none; "-" = standard output
  std::string loans;  // "" = none; "-" = standard output (only beside --csv FILE)
  std::string curve;  // "" = none: ARMs keep their note rate
  unsigned threads = 0;
  int delay_days = 17;  // illustrative (DESIGN.md section 5): cash paid on the 18th

  void add_to(CLI::App& cmd) {
    tape.add_to(cmd);
    cmd.get_option("--cutoff")
        ->description("cut-off date YYYY-MM-01; needed here or in the column map (payment dates)");
    assumption.add_to(cmd);
    cmd.add_option("--csv", csv, "write the monthly pool table as CSV to FILE ('-': stdout)")
        ->excludes("--json");
    cmd.add_option("--loans", loans, "write per-loan lifetime totals as CSV to FILE");
    cmd.add_option("--curve", curve,
                   "yield curve whose index forwards reset the ARMs: a curve file, or a flat "
                   "rate in percent (without it ARMs keep their note rate)");
    add_threads_and_delay(cmd, threads, delay_days);
  }
};

// Options of `poolbid price` beyond the tape's.
struct PriceArgs {
  TapeArgs tape;
  AssumptionArgs assumption;
  std::string curve;  // a curve file, or a flat rate in percent
  std::optional<double> target_yield, target_spread, price;
  std::string settle;
  std::string loans;  // "" = none
  double shock_bp = 25;
  std::string key_rates = "2,5,10,30";
  unsigned threads = 0;
  int delay_days = 17;

  void add_to(CLI::App& cmd) {
    tape.add_to(cmd);
    cmd.get_option("--cutoff")
        ->description("cut-off date YYYY-MM-01; needed here or in the column map (payment dates)");
    cmd.add_option("--curve", curve,
                   "yield curve: a curve file (JSON quotes), or one number for a flat "
                   "continuously compounded rate in percent (4.25)")
        ->required();
    assumption.add_to(cmd);
    CLI::Option* y = cmd.add_option("--target-yield", target_yield,
                                    "bid at this loss-adjusted bond-equivalent yield, percent");
    CLI::Option* z = cmd.add_option("--target-spread", target_spread,
                                    "bid at this loss-adjusted Z-spread over the curve, bp");
    CLI::Option* p = cmd.add_option("--price", price,
                                    "read every measure at this clean price, percent of UPB");
    y->check(CLI::Range(-10.0, 100.0));
    z->check(CLI::Range(-5000.0, 10000.0));
    p->check(CLI::Range(0.001, 1000.0));
    y->excludes(z)->excludes(p);
    z->excludes(p);
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
  }

  // --key-rates as years: "none" is no tenor. Throws TapeError (bad_option) on anything else.
  std::vector<double> key_rate_years() const;
};

// An option value that is unusable (exit 5).
[[noreturn]] void bad_option(const std::string& option, const std::string& value,
                             const std::string& message) {
  throw TapeError(ErrorKind::bad_option, "", 0, option, value,
                  fmt::format("{} '{}': {}", option, value, message));
}

// `--curve`: a curve file, read before the tape so a bad curve stops the command at once; or a
// flat rate in percent ("4.25"), dated at the tape's cut-off.
struct CurveOption {
  std::string text;
  std::optional<YieldCurve> file;

  bool flat() const {
    double percent = 0;
    const char* end = text.data() + text.size();
    const auto [ptr, ec] = std::from_chars(text.data(), end, percent);
    return !text.empty() && ec == std::errc() && ptr == end;
  }
  void load() {
    if (!flat()) {
      const bool number_like =
          text.find_first_of("0123456789") != std::string::npos &&
          text.find_first_not_of("+-.,% 0123456789") == std::string::npos;
      std::error_code ec;
      if (number_like && !std::filesystem::exists(text, ec))
        bad_option("--curve", text,
                   "a flat rate is a plain number of percent, such as 4.25 (no % sign); anything "
                   "else names a curve file");
      file = load_yield_curve(text);
      return;
    }
    if (text.find_first_of("eE") != std::string::npos)
      bad_option("--curve", text, "write a flat rate as a plain percent, such as 4.25");
    const double percent = std::strtod(text.c_str(), nullptr);
    if (!(percent > -5 && percent < 30))
      bad_option("--curve", text, "a flat rate wants a percent from -5 to 30");
  }
  std::string file_path() const { return flat() ? std::string() : text; }
  // "4.1" is read as "4.1e-2", so the rate is the double nearest 0.041 (not 4.1 / 100).
  YieldCurve curve(Date cutoff) const {
    return flat() ? flat_yield_curve(std::strtod((text + "e-2").c_str(), nullptr), cutoff) : *file;
  }
};

// An output path that would overwrite one of the inputs, or two outputs on one path.
struct UsageError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

// True when both paths name one file, existing or not.
bool same_file(const std::string& a, const std::string& b) {
  std::error_code ec_a, ec_b;
  if (std::filesystem::equivalent(a, b, ec_a) && !ec_a) return true;
  const std::filesystem::path canonical_a = std::filesystem::weakly_canonical(a, ec_a);
  const std::filesystem::path canonical_b = std::filesystem::weakly_canonical(b, ec_b);
  return !ec_a && !ec_b && canonical_a == canonical_b;
}

void check_outputs(const CashflowArgs& args) {
  if (args.loans == "-" && (args.csv.empty() || args.csv == "-"))
    throw UsageError("--loans -: standard output already carries the report; give --loans a "
                     "file, or --csv a file");
  const std::vector<std::pair<std::string, std::string>> inputs = {
      {"the tape", args.tape.tape},
      {"the column map", args.tape.map},
      {"the assumptions file", args.assumption.file},
      {"the curve file", CurveOption{args.curve, std::nullopt}.file_path()}};
  for (const auto& [option, path] : {std::pair{"--csv", args.csv}, {"--loans", args.loans}}) {
    if (path.empty() || path == "-") continue;
    for (const auto& [what, input] : inputs)
      if (!input.empty() && same_file(path, input))
        throw UsageError(fmt::format("{} '{}' would overwrite {}", option, path, what));
  }
  if (!args.csv.empty() && args.csv != "-" && !args.loans.empty() && args.loans != "-" &&
      same_file(args.csv, args.loans))
    throw UsageError(fmt::format("--csv and --loans name one file '{}'", args.csv));
}

// The tape's cut-off date; commands that date their cash need one.
Date require_cutoff(const TapeRead& tape, std::string_view what) {
  if (!tape.cutoff)
    throw TapeError(ErrorKind::bad_option, tape.file, 0, "--cutoff", "",
                    fmt::format("{}: no cut-off date; {} need one for their payment dates: give "
                                "--cutoff YYYY-MM-01 or the column map's cutoff_date",
                                tape.file, what));
  return *tape.cutoff;
}

// `poolbid cashflows`: read, project, write. Rejected rows are listed on stderr when stdout carries
// a CSV table, in the report otherwise; either way the exit code is 3.
int run_cashflows(const CashflowArgs& args) {
  check_outputs(args);
  const ReadOptions read_options = args.tape.read_options();
  const Assumptions assumptions = args.assumption.assumptions();
  CurveOption curve_option{args.curve, std::nullopt};
  if (!args.curve.empty()) curve_option.load();
  const TapeRead tape = read_tape(args.tape.tape, read_options);
  const Date cutoff = require_cutoff(tape, "cash flows");

  ProjectionOptions options;
  options.threads = args.threads;
  options.loan_totals = !args.loans.empty();
  std::optional<CouponPaths> coupons;
  std::optional<YieldCurve> arm_curve;
  if (!args.curve.empty()) {
    arm_curve = curve_option.curve(cutoff);
    coupons = arm_coupon_paths(tape.loans, *arm_curve, cutoff,
                               projection_horizon(tape.loans, assumptions));
    options.coupons = &*coupons;
  }
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
    document = cashflow_json(tape, assumptions, projection.pool, args.delay_days, arm_curve_used);
  } else {
    document = cashflow_text(tape, assumptions, projection.pool, args.delay_days, arm_curve_used);
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

std::string iso_text(Date d) {
  return fmt::format("{:04d}-{:02d}-{:02d}", static_cast<int>(d.year()),
                     static_cast<unsigned>(d.month()), static_cast<unsigned>(d.day()));
}

// `poolbid price`: read, project, value, solve, write. Rejected rows are listed in the report and
// the exit code is 3; a target no price can meet is 7.
int run_price(const PriceArgs& args) {
  if (!args.target_yield && !args.target_spread && !args.price)
    throw UsageError("price: say what to bid for: --target-yield Y (percent), --target-spread BP "
                     "or --price P (clean, percent of UPB)");
  if (args.loans == "-")
    throw UsageError("--loans -: standard output already carries the report; give --loans a file");
  CurveOption curve_option{args.curve, std::nullopt};
  if (!args.loans.empty()) {
    const std::vector<std::pair<std::string, std::string>> inputs = {
        {"the tape", args.tape.tape},
        {"the column map", args.tape.map},
        {"the assumptions file", args.assumption.file},
        {"the curve file", curve_option.file_path()}};
    for (const auto& [what, input] : inputs)
      if (!input.empty() && same_file(args.loans, input))
        throw UsageError(fmt::format("--loans '{}' would overwrite {}", args.loans, what));
  }
  const ReadOptions read_options = args.tape.read_options();
  const std::vector<double> key_rate_years = args.key_rate_years();
  const Assumptions assumptions = args.assumption.assumptions();
  std::optional<Date> settle;
  if (!args.settle.empty()) {
    settle = parse_date(args.settle);
    if (!settle) bad_option("--settle", args.settle, "wants a date as YYYY-MM-DD or M/D/YYYY");
  }
  curve_option.load();

  const TapeRead tape = read_tape(args.tape.tape, read_options);
  if (tape.loans.size() == 0) {
    // Nothing to price, but every rejected row is still listed.
    fmt::print(stderr, "poolbid: {}: no accepted loan to price; nothing written\n{}", tape.file,
               rejected_rows_text(tape));
    return tape.rows_rejected > 0 ? kRowsRejected : kUnusableInput;
  }
  const Date cutoff = require_cutoff(tape, "prices");
  const YieldCurve curve = curve_option.curve(cutoff);
  using std::chrono::sys_days;
  if (!settle) settle = sys_days{curve.as_of} > sys_days{cutoff} ? curve.as_of : cutoff;
  if (sys_days{*settle} < sys_days{cutoff})
    bad_option("--settle", args.settle,
               fmt::format("settlement before the cut-off date {}", iso_text(cutoff)));
  if (sys_days{*settle} < sys_days{curve.as_of})
    bad_option("--settle", args.settle,
               fmt::format("settlement before the curve's date {} ({})", iso_text(curve.as_of),
                           curve.source));

  const Date first_payment = payment_date(cutoff, 1, args.delay_days);
  if (!(sys_days{*settle} < sys_days{first_payment})) {
    if (args.settle.empty())
      throw CurveError(curve.source, "as_of", iso_text(curve.as_of),
                       fmt::format("{}: the curve's date {} (the settlement date when --settle is "
                                   "not given) is on or after the first payment date {}; use a "
                                   "curve dated before it",
                                   curve.source, iso_text(curve.as_of), iso_text(first_payment)));
    bad_option("--settle", args.settle,
               fmt::format("settlement on or after the first payment date {}: move the cut-off "
                           "date",
                           iso_text(first_payment)));
  }

  BidRequest request;
  if (args.target_yield) {
    request.target = BidTarget::yield;
    request.value = *args.target_yield / 100;
  } else if (args.target_spread) {
    request.target = BidTarget::spread;
    request.value = *args.target_spread / 1e4;
  } else {
    request.target = BidTarget::price;
    request.value = *args.price;
  }
  request.settlement = Settlement{cutoff, *settle, args.delay_days};
  request.assumptions = assumptions;
  request.shock_bp = args.shock_bp;
  request.key_rate_years = key_rate_years;
  request.threads = args.threads;
  request.loan_values = !args.loans.empty();
  const BidResult result = price_pool(tape.loans, curve, request);

  const std::string document = args.tape.json ? price_json(tape, curve, request, result)
                                               : price_text(tape, curve, request, result);
  if (!args.loans.empty())
    write_file_whole(args.loans, [&](std::ostream& out) {
      write_loan_values_csv(out, tape.loans, result);
    });
  write_stdout(document);
  return tape.rows_rejected > 0 ? kRowsRejected : kOk;
}

int finish_tape_command(const TapeRead& tape, const std::string& document) {
  write_stdout(document);
  return tape.rows_rejected > 0 ? kRowsRejected : kOk;
}

int run(int argc, char** argv) {
  CLI::App app{"poolbid: check, stratify, project and price a residential mortgage loan tape.\n"
               "Results are estimates under stated assumptions, not investment advice."};
  app.require_subcommand(1);
  app.set_version_flag("--version", "poolbid 0.1.0");

  TapeArgs check_args;
  CLI::App* check = app.add_subcommand("check", "validate a tape: every row accepted or rejected");
  check_args.add_to(*check);

  TapeArgs strats_args;
  CLI::App* strats = app.add_subcommand("strats", "stratify the accepted loans of a tape");
  strats_args.add_to(*strats);

  CashflowArgs cashflow_args;
  CLI::App* cashflows = app.add_subcommand(
      "cashflows", "project the accepted loans' monthly cash flows under stated assumptions");
  cashflow_args.add_to(*cashflows);

  PriceArgs price_args;
  CLI::App* price = app.add_subcommand(
      "price", "value the accepted loans on a yield curve and solve the bid for a target "
               "(exactly one of --target-yield, --target-spread, --price)");
  price_args.add_to(*price);

  DemoTapeOptions demo;
  std::string demo_out;
  std::string demo_profile = "strict";
  std::string demo_layout = "canonical";
  CLI::App* demo_cmd = app.add_subcommand("demo-tape", "write an invented, seeded demo tape");
  demo_cmd->add_option("--loans", demo.loans, "number of loans")->check(CLI::Range(1, 50000000));
  demo_cmd->add_option("--profile", demo_profile, "underwriting: strict or loose")
      ->check(CLI::IsMember({"strict", "loose"}));
  demo_cmd->add_option("--seed", demo.seed, "random seed; one seed = one coupon and term mix");
  demo_cmd->add_option("--layout", demo_layout,
                       "canonical (our headers) or seller-coded (needs a column map)")
      ->check(CLI::IsMember({"canonical", "seller-coded"}));
  demo_cmd->add_option("--bad-rows", demo.bad_rows, "rows made invalid on purpose");
  demo_cmd->add_option("--out", demo_out, "output CSV (default: standard output)");

  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    const int code = app.exit(e);
    return code == 0 ? kOk : kUsage;
  }

  try {
    if (*check) {
      const TapeRead tape = read_tape(check_args.tape, check_args.read_options());
      return finish_tape_command(tape, check_args.json ? check_json(tape) : check_text(tape));
    }
    if (*strats) {
      const TapeRead tape = read_tape(strats_args.tape, strats_args.read_options());
      const Strats s = stratify(tape.loans);
      return finish_tape_command(
          tape, strats_args.json ? strats_json(tape, s) : strats_text(tape, s));
    }
    if (*cashflows) return run_cashflows(cashflow_args);
    if (*price) return run_price(price_args);
    if (*demo_cmd) {
      demo.profile = demo_profile == "loose" ? DemoProfile::loose : DemoProfile::strict;
      demo.layout = demo_layout == "seller-coded" ? DemoLayout::seller_coded
                                                  : DemoLayout::canonical;
      if (demo_out.empty()) {
        std::ostringstream text;  // whole, so a failed write is all or nothing on our side
        write_demo_tape(text, demo);
        write_stdout(text.str());
      } else {
        write_file_whole(demo_out, [&](std::ostream& out) { write_demo_tape(out, demo); });
      }
      return kOk;
    }
  } catch (const TapeError& e) {
    fmt::print(stderr, "poolbid: {}\n", e.what());
    return exit_code_for(e);
  } catch (const AssumptionError& e) {
    fmt::print(stderr, "poolbid: {}\n", e.what());
    return kUnusableInput;
  } catch (const CurveError& e) {
    fmt::print(stderr, "poolbid: {}\n", e.what());
    return kUnusableInput;
  } catch (const PricingError& e) {
    fmt::print(stderr, "poolbid: {}\n", e.what());
    return kNoSolution;
  } catch (const UsageError& e) {
    fmt::print(stderr, "poolbid: {}\n", e.what());
    return kUsage;
  } catch (const WriteError& e) {
    fmt::print(stderr, "poolbid: {}\n", e.what());
    return kCannotWrite;
  }
  return kUsage;  // require_subcommand(1) makes this unreachable
}

}  // namespace

int main(int argc, char** argv) {
  try {
    return run(argc, argv);
  } catch (const std::exception& e) {
    fmt::print(stderr, "poolbid: internal error: {}\n", e.what());
    return kInternal;
  }
}
