// `poolbid compare` and `poolbid matrix` run as a user runs them on the demo sellers: exit codes,
// the JSON documents' keys in order, the attribution adding up to the gap, the common price, the
// per-tape column maps, rejected rows, and the matrix's scenarios.
#include <gtest/gtest.h>

#include <cstddef>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "tests/support/command_constants.h"
#include "tests/support/run_poolbid.h"

namespace {

using namespace poolbid::testing_support;
using Ordered = nlohmann::ordered_json;  // keeps the document's key order
using Keys = std::vector<std::string>;

const std::string kSwapCurve = "demo-pools/curve-2026-12-01.json";
// The demo tapes' cut-off (demo-pools/README.md): the strict tape has none of its own, the loose
// tape's column map carries the same date.
const std::string kCutoff = "2026-12-01";
const std::string kLooseMapFor = kLoose + "=" + kLooseMap;

// The demo sellers, strict first, at a 6.5% loss-adjusted yield on the demo swap curve.
std::vector<std::string> demo_args(const std::string& command) {
  return {command,   kStrict,    kLoose,     "--map",      kLooseMapFor,     "--cutoff", kCutoff,
          "--curve", kSwapCurve, "--settle", "2026-12-17", "--target-yield", "6.5"};
}

Keys keys_of(const Ordered& object) {
  Keys keys;
  for (const auto& item : object.items()) keys.push_back(item.key());
  return keys;
}

class CompareCommand : public CommandTest {};

TEST_F(CompareCommand, DemoSellersText) {
  const Outcome r = poolbid(demo_args("compare"));
  ASSERT_EQ(r.exit_code, kOk) << r;
  for (const char* text :
       {"poolbid compare: 2 pools", "A  Brindlecote Home Loans", "B  Sallowmere Funding",
        "WA credit score", "credit score", "documentation", "delinquency at cut-off",
        "lifetime defaults (% of UPB)", "loss severity", "at a common clean price of",
        "total gap (A - B)", "collateral and terms", "interaction",
        "A (Brindlecote Home Loans) comes out ahead of B (Sallowmere Funding)",
        "The biggest reasons:", "scenario: base", "rejected rows: none"})
    EXPECT_NE(r.out.find(text), std::string::npos) << text << "\n" << r;
  EXPECT_EQ(r.err, "");
}

TEST_F(CompareCommand, DemoSellersJson) {
  std::vector<std::string> args = demo_args("compare");
  args.push_back("--json");
  const Outcome r = poolbid(args);
  ASSERT_EQ(r.exit_code, kOk) << r;
  const Ordered doc = Ordered::parse(r.out);
  EXPECT_EQ(keys_of(doc), (Keys{"cutoff_date", "settlement_date", "payment_delay_days", "curve",
                                "model", "advancing", "scenario", "target", "common_price", "pools",
                                "attribution", "caution"}));
  EXPECT_EQ(doc["cutoff_date"], kCutoff);
  EXPECT_EQ(doc["settlement_date"], "2026-12-17");
  EXPECT_EQ(doc["scenario"]["name"], "base");
  EXPECT_EQ(doc["target"]["kind"], "yield");
  EXPECT_DOUBLE_EQ(doc["target"]["value"].get<double>(), 0.065);
  EXPECT_EQ(doc["model"]["built_in"], true);
  ASSERT_EQ(doc["pools"].size(), 2u);
  const Ordered& strict = doc["pools"][0];
  const Ordered& loose = doc["pools"][1];
  EXPECT_EQ(keys_of(strict), (Keys{"name", "file", "loans", "cutoff_balance", "rows_read",
                                   "rows_rejected", "upb_rejected", "strats", "at_target",
                                   "at_common_price", "neutral_prices", "rejected"}));
  EXPECT_EQ(strict["name"], "Brindlecote Home Loans");
  EXPECT_EQ(loose["name"], "Sallowmere Funding");
  EXPECT_EQ(strict["loans"], 2000);
  // The strict seller bids above the loose one at the same yield, on fewer defaults and less loss.
  EXPECT_GT(strict["at_target"]["clean_price"].get<double>(),
            loose["at_target"]["clean_price"].get<double>());
  EXPECT_LT(strict["at_target"]["cum_default_pct"].get<double>(),
            loose["at_target"]["cum_default_pct"].get<double>());
  EXPECT_LT(strict["at_target"]["cum_loss_pct"].get<double>(),
            loose["at_target"]["cum_loss_pct"].get<double>());
  // The common price is the strict pool's: there it yields the target, the loose pool less.
  EXPECT_EQ(doc["common_price"]["from"], "first_pool");
  EXPECT_EQ(doc["common_price"]["clean_price"], strict["at_target"]["clean_price"]);
  EXPECT_NEAR(strict["at_common_price"]["loss_adjusted"]["bey"].get<double>(), 0.065, 1e-9);
  EXPECT_LT(loose["at_common_price"]["loss_adjusted"]["bey"].get<double>(), 0.065);

  ASSERT_EQ(doc["attribution"].size(), 1u);
  const Ordered& a = doc["attribution"][0];
  EXPECT_EQ(keys_of(a), (Keys{"pool_a", "pool_b", "pool_b_index", "sign", "gap_points",
                              "gap_dollars", "ahead", "lines"}));
  EXPECT_EQ(a["ahead"], "Brindlecote Home Loans");
  ASSERT_EQ(a["lines"].size(), 10u);  // eight factors, collateral and terms, interaction
  double sum = 0;
  for (const Ordered& line : a["lines"]) {
    EXPECT_EQ(keys_of(line), (Keys{"label", "factor", "points", "dollars"}));
    sum += line["points"].get<double>();
  }
  // identity: the lines add up to the gap, and the gap is the difference of the two prices
  EXPECT_NEAR(sum, a["gap_points"].get<double>(), 1e-9);
  EXPECT_NEAR(a["gap_points"].get<double>(),
              strict["at_target"]["clean_price"].get<double>() -
                  loose["at_target"]["clean_price"].get<double>(),
              1e-9);
  EXPECT_EQ(a["lines"][0]["factor"], "score");
  EXPECT_EQ(a["lines"][8]["label"], "collateral and terms");
  EXPECT_TRUE(a["lines"][8]["factor"].is_null());
}

TEST_F(CompareCommand, AtPriceAndNoAttribution) {
  std::vector<std::string> args = demo_args("compare");
  for (const char* extra : {"--at-price", "97.5", "--no-attribution", "--json"})
    args.push_back(extra);
  const Outcome r = poolbid(args);
  ASSERT_EQ(r.exit_code, kOk) << r;
  const Ordered doc = Ordered::parse(r.out);
  EXPECT_EQ(doc["common_price"]["from"], "given");
  EXPECT_EQ(doc["common_price"]["clean_price"].get<double>(), 97.5);
  EXPECT_TRUE(doc["attribution"].empty());
  for (const Ordered& pool : doc["pools"]) {
    EXPECT_EQ(pool["at_common_price"]["clean_price"].get<double>(), 97.5);
    EXPECT_TRUE(pool["neutral_prices"].is_null());
  }
}

TEST_F(CompareCommand, ColumnMapsPerTape) {
  // A map for a file that is not one of the tapes, and a tape read without the map it needs.
  std::vector<std::string> args = demo_args("compare");
  args[4] = "demo-pools/other.csv=" + kLooseMap;
  Outcome r = poolbid(args);
  EXPECT_EQ(r.exit_code, kUsage) << r;
  EXPECT_NE(r.err.find("--map"), std::string::npos) << r;
  EXPECT_NE(r.err.find("TAPE=MAP"), std::string::npos) << r;
  r = poolbid({"compare", kStrict, kLoose, "--cutoff", kCutoff, "--curve", kSwapCurve,
               "--target-yield", "6.5"});
  EXPECT_EQ(r.exit_code, kUnusableTape) << r;  // its headers are not ours: columns missing
  // The same map twice for one tape.
  args = demo_args("compare");
  args.insert(args.end(), {"--map", kLooseMapFor});
  r = poolbid(args);
  EXPECT_EQ(r.exit_code, kUsage) << r;
}

TEST_F(CompareCommand, OptionsRefused) {
  // No target.
  Outcome r = poolbid({"compare", kStrict, "--cutoff", kCutoff, "--curve", kSwapCurve});
  EXPECT_EQ(r.exit_code, kUsage) << r;
  EXPECT_NE(r.err.find("--target-yield"), std::string::npos) << r;
  // Both targets.
  std::vector<std::string> args = demo_args("compare");
  args.insert(args.end(), {"--target-spread", "250"});
  EXPECT_EQ(poolbid(args).exit_code, kUsage);
  // A scenario the set does not have names the ones it does.
  args = demo_args("compare");
  args.insert(args.end(), {"--scenario", "apocalypse"});
  r = poolbid(args);
  EXPECT_EQ(r.exit_code, kUnusableInput) << r;
  EXPECT_NE(r.err.find("severe_downturn"), std::string::npos) << r;
  // No cut-off for the strict tape.
  r = poolbid({"compare", kStrict, kLoose, "--map", kLooseMapFor, "--curve", kSwapCurve,
               "--target-yield", "6.5"});
  EXPECT_EQ(r.exit_code, kUnusableInput) << r;
  EXPECT_NE(r.err.find("cut-off"), std::string::npos) << r;
  // --cutoff sets every tape's, the column map's included: a month earlier, the loose tape's
  // loans first paying in December are rejected (their age would be -1), listed, exit 3.
  r = poolbid({"compare", kStrict, kLoose, "--map", kLooseMapFor, "--cutoff", "2026-11-01",
               "--curve", "4.5", "--target-yield", "6.5", "--no-attribution"});
  EXPECT_EQ(r.exit_code, kRowsRejected) << r;
  EXPECT_NE(r.out.find("rejected rows of B (Sallowmere Funding"), std::string::npos) << r;
}

TEST_F(CompareCommand, TapesWithDifferentCutoffs) {
  // The loose tape twice, the second through a map dated a month earlier.
  const std::filesystem::path copy = scratch_ / "loose-copy.csv";
  const std::filesystem::path map = scratch_ / "earlier.map.json";
  std::filesystem::copy_file(std::filesystem::path(POOLBID_SOURCE_DIR) / kLoose, copy);
  Ordered earlier =
      Ordered::parse(read_file(std::filesystem::path(POOLBID_SOURCE_DIR) / kLooseMap));
  earlier["cutoff_date"] = "2026-11-01";
  std::ofstream(map) << earlier.dump();
  const Outcome r =
      poolbid({"compare", kLoose, copy.string(), "--map", kLooseMapFor, "--map",
               copy.string() + "=" + map.string(), "--curve", "4.5", "--target-yield", "6.5"});
  EXPECT_EQ(r.exit_code, kUnusableInput) << r;
  EXPECT_NE(r.err.find("cut-off dates differ"), std::string::npos) << r;
}

TEST_F(CompareCommand, RejectedRowsListedExitThree) {
  const Outcome r = poolbid({"compare", kStrict, kBadTape, "--cutoff", kCutoff, "--curve",
                             kSwapCurve, "--settle", "2026-12-17", "--target-yield", "6.5"});
  ASSERT_EQ(r.exit_code, kRowsRejected) << r;
  EXPECT_NE(r.out.find("rejected rows of B"), std::string::npos) << r;
  EXPECT_NE(r.out.find("comes out ahead"), std::string::npos) << r;
  std::vector<std::string> json_args = {
      "compare",  kStrict,          kBadTape, "--cutoff",         kCutoff, "--curve",
      kSwapCurve, "--target-yield", "6.5",    "--no-attribution", "--json"};
  const Outcome j = poolbid(json_args);
  ASSERT_EQ(j.exit_code, kRowsRejected) << j;
  const Ordered doc = Ordered::parse(j.out);
  EXPECT_EQ(doc["pools"][1]["rows_rejected"], 14);
  EXPECT_EQ(doc["pools"][1]["rejected"].size(), 14u);
  EXPECT_TRUE(doc["pools"][0]["rejected"].empty());
}

TEST_F(CompareCommand, MatrixOnTheDemoSellers) {
  std::vector<std::string> args = demo_args("matrix");
  args.push_back("--json");
  const Outcome r = poolbid(args);
  ASSERT_EQ(r.exit_code, kOk) << r;
  const Ordered doc = Ordered::parse(r.out);
  EXPECT_EQ(keys_of(doc), (Keys{"cutoff_date", "settlement_date", "payment_delay_days", "curve",
                                "model", "advancing", "target", "common_price", "pools",
                                "scenarios", "cells", "caution"}));
  ASSERT_EQ(doc["scenarios"].size(), 4u);
  ASSERT_EQ(doc["cells"].size(), 8u);
  EXPECT_EQ(doc["common_price"]["scenario"], "base");
  EXPECT_EQ(keys_of(doc["cells"][0]),
            (Keys{"pool", "pool_index", "scenario", "cum_default_pct", "cum_loss_pct",
                  "severity_pct", "clean_price", "wal_years", "at_common_price"}));
  // Defaults rise from boom to severe downturn for both sellers; the loose one is worse in every
  // scenario.
  for (std::size_t p = 0; p < 2; ++p)
    for (std::size_t s = 1; s < 4; ++s)
      EXPECT_GT(doc["cells"][p * 4 + s]["cum_default_pct"].get<double>(),
                doc["cells"][p * 4 + s - 1]["cum_default_pct"].get<double>())
          << p << " " << s;
  for (std::size_t s = 0; s < 4; ++s) {
    EXPECT_GT(doc["cells"][4 + s]["cum_default_pct"].get<double>(),
              doc["cells"][s]["cum_default_pct"].get<double>());
    EXPECT_LT(doc["cells"][4 + s]["clean_price"].get<double>(),
              doc["cells"][s]["clean_price"].get<double>());
  }

  const Outcome text = poolbid(demo_args("matrix"));
  ASSERT_EQ(text.exit_code, kOk) << text;
  for (const char* s : {"poolbid matrix: 2 pools x 4 scenarios", "boom", "base", "mild_downturn",
                        "severe_downturn", "defaults %", "Z-spread bp", "common price:"})
    EXPECT_NE(text.out.find(s), std::string::npos) << s << "\n" << text;
}

TEST_F(CompareCommand, MatrixScenarioFile) {
  const std::filesystem::path file = scratch_ / "two.json";
  std::ofstream(file) << R"({"scenarios": [
    {"name": "calm", "house_prices": {"annual": [2]}},
    {"name": "slump", "house_prices": {"annual": [-15, -5, 0]}, "default_multiplier": 2}]})";
  std::vector<std::string> args = demo_args("matrix");
  args.insert(args.end(), {"--scenarios", file.string(), "--json"});
  const Outcome r = poolbid(args);
  ASSERT_EQ(r.exit_code, kOk) << r;
  const Ordered doc = Ordered::parse(r.out);
  ASSERT_EQ(doc["cells"].size(), 4u);
  EXPECT_EQ(doc["cells"][1]["scenario"], "slump");
  // No scenario called base: the first one sets the common price.
  EXPECT_EQ(doc["common_price"]["scenario"], "calm");
  EXPECT_GT(doc["cells"][1]["cum_default_pct"].get<double>(),
            doc["cells"][0]["cum_default_pct"].get<double>());
  // A bad scenario file is unusable input.
  std::ofstream(scratch_ / "bad.json") << R"({"scenarios": [{"name": "x", "colour": 1}]})";
  args = demo_args("matrix");
  args.insert(args.end(), {"--scenarios", (scratch_ / "bad.json").string()});
  const Outcome bad = poolbid(args);
  EXPECT_EQ(bad.exit_code, kUnusableInput) << bad;
}

}  // namespace
