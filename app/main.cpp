// The `poolbid` command: parses options, calls the libraries in data-flow order, writes results.
// Exit codes (stable, documented in the README): see ExitCode below.
#include <CLI/CLI.hpp>
#include <fmt/core.h>

#include <cstdio>
#include <filesystem>
#include <functional>
#include <fstream>
#include <iostream>
#include <optional>
#include <sstream>
#include <string>

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

// Writes a file through a temporary `PATH.partial` renamed into place, so a failure leaves no
// partial file. `write` fills the stream. Throws WriteError naming the file.
void write_file_whole(const std::string& path, const std::function<void(std::ostream&)>& write) {
  const std::string temp = path + ".partial";
  std::error_code ignored;
  {
    std::ofstream out(temp, std::ios::binary | std::ios::trunc);
    if (!out) throw WriteError(fmt::format("cannot write '{}'", path));
    write(out);
    out.flush();
    if (!out) {
      out.close();
      std::filesystem::remove(temp, ignored);
      throw WriteError(fmt::format("cannot write '{}' (disk full?)", path));
    }
  }
  std::error_code ec;
  std::filesystem::rename(temp, path, ec);
  if (ec) {
    std::filesystem::remove(temp, ignored);
    throw WriteError(fmt::format("cannot write '{}': {}", path, ec.message()));
  }
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

int finish_tape_command(const TapeRead& tape, const std::string& document) {
  write_stdout(document);
  return tape.rows_rejected > 0 ? kRowsRejected : kOk;
}

int run(int argc, char** argv) {
  CLI::App app{"poolbid: check and stratify a residential mortgage loan tape.\n"
               "Results are estimates under stated assumptions, not investment advice."};
  app.require_subcommand(1);
  app.set_version_flag("--version", "poolbid 0.1.0");

  TapeArgs check_args;
  CLI::App* check = app.add_subcommand("check", "validate a tape: every row accepted or rejected");
  check_args.add_to(*check);

  TapeArgs strats_args;
  CLI::App* strats = app.add_subcommand("strats", "stratify the accepted loans of a tape");
  strats_args.add_to(*strats);

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
