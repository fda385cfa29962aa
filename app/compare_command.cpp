// `poolbid compare`: several sellers' pools priced at one target under the loan-level model, read
// at one common price, and each later pool's price gap to the first attributed to underwriting.
#include <memory>
#include <string>
#include <vector>

#include "app/pool_args.h"
#include "app/support.h"
#include "pricing/pricing.h"
#include "report/report.h"

namespace poolbid::app {

namespace {

struct CompareArgs {
  PoolArgs pools;
  bool no_attribution = false;

  void add_to(CLI::App& cmd) {
    pools.add_to(cmd, true);
    cmd.add_flag("--no-attribution", no_attribution,
                 "leave out the attribution of the price gaps (it prices each pool 9 more times)");
  }
};

// Read every tape, price, compare, write. Rejected rows are listed in the report and the exit
// code is 3; a target no price can meet is 7.
int run_compare(const CompareArgs& args) {
  const PoolRun run = prepare_pools(args.pools, "compare");
  if (run.stop) return *run.stop;
  const BidRequest request = run.request();
  CompareOptions options;
  options.common_price = args.pools.at_price;
  options.attribution = !args.no_attribution;
  const Comparison comparison = compare_pools(run.pools(), run.curve, request, options);
  const std::vector<const TapeRead*> tapes = run.tape_pointers();
  write_stdout(args.pools.json
                   ? compare_json(tapes, run.curve, request, comparison, run.model_source)
                   : compare_text(tapes, run.curve, request, comparison, run.model_source));
  return run.rows_rejected() ? kRowsRejected : kOk;
}

}  // namespace

Command add_compare(CLI::App& app) {
  auto args = std::make_shared<CompareArgs>();
  CLI::App* cmd = app.add_subcommand(
      "compare",
      "price several sellers' pools at one target under the loan-level model, side by side, and "
      "attribute each price gap to the first pool to underwriting factors");
  args->add_to(*cmd);
  return {cmd, [args] { return run_compare(*args); }};
}

}  // namespace poolbid::app
