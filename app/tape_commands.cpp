// `poolbid check`, `strats` and `demo-tape`: the commands that read or write a tape and nothing more.
#include <memory>
#include <sstream>
#include <string>

#include "app/support.h"
#include "report/report.h"
#include "tape/tape.h"

namespace poolbid::app {

Command add_check(CLI::App& app) {
  auto args = std::make_shared<TapeArgs>();
  CLI::App* cmd = app.add_subcommand("check", "validate a tape: every row accepted or rejected");
  args->add_to(*cmd);
  return {cmd, [args] {
            const TapeRead tape = read_tape(args->tape, args->read_options());
            return finish_tape_command(tape, args->json ? check_json(tape) : check_text(tape));
          }};
}

Command add_strats(CLI::App& app) {
  auto args = std::make_shared<TapeArgs>();
  CLI::App* cmd = app.add_subcommand("strats", "stratify the accepted loans of a tape");
  args->add_to(*cmd);
  return {cmd, [args] {
            const TapeRead tape = read_tape(args->tape, args->read_options());
            const Strats s = stratify(tape.loans);
            return finish_tape_command(tape,
                                       args->json ? strats_json(tape, s) : strats_text(tape, s));
          }};
}

namespace {

struct DemoTapeArgs {
  DemoTapeOptions demo;
  std::string out;
  std::string profile = "strict";
  std::string layout = "canonical";
};

int run_demo_tape(DemoTapeArgs& args) {
  DemoTapeOptions& demo = args.demo;
  demo.profile = args.profile == "loose" ? DemoProfile::loose : DemoProfile::strict;
  demo.layout = args.layout == "seller-coded" ? DemoLayout::seller_coded : DemoLayout::canonical;
  if (args.out.empty()) {
    std::ostringstream text;  // whole, so a failed write is all or nothing on our side
    write_demo_tape(text, demo);
    write_stdout(text.str());
  } else {
    write_file_whole(args.out, [&](std::ostream& out) { write_demo_tape(out, demo); });
  }
  return kOk;
}

}  // namespace

Command add_demo_tape(CLI::App& app) {
  auto args = std::make_shared<DemoTapeArgs>();
  CLI::App* cmd = app.add_subcommand("demo-tape", "write an invented, seeded demo tape");
  cmd->add_option("--loans", args->demo.loans, "number of loans")->check(CLI::Range(1, 50000000));
  cmd->add_option("--profile", args->profile, "underwriting: strict or loose")
      ->check(CLI::IsMember({"strict", "loose"}));
  cmd->add_option("--seed", args->demo.seed, "random seed; one seed = one coupon and term mix");
  cmd->add_option("--layout", args->layout,
                  "canonical (our headers) or seller-coded (needs a column map)")
      ->check(CLI::IsMember({"canonical", "seller-coded"}));
  cmd->add_option("--bad-rows", args->demo.bad_rows, "rows made invalid on purpose");
  cmd->add_option("--out", args->out, "output CSV (default: standard output)");
  return {cmd, [args] { return run_demo_tape(*args); }};
}

}  // namespace poolbid::app
