// `poolbid shock` run as a user runs it on the demo pools: the JSON's keys in order, a shock equal
// to the base changing nothing, a downturn losing money, the per-loan CSV adding up, unknown
// scenario names listed, and the options it needs.
#include <gtest/gtest.h>

#include <cmath>
#include <cstddef>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "tests/support/command_constants.h"
#include "tests/support/csv_text.h"
#include "tests/support/run_poolbid.h"

namespace {

using namespace poolbid::testing_support;
using Ordered = nlohmann::ordered_json;
using Args = std::vector<std::string>;
using Keys = std::vector<std::string>;

const std::string kCurve = "demo-pools/curve-2026-12-01.json";
const Args kStrictTape = {kStrict, "--cutoff", "2026-12-01"};
const Args kLooseTape = {kLoose, "--map", kLooseMap};
// The per-loan CSV's columns: a public interface (README).
const std::string kLoansHeader =
    "loan_id,row,seller,cutoff_balance,value_before,value_after,pnl,price_before,price_after,"
    "expected_loss_before,expected_loss_after";

Args join(std::initializer_list<Args> parts) {
  Args all;
  for (const Args& part : parts) all.insert(all.end(), part.begin(), part.end());
  return all;
}

Keys keys_of(const Ordered& object) {
  Keys keys;
  for (auto it = object.begin(); it != object.end(); ++it) keys.push_back(it.key());
  return keys;
}

// The cells of a CSV line with no quoted cell (the demo tapes' ids and seller names hold no comma).
std::vector<std::string> split(const std::string& line) {
  std::vector<std::string> cells(1);
  for (char ch : line) {
    if (ch == ',')
      cells.emplace_back();
    else
      cells.back() += ch;
  }
  return cells;
}

bool contains(const std::string& text, const std::string& part) {
  return text.find(part) != std::string::npos;
}

class ShockCli : public CommandTest {
 protected:
  Outcome shock(const Args& tape, const Args& extra) const {
    return poolbid(join({{"shock"}, tape, {"--curve", kCurve, "--held-price", "99"}, extra}));
  }
};

TEST_F(ShockCli, JsonKeysInOrder) {
  const Outcome r = shock(kStrictTape, {"--scenario", "mild_downturn", "--json"});
  ASSERT_EQ(r.exit_code, kOk) << r;
  const Ordered doc = Ordered::parse(r.out);
  EXPECT_EQ(keys_of(doc),
            (Keys{"file", "cutoff_date", "settlement_date", "payment_delay_days", "curve", "model",
                  "advancing", "held_price", "base_scenario", "shocked_scenario", "before",
                  "after", "pnl", "expected_loss_change", "loans_priced", "rejected",
                  "caution"}));
  const Keys view = {"scenario", "clean_price", "dirty_price", "clean_value", "dirty_value",
                     "accrued", "z_spread", "cash_flow_yield", "bey", "wal_years",
                     "modified_duration", "effective_duration", "effective_convexity", "dv01",
                     "cum_default_pct", "severity_pct", "expected_loss", "expected_loss_pct",
                     "curve_parallel_shift_bp"};
  EXPECT_EQ(keys_of(doc.at("before")), view);
  EXPECT_EQ(keys_of(doc.at("after")), view);
  EXPECT_EQ(keys_of(doc.at("pnl")), (Keys{"dollars", "points"}));
  EXPECT_EQ(keys_of(doc.at("expected_loss_change")), (Keys{"dollars", "pct_of_upb"}));
  EXPECT_EQ(doc.at("model").at("tables"), "built-in");
  EXPECT_EQ(doc.at("base_scenario").at("name"), "base");
  EXPECT_EQ(doc.at("shocked_scenario").at("name"), "mild_downturn");
  EXPECT_EQ(doc.at("before").at("scenario"), "base");
  EXPECT_EQ(doc.at("after").at("scenario"), "mild_downturn");
  EXPECT_NEAR(doc.at("before").at("clean_price").get<double>(), 99, 1e-9);
  // identity: the shocked view keeps the held view's Z-spread.
  EXPECT_NEAR(doc.at("after").at("z_spread").get<double>(),
              doc.at("before").at("z_spread").get<double>(), 1e-12);
  // identity: P&L = value after - value before, in dollars and points.
  const double pnl = doc.at("pnl").at("dollars").get<double>();
  EXPECT_NEAR(pnl, doc.at("after").at("clean_value").get<double>() -
                       doc.at("before").at("clean_value").get<double>(),
              1e-6);
  EXPECT_NEAR(doc.at("pnl").at("points").get<double>(),
              100 * pnl / doc.at("loans_priced").at("cutoff_balance").get<double>(), 1e-9);
  EXPECT_NE(doc.at("caution").get<std::string>().find("not investment advice"),
            std::string::npos);
}

TEST_F(ShockCli, TheBaseAgainstItselfIsNoPnl) {
  const Outcome r = shock(kLooseTape, {"--scenario", "base", "--json"});
  ASSERT_EQ(r.exit_code, kOk) << r;
  const Ordered doc = Ordered::parse(r.out);
  EXPECT_NEAR(doc.at("pnl").at("points").get<double>(), 0, 1e-9);  // identity
  EXPECT_EQ(doc.at("expected_loss_change").at("dollars").get<double>(), 0);
}

TEST_F(ShockCli, ASevereDownturnLosesMoneyOnBothDemoPools) {
  for (const Args& tape : {kStrictTape, kLooseTape}) {
    const Outcome r = shock(tape, {"--scenario", "severe_downturn", "--json"});
    ASSERT_EQ(r.exit_code, kOk) << r;
    const Ordered doc = Ordered::parse(r.out);
    EXPECT_LT(doc.at("pnl").at("dollars").get<double>(), 0) << tape[0];
    EXPECT_GT(doc.at("expected_loss_change").at("dollars").get<double>(), 0) << tape[0];
    EXPECT_GT(doc.at("after").at("cum_default_pct").get<double>(),
              doc.at("before").at("cum_default_pct").get<double>());
    EXPECT_DOUBLE_EQ(doc.at("after").at("curve_parallel_shift_bp").get<double>(),
                     doc.at("shocked_scenario").at("rate_shock").at("parallel_bp").get<double>());
  }
}

TEST_F(ShockCli, TextReportShowsBeforeAfterAndPnlThenTheCaution) {
  const Outcome r = shock(kStrictTape, {"--scenario", "severe_downturn"});
  ASSERT_EQ(r.exit_code, kOk) << r;
  EXPECT_TRUE(contains(r.out, "poolbid shock: " + kStrict)) << r;
  EXPECT_TRUE(contains(r.out, "Model: loan-level (built-in tables)")) << r;
  EXPECT_TRUE(contains(r.out, "shocked scenario severe_downturn: ")) << r;
  EXPECT_TRUE(contains(r.out, "before (base)")) << r;
  EXPECT_TRUE(contains(r.out, "after (severe_downturn)")) << r;
  EXPECT_TRUE(contains(r.out, "\nP&L: -$")) << r;
  EXPECT_TRUE(contains(r.out, "change in expected lifetime loss: +$")) << r;
  const std::string tail = r.out.substr(r.out.size() - 60);
  EXPECT_TRUE(contains(tail, "apply to you.\n")) << tail;  // the caution is last
}

TEST_F(ShockCli, LoanPnlCsvAddsUpToThePool) {
  const std::filesystem::path csv = scratch_ / "shock-loans.csv";
  const Outcome r = shock(kStrictTape, {"--scenario", "boom", "--json", "--loans", csv.string()});
  ASSERT_EQ(r.exit_code, kOk) << r;
  const Ordered doc = Ordered::parse(r.out);
  const std::vector<std::string> lines = lines_of(read_file(csv));
  ASSERT_FALSE(lines.empty());
  EXPECT_EQ(lines[0], kLoansHeader);
  EXPECT_EQ(lines.size() - 1, doc.at("loans_priced").at("loans").get<std::size_t>());
  double before = 0, after = 0, pnl = 0;
  for (std::size_t k = 1; k < lines.size(); ++k) {
    const std::vector<std::string> cells = split(lines[k]);
    ASSERT_EQ(cells.size(), 11u) << lines[k];
    before += std::stod(cells[4]);
    after += std::stod(cells[5]);
    pnl += std::stod(cells[6]);
    EXPECT_NEAR(std::stod(cells[6]), std::stod(cells[5]) - std::stod(cells[4]), 0.011);
  }
  // Each value is rounded to the cent, so the sums agree to a cent a loan at most.
  const double cents = 0.005 * static_cast<double>(lines.size());
  EXPECT_NEAR(before, doc.at("before").at("dirty_value").get<double>(), cents);
  EXPECT_NEAR(after, doc.at("after").at("dirty_value").get<double>(), cents);
  EXPECT_NEAR(pnl, doc.at("pnl").at("dollars").get<double>(), cents);
}

TEST_F(ShockCli, AnUnknownScenarioListsTheNamesThereAre) {
  for (const Args& bad : {Args{"--scenario", "meltdown"},
                          Args{"--scenario", "boom", "--base-scenario", "meltdown"}}) {
    const Outcome r = shock(kStrictTape, bad);
    EXPECT_EQ(r.exit_code, kUnusableInput) << r;
    EXPECT_TRUE(contains(r.err, "'meltdown'")) << r;
    for (const std::string name : {"boom", "base", "mild_downturn", "severe_downturn"})
      EXPECT_TRUE(contains(r.err, name)) << r;
    EXPECT_TRUE(r.out.empty()) << r;
  }
}

TEST_F(ShockCli, ScenarioCurveAndHeldPriceAreRequired) {
  const Outcome no_scenario = shock(kStrictTape, {});
  EXPECT_EQ(no_scenario.exit_code, kUsage) << no_scenario;
  EXPECT_TRUE(contains(no_scenario.err, "--scenario")) << no_scenario;
  const Outcome no_price =
      poolbid(join({{"shock"}, kStrictTape, {"--curve", kCurve, "--scenario", "boom"}}));
  EXPECT_EQ(no_price.exit_code, kUsage) << no_price;
  EXPECT_TRUE(contains(no_price.err, "--held-price")) << no_price;
  const Outcome to_stdout = shock(kStrictTape, {"--scenario", "boom", "--loans", "-"});
  EXPECT_EQ(to_stdout.exit_code, kUsage) << to_stdout;
}

TEST_F(ShockCli, OutputsDoNotDependOnThreads) {
  const Args run = {"--scenario", "severe_downturn", "--json"};
  const Outcome one = shock(kLooseTape, join({run, {"--threads", "1"}}));
  const Outcome two = shock(kLooseTape, join({run, {"--threads", "2"}}));
  ASSERT_EQ(one.exit_code, kOk) << one;
  EXPECT_EQ(one.out, two.out);
}

}  // namespace
