// The `poolbid` command: builds the command line from each command's file and runs the one given.
// Exit codes (stable, documented in the README): see ExitCode in app/support.h.
#include <CLI/CLI.hpp>
#include <fmt/core.h>

#include <cstdio>
#include <exception>
#include <vector>

#include "app/support.h"

namespace poolbid::app {

// Each command's file defines one of these: it adds the subcommand and its options, and returns
// what to run. A new command is one declaration here and one entry in `commands` below, in the
// order `poolbid --help` lists them.
Command add_check(CLI::App& app);      // app/tape_commands.cpp
Command add_strats(CLI::App& app);     // app/tape_commands.cpp
Command add_cashflows(CLI::App& app);  // app/cashflows_command.cpp
Command add_price(CLI::App& app);      // app/price_command.cpp
Command add_shock(CLI::App& app);      // app/shock_command.cpp
Command add_compare(CLI::App& app);    // app/compare_command.cpp
Command add_matrix(CLI::App& app);     // app/matrix_command.cpp
Command add_demo_tape(CLI::App& app);  // app/tape_commands.cpp

namespace {

int run(int argc, char** argv) {
  CLI::App app{"poolbid: check, stratify, project and price a residential mortgage loan tape.\n"
               "Results are estimates under stated assumptions, not investment advice."};
  app.require_subcommand(1);
  app.set_version_flag("--version", "poolbid 0.1.0");

  const std::vector<Command> commands = {
      add_check(app),
      add_strats(app),
      add_cashflows(app),
      add_price(app),
      add_shock(app),
      add_compare(app),
      add_matrix(app),
      add_demo_tape(app),
  };

  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    const int code = app.exit(e);
    return code == 0 ? kOk : kUsage;
  }
  for (const Command& command : commands)
    if (*command.app) return run_with_exit_codes(command.run);
  return kUsage;  // require_subcommand(1) makes this unreachable
}

}  // namespace
}  // namespace poolbid::app

int main(int argc, char** argv) {
  try {
    return poolbid::app::run(argc, argv);
  } catch (const std::exception& e) {
    fmt::print(stderr, "poolbid: internal error: {}\n", e.what());
    return poolbid::app::kInternal;
  }
}
