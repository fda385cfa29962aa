// `poolbid matrix`: every pool under every scenario of a set -- defaults, loss, price at the
// target, and yield and spread at one common price -- in one table.
#include <memory>
#include <string>
#include <vector>

#include "app/pool_args.h"
#include "app/support.h"
#include "pricing/pricing.h"
#include "report/report.h"

namespace poolbid::app {

namespace {

// Read every tape, price each under each scenario, write. Rejected rows are listed in the report
// and the exit code is 3; a target no price can meet is 7.
int run_matrix(const PoolArgs& args) {
  const PoolRun run = prepare_pools(args, "matrix");
  if (run.stop) return *run.stop;
  const BidRequest request = run.request();
  MatrixOptions options;
  options.common_price = args.at_price;
  const OutcomeMatrix matrix =
      outcome_matrix(run.pools(), run.scenarios, run.curve, request, options);
  const std::vector<const TapeRead*> tapes = run.tape_pointers();
  write_stdout(
      args.json ? matrix_json(tapes, run.scenarios, run.curve, request, matrix, run.model_source)
                : matrix_text(tapes, run.scenarios, run.curve, request, matrix, run.model_source));
  return run.rows_rejected() ? kRowsRejected : kOk;
}

}  // namespace

Command add_matrix(CLI::App& app) {
  auto args = std::make_shared<PoolArgs>();
  CLI::App* cmd = app.add_subcommand(
      "matrix",
      "price every pool under every scenario of a set (the loan-level model): defaults, loss, "
      "price at the target, yield and spread at one common price");
  args->add_to(*cmd, false);
  return {cmd, [args] { return run_matrix(*args); }};
}

}  // namespace poolbid::app
