// What the `poolbid` commands share: exit codes, whole-file output, the common options.
#include "app/support.h"

#include <fmt/core.h>

#include <algorithm>
#include <cerrno>
#include <charconv>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <ostream>

#include "report/report.h"

namespace poolbid::app {

int exit_code_for(const TapeError& e) {
  switch (e.kind) {
    case ErrorKind::bad_map:
    case ErrorKind::bad_option:
      return kUnusableInput;
    default:
      return kUnusableTape;
  }
}

int run_with_exit_codes(const std::function<int()>& run) {
  try {
    return run();
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
}

namespace {

std::string write_failure(const std::string& path) {
  const int error = errno;
  return error != 0 ? fmt::format("cannot write '{}': {}", path, std::strerror(error))
                    : fmt::format("cannot write '{}'", path);
}

}  // namespace

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

void write_stdout(std::string_view document) {
  const std::size_t written = std::fwrite(document.data(), 1, document.size(), stdout);
  if (written != document.size() || std::fflush(stdout) != 0 || std::ferror(stdout))
    throw WriteError("cannot write to standard output");
}

void bad_option(const std::string& option, const std::string& value, const std::string& message) {
  throw TapeError(ErrorKind::bad_option, "", 0, option, value,
                  fmt::format("{} '{}': {}", option, value, message));
}

bool same_file(const std::string& a, const std::string& b) {
  std::error_code ec_a, ec_b;
  if (std::filesystem::equivalent(a, b, ec_a) && !ec_a) return true;
  const std::filesystem::path canonical_a = std::filesystem::weakly_canonical(a, ec_a);
  const std::filesystem::path canonical_b = std::filesystem::weakly_canonical(b, ec_b);
  return !ec_a && !ec_b && canonical_a == canonical_b;
}

void refuse_overwriting_inputs(const std::string& option, const std::string& path,
                               const std::vector<std::pair<std::string, std::string>>& inputs) {
  if (path.empty() || path == "-") return;
  for (const auto& [what, input] : inputs)
    if (!input.empty() && same_file(path, input))
      throw UsageError(fmt::format("{} '{}' would overwrite {}", option, path, what));
}

std::string iso_text(Date d) {
  return fmt::format("{:04d}-{:02d}-{:02d}", static_cast<int>(d.year()),
                     static_cast<unsigned>(d.month()), static_cast<unsigned>(d.day()));
}

// ---- TapeArgs -----------------------------------------------------------------------------------

void TapeArgs::add_to(CLI::App& cmd) {
  cmd.add_option("TAPE", tape, "loan tape (CSV with a header row)")->required();
  cmd.add_option("--map", map, "column map (JSON): the seller's header names and spellings");
  cmd.add_option("--cutoff", cutoff, "cut-off date YYYY-MM-DD (needed for date-only terms)");
  cmd.add_option("--servicing-fee", servicing_fee_percent,
                 "pool servicing fee in percent per year (0.25), where the tape has none");
  cmd.add_flag("--json", json, "write JSON instead of text");
}

void TapeArgs::add_dated_to(CLI::App& cmd) {
  add_to(cmd);
  cmd.get_option("--cutoff")
      ->description("cut-off date YYYY-MM-01; needed here or in the column map (payment dates)");
}

ReadOptions TapeArgs::read_options() const {
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

Date require_cutoff(const TapeRead& tape, std::string_view what) {
  if (!tape.cutoff)
    throw TapeError(ErrorKind::bad_option, tape.file, 0, "--cutoff", "",
                    fmt::format("{}: no cut-off date; {} need one for their payment dates: give "
                                "--cutoff YYYY-MM-01 or the column map's cutoff_date",
                                tape.file, what));
  return *tape.cutoff;
}

int finish_tape_command(const TapeRead& tape, const std::string& document) {
  write_stdout(document);
  return tape.rows_rejected > 0 ? kRowsRejected : kOk;
}

// ---- AssumptionArgs -----------------------------------------------------------------------------

void AssumptionArgs::add_to(CLI::App& cmd) {
  cmd.add_option("--assumptions", file, "assumptions file (JSON); the options below override it");
  cmd.add_option("--prepay", prepay,
                 "prepayment: cpr:8, psa:150, cpr:6,7,8, cpr:2..8/24 (default none)");
  cmd.add_option("--default", default_rate,
                 "default: cdr:1.5, sda:200, cdr:0.5,1,1.5, cdr:0..3/36 (default none)");
  cmd.add_option("--severity", severity,
                 "loss severity, percent of defaulted balance: 45, 45,40,35, 60..40/24 "
                 "(default 40)");
  cmd.add_option("--lag", lag, "months from default to liquidation (default 12)");
  cmd.add_option("--advancing", advancing,
                 "what the servicer advances on defaulted loans: none or interest (default none; "
                 "interest with the loan-level model)");
  cmd.add_flag("--delinquent-default", delinquent_default,
               "loans 90+ days delinquent or in foreclosure default in month 1");
}

Assumptions AssumptionArgs::assumptions(bool model) const {
  Assumptions a;
  // With the loan-level model the servicer advances interest unless told otherwise: repaid from
  // the sale, so the loss and severity count the interest lost while a loan waits (DESIGN.md
  // section 7).
  if (model) a.advancing = Advancing::interest;
  if (!file.empty()) a = load_assumptions(file, a);
  if (prepay) a.prepay = parse_prepay(*prepay);
  if (default_rate) a.default_rate = parse_default(*default_rate);
  if (severity) a.severity = parse_severity(*severity);
  if (lag) a.lag_months = parse_lag(*lag);
  if (advancing) a.advancing = parse_advancing(*advancing);
  if (delinquent_default) a.delinquent_default = true;
  return a;
}

std::vector<std::string> AssumptionArgs::curve_options_given() const {
  std::vector<std::string> given;
  if (prepay) given.push_back("--prepay");
  if (default_rate) given.push_back("--default");
  if (severity) given.push_back("--severity");
  if (lag) given.push_back("--lag");
  if (delinquent_default) given.push_back("--delinquent-default");
  return given;
}

// ---- ModelArgs ----------------------------------------------------------------------------------

void ModelArgs::add_to(CLI::App& cmd) {
  cmd.add_flag("--model", model,
               "use the loan-level credit and prepayment model (built-in illustrative tables) "
               "instead of pool-wide prepayment, default and severity curves");
  cmd.add_option("--model-file", model_file,
                 "model file (JSON): overrides of the model's tables; implies --model");
  cmd.add_option("--scenario", scenario,
                 "scenario the model runs under: house prices, rate shock, multipliers "
                 "(default base); implies --model");
  cmd.add_option("--scenarios", scenarios_file,
                 "scenario set (JSON) to pick --scenario from (default: the built-in set); "
                 "implies --model");
  cmd.add_option("--explain", explain,
                 "add why the model treats this loan (its loan id) as it does; implies --model");
}

bool ModelArgs::used() const {
  return model || !model_file.empty() || scenario || !scenarios_file.empty() || explain;
}

std::string ModelArgs::option_given() const {
  if (model) return "--model";
  if (!model_file.empty()) return "--model-file";
  if (scenario) return "--scenario";
  if (!scenarios_file.empty()) return "--scenarios";
  if (explain) return "--explain";
  return "";
}

void ModelArgs::refuse_with(const AssumptionArgs& assumption) const {
  if (!used()) return;
  const std::vector<std::string> given = assumption.curve_options_given();
  if (given.empty()) return;
  std::string list = given.front();
  for (std::size_t k = 1; k < given.size(); ++k)
    list += (k + 1 == given.size() ? " and " : ", ") + given[k];
  throw UsageError(fmt::format(
      "{} cannot be used with {}: the loan-level model sets each loan's prepayment, default, "
      "severity and liquidation lag (with it only --advancing is read); leave out {} or {}",
      list, option_given(), given.size() == 1 ? given.front() : "those options", option_given()));
}

CreditModel ModelArgs::credit_model() const {
  return model_file.empty() ? default_credit_model() : load_credit_model(model_file);
}

std::vector<Scenario> ModelArgs::scenario_set() const {
  return scenarios_file.empty() ? default_scenarios() : load_scenarios(scenarios_file);
}

Scenario ModelArgs::chosen_scenario() const {
  const std::vector<Scenario> set = scenario_set();
  // Not named: "base", or the set's first scenario when it has none (as `matrix` reads its
  // common price).
  if (!scenario && !set.empty() &&
      std::none_of(set.begin(), set.end(), [](const Scenario& s) { return s.name == "base"; }))
    return set.front();
  return find_scenario(set, scenario_name(), "--scenario");
}

std::size_t find_loan(const LoanArrays& loans, const std::string& loan_id,
                      const std::string& option) {
  for (std::size_t i = 0; i < loans.size(); ++i)
    if (loans.loan_id[i] == loan_id) return i;
  bad_option(option, loan_id, "no accepted loan on the tape has this loan id");
}

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

// ---- CurveOption --------------------------------------------------------------------------------

bool CurveOption::flat() const {
  double percent = 0;
  const char* end = text.data() + text.size();
  const auto [ptr, ec] = std::from_chars(text.data(), end, percent);
  return !text.empty() && ec == std::errc() && ptr == end;
}

void CurveOption::load() {
  if (!flat()) {
    const bool number_like = text.find_first_of("0123456789") != std::string::npos &&
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

std::string CurveOption::file_path() const { return flat() ? std::string() : text; }

YieldCurve CurveOption::curve(Date cutoff) const {
  return flat() ? flat_yield_curve(std::strtod((text + "e-2").c_str(), nullptr), cutoff) : *file;
}

// ---- TargetArgs ---------------------------------------------------------------------------------

void TargetArgs::add_to(CLI::App& cmd) {
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
}

void TargetArgs::require(std::string_view command) const {
  if (!target_yield && !target_spread && !price)
    throw UsageError(fmt::format("{}: say what to bid for: --target-yield Y (percent), "
                                 "--target-spread BP or --price P (clean, percent of UPB)",
                                 command));
}

void TargetArgs::apply(BidRequest& request) const {
  if (target_yield) {
    request.target = BidTarget::yield;
    request.value = *target_yield / 100;
  } else if (target_spread) {
    request.target = BidTarget::spread;
    request.value = *target_spread / 1e4;
  } else {
    request.target = BidTarget::price;
    request.value = *price;
  }
}

// ---- Settlement ---------------------------------------------------------------------------------

std::optional<Date> parse_settle(const std::string& settle_text) {
  if (settle_text.empty()) return std::nullopt;
  std::optional<Date> settle = parse_date(settle_text);
  if (!settle) bad_option("--settle", settle_text, "wants a date as YYYY-MM-DD or M/D/YYYY");
  return settle;
}

Date resolve_settlement(std::optional<Date> settle, const std::string& settle_text, Date cutoff,
                        const YieldCurve& curve, int delay_days) {
  using std::chrono::sys_days;
  if (!settle) settle = sys_days{curve.as_of} > sys_days{cutoff} ? curve.as_of : cutoff;
  if (sys_days{*settle} < sys_days{cutoff})
    bad_option("--settle", settle_text,
               fmt::format("settlement before the cut-off date {}", iso_text(cutoff)));
  if (sys_days{*settle} < sys_days{curve.as_of})
    bad_option("--settle", settle_text,
               fmt::format("settlement before the curve's date {} ({})", iso_text(curve.as_of),
                           curve.source));

  const Date first_payment = payment_date(cutoff, 1, delay_days);
  if (!(sys_days{*settle} < sys_days{first_payment})) {
    if (settle_text.empty())
      throw CurveError(curve.source, "as_of", iso_text(curve.as_of),
                       fmt::format("{}: the curve's date {} (the settlement date when --settle is "
                                   "not given) is on or after the first payment date {}; use a "
                                   "curve dated before it",
                                   curve.source, iso_text(curve.as_of), iso_text(first_payment)));
    bad_option("--settle", settle_text,
               fmt::format("settlement on or after the first payment date {}: move the cut-off "
                           "date",
                           iso_text(first_payment)));
  }
  return *settle;
}

int no_accepted_loans(const TapeRead& tape, std::string_view what) {
  fmt::print(stderr, "poolbid: {}: no accepted loan to {}; nothing written\n{}", tape.file, what,
             rejected_rows_text(tape));
  return tape.rows_rejected > 0 ? kRowsRejected : kUnusableInput;
}

}  // namespace poolbid::app
