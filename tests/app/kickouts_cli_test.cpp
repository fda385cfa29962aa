// `poolbid price --kickouts` run as a user runs it on the demo pools: the loosely underwritten
// seller loses more loans to the credit box, the JSON and the decisions CSV agree, the economics
// options move the break-even, and a bad credit box file stops the command naming the key.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <initializer_list>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "tests/support/command_constants.h"
#include "tests/support/csv_text.h"
#include "tests/support/run_poolbid.h"

namespace {

using namespace poolbid::testing_support;
using Ordered = nlohmann::ordered_json;

const std::string kSwapCurve = "demo-pools/curve-2026-12-01.json";
const std::string kBox = "demo-pools/credit-box.json";
// The demo's bids (demo-pools/demo.sh): both sellers at a 6.50% loss-adjusted yield on the swap
// curve, Brindlecote (strict) at 100% SDA, Sallowmere (loose) at 200% SDA. No key rates: they do
// not bear on kick-outs and cost projections.
const std::vector<std::string> kStrictBid = {
    "price",    kStrict,  "--cutoff",  "2026-12-01", "--curve", kSwapCurve, "--settle",
    "2026-12-17", "--prepay", "psa:150", "--default", "sda:100", "--severity", "40",
    "--lag",    "12",     "--target-yield", "6.5",   "--key-rates", "none"};
const std::vector<std::string> kLooseBid = {
    "price",    kLoose,   "--map",     kLooseMap,    "--curve", kSwapCurve, "--settle",
    "2026-12-17", "--prepay", "psa:150", "--default", "sda:200", "--severity", "40",
    "--lag",    "12",     "--target-yield", "6.5",   "--key-rates", "none"};
const std::string kCsvHeader =
    "loan_id,row,seller,cutoff_balance,decision,outside_box,below_price,above_break_even,value,"
    "value_price,allocated,allocated_price,default_pct,severity_pct,severity_modelled,"
    "break_even_pct,expected_loss,loss_pct,reasons";
constexpr std::size_t kDemoLoans = 2000;

std::vector<std::string> with(std::vector<std::string> args,
                              std::initializer_list<std::string> more) {
  args.insert(args.end(), more.begin(), more.end());
  return args;
}

std::vector<std::string> keys_of(const Ordered& object) {
  std::vector<std::string> keys;
  for (const auto& [key, value] : object.items()) keys.push_back(key);
  return keys;
}

class KickoutsCli : public CommandTest {
 protected:
  // The command's JSON, checked to have run (exit 0).
  Ordered json_of(const std::vector<std::string>& args) {
    const Outcome r = poolbid(with(args, {"--json"}));
    EXPECT_EQ(r.exit_code, kOk) << r;
    return r.exit_code == kOk ? Ordered::parse(r.out) : Ordered::object();
  }
  std::string write(const std::string& name, const std::string& text) {
    const std::filesystem::path path = scratch_ / name;
    std::ofstream(path) << text;
    return path.string();
  }
};

TEST_F(KickoutsCli, TheLooseSellerLosesMoreLoans) {
  const Ordered strict = json_of(with(kStrictBid, {"--kickouts"}));
  const Ordered loose = json_of(with(kLooseBid, {"--kickouts"}));
  ASSERT_TRUE(strict.contains("kickouts") && loose.contains("kickouts"));
  const auto kicked = [](const Ordered& j) {
    return j.at("kickouts").at("counts").at("kicked").at("loans").get<std::size_t>();
  };
  const auto outside = [](const Ordered& j) {
    return j.at("kickouts").at("counts").at("outside_box").at("loans").get<std::size_t>();
  };
  EXPECT_GT(kicked(loose), kicked(strict));
  EXPECT_GT(outside(loose), outside(strict));
  for (const Ordered* j : {&strict, &loose}) {
    const Ordered& k = j->at("kickouts");
    // kept + kicked = every loan priced, in count and UPB.
    const std::size_t loans = j->at("loans_priced").at("loans").get<std::size_t>();
    EXPECT_EQ(loans, kDemoLoans);
    EXPECT_EQ(k.at("counts").at("kept").at("loans").get<std::size_t>() +
                  k.at("counts").at("kicked").at("loans").get<std::size_t>(),
              loans);
    EXPECT_NEAR(k.at("counts").at("kept").at("upb").get<double>() +
                    k.at("counts").at("kicked").at("upb").get<double>(),
                j->at("loans_priced").at("cutoff_balance").get<double>(), 1e-3);
    EXPECT_EQ(k.at("kicked").size(), k.at("counts").at("kicked").at("loans").get<std::size_t>());
    // The bid without the kicked-out loans, at the same 6.50% yield, carries less credit: the
    // loans kept lose less than the pool's average share (their price per 100 may still fall
    // when the loans kicked out had the higher coupons).
    ASSERT_EQ(k.at("without").at("status"), "priced");
    EXPECT_NEAR(k.at("without").at("loss_adjusted").at("bey").get<double>(), 0.065, 1e-9);
    EXPECT_LT(k.at("without").at("credit").at("expected_loss_pct").get<double>(),
              j->at("credit").at("expected_loss_pct").get<double>());
    // common practice: 5% margin, 50% bad-loan loss -> p* = 5/55.
    EXPECT_NEAR(k.at("economics").at("break_even").get<double>(), 0.05 / 0.55, 1e-15);
  }
  // "kickouts" sits before "rejected"; the rest is the price document's.
  const std::vector<std::string> keys = keys_of(loose);
  const auto at = [&](const std::string& key) {
    return std::find(keys.begin(), keys.end(), key) - keys.begin();
  };
  EXPECT_EQ(at("kickouts") + 1, at("rejected"));
  EXPECT_EQ(keys_of(loose.at("kickouts")),
            (std::vector<std::string>{"box", "box_source", "economics", "counts", "without",
                                      "kicked"}));
  EXPECT_EQ(loose.at("kickouts").at("box_source"), "default");
}

TEST_F(KickoutsCli, TheDemoBoxFileMatchesTheDefault) {
  const Ordered by_default = json_of(with(kLooseBid, {"--kickouts"}));
  const Ordered by_file = json_of(with(kLooseBid, {"--kickouts", "--box", kBox}));
  EXPECT_EQ(by_file.at("kickouts").at("box_source"), kBox);
  EXPECT_EQ(by_default.at("kickouts").at("counts"), by_file.at("kickouts").at("counts"));
  EXPECT_EQ(by_default.at("kickouts").at("kicked"), by_file.at("kickouts").at("kicked"));
}

TEST_F(KickoutsCli, TextReportHasTheKickoutSection) {
  const Outcome r = poolbid(with(kLooseBid, {"--kickouts"}));
  ASSERT_EQ(r.exit_code, kOk) << r;
  const std::size_t section = r.out.find("\nkick-outs\n");
  ASSERT_NE(section, std::string::npos) << r;
  EXPECT_LT(section, r.out.find("rejected rows:"));
  for (const std::string needle :
       {"credit box: default", "break-even p* = m / (m + s)", "9.09%", "outside the credit box",
        "value below allocated price", "default probability above break-even",
        "without kick-outs", "kicked-out loans"})
    EXPECT_NE(r.out.find(needle, section), std::string::npos) << needle;
  // Without --kickouts the price report has no such section.
  const Outcome plain = poolbid(kLooseBid);
  ASSERT_EQ(plain.exit_code, kOk) << plain;
  EXPECT_EQ(plain.out.find("kick-outs"), std::string::npos);
}

TEST_F(KickoutsCli, DecisionsCsvHasEveryLoanAndAgreesWithTheJson) {
  const std::string csv = (scratch_ / "decisions.csv").string();
  const Ordered j = json_of(with(kLooseBid, {"--kickouts", "--kickouts-csv", csv}));
  const std::vector<std::string> lines = lines_of(read_file(csv));
  ASSERT_EQ(lines.size(), kDemoLoans + 1);
  EXPECT_EQ(lines[0], kCsvHeader);
  std::size_t kicks = 0;
  for (std::size_t i = 1; i < lines.size(); ++i)
    kicks += lines[i].find(",kick,") != std::string::npos;
  EXPECT_EQ(kicks, j.at("kickouts").at("counts").at("kicked").at("loans").get<std::size_t>());
  // The same file from a run on one thread.
  const std::string one = (scratch_ / "one-thread.csv").string();
  ASSERT_EQ(poolbid(with(kLooseBid, {"--kickouts", "--kickouts-csv", one, "--threads", "1"}))
                .exit_code,
            kOk);
  EXPECT_EQ(read_file(one), read_file(csv));
}

TEST_F(KickoutsCli, MarginAndBadLoanLossSetTheBreakEven) {
  const Ordered j = json_of(with(kLooseBid, {"--margin", "2", "--bad-loan-loss", "60"}));
  ASSERT_TRUE(j.contains("kickouts"));  // either option asks for kick-outs
  const Ordered& e = j.at("kickouts").at("economics");
  EXPECT_DOUBLE_EQ(e.at("margin").get<double>(), 0.02);
  EXPECT_DOUBLE_EQ(e.at("bad_loan_loss").get<double>(), 0.60);
  EXPECT_NEAR(e.at("break_even").get<double>(), 0.02 / 0.62, 1e-15);
  for (const std::string bad : {"0", "-1", "101"}) {
    const Outcome r = poolbid(with(kLooseBid, {"--kickouts", "--margin", bad}));
    EXPECT_EQ(r.exit_code, kUsage) << bad << "\n" << r;
  }
}

TEST_F(KickoutsCli, ABadBoxFileStopsTheCommandNamingTheKey) {
  struct Case {
    std::string json, needle;
  };
  for (const Case& c : std::vector<Case>{
           {R"({"max_ltv": 0.95})", "key max_ltv, value '0.95'"},
           {R"({"min_score": 620, "max_fico": 700})", "key max_fico"},
           {R"({"states": ["CA", "ZZ"]})", "key states[1], value 'ZZ'"},
           {R"({"min_score": 620, "min_score": 640})", "key min_score"},
       }) {
    const std::string box = write("box.json", c.json);
    const std::string csv = (scratch_ / "decisions.csv").string();
    const Outcome r = poolbid(with(kLooseBid, {"--kickouts", "--box", box, "--kickouts-csv", csv}));
    EXPECT_EQ(r.exit_code, kUnusableInput) << c.json << "\n" << r;
    EXPECT_EQ(r.out, "");
    EXPECT_EQ(r.err.rfind("poolbid: ", 0), 0u) << r.err;
    EXPECT_NE(r.err.find(box), std::string::npos) << r.err;
    EXPECT_NE(r.err.find(c.needle), std::string::npos) << r.err;
    EXPECT_FALSE(std::filesystem::exists(csv)) << "nothing is written";
  }
  const Outcome missing = poolbid(with(kLooseBid, {"--kickouts", "--box", "no-such-box.json"}));
  EXPECT_EQ(missing.exit_code, kUnusableInput) << missing;
  EXPECT_NE(missing.err.find("no-such-box.json"), std::string::npos) << missing.err;
}

TEST_F(KickoutsCli, TheDecisionsCsvMayNotOverwriteAnInput) {
  const Outcome r = poolbid(with(kLooseBid, {"--kickouts", "--kickouts-csv", kLooseMap}));
  EXPECT_EQ(r.exit_code, kUsage) << r;
  EXPECT_NE(r.err.find("--kickouts-csv"), std::string::npos) << r.err;
  const Outcome box = poolbid(with(kLooseBid, {"--kickouts", "--box", kBox, "--kickouts-csv", kBox}));
  EXPECT_EQ(box.exit_code, kUsage) << box;
}

TEST_F(KickoutsCli, RejectedRowsAreListedAndTheExitCodeIsThree) {
  const std::string csv = (scratch_ / "decisions.csv").string();
  const Outcome r = poolbid({"price", kBadTape, "--cutoff", "2026-12-01", "--curve", "4.25",
                             "--target-yield", "6.5", "--key-rates", "none", "--kickouts",
                             "--kickouts-csv", csv});
  EXPECT_EQ(r.exit_code, kRowsRejected) << r;
  EXPECT_NE(r.out.find("\nkick-outs\n"), std::string::npos) << r;
  EXPECT_NE(r.out.find("rows rejected"), std::string::npos) << r;
  // Every accepted loan has its decision: 40 rows, 14 rejected.
  EXPECT_EQ(lines_of(read_file(csv)).size(), 40u - 14u + 1u);
}

TEST_F(KickoutsCli, AStrictBoxKicksEveryLoan) {
  const std::string box = write("strict.json", R"({"min_score": 850, "max_ltv": 10})");
  const Ordered j = json_of(with(kStrictBid, {"--kickouts", "--box", box}));
  const Ordered& k = j.at("kickouts");
  EXPECT_EQ(k.at("counts").at("kicked").at("loans").get<std::size_t>(), kDemoLoans);
  EXPECT_EQ(k.at("without").at("status"), "all_kicked");
  EXPECT_TRUE(k.at("without").at("bid").is_null());
  const Outcome text = poolbid(with(kStrictBid, {"--kickouts", "--box", box}));
  EXPECT_NE(text.out.find("every loan is kicked out"), std::string::npos) << text;
}

}  // namespace
