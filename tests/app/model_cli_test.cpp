// `poolbid cashflows` and `price` with the loan-level model options, run as a user runs them:
// options that do not go together, unknown scenarios and loan ids, the "model" JSON object, the
// explanation, and reports that say the model and scenario were used.
#include <gtest/gtest.h>

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "tests/support/command_constants.h"
#include "tests/support/run_poolbid.h"

namespace {

using namespace poolbid::testing_support;
using Ordered = nlohmann::ordered_json;
using Args = std::vector<std::string>;
using Keys = std::vector<std::string>;

const std::string kCurve = "demo-pools/curve-2026-12-01.json";
const std::string kModelFile = "demo-pools/model-example.json";
const std::string kScenariosFile = "demo-pools/scenarios.json";
const Args kStrictTape = {kStrict, "--cutoff", "2026-12-01"};
const std::string kLoanId = "BHL-000002";  // the strict demo tape's second loan (row 3)

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

bool contains(const std::string& text, const std::string& part) {
  return text.find(part) != std::string::npos;
}

class ModelCli : public CommandTest {
 protected:
  Outcome cashflows(const Args& extra) const {
    return poolbid(join({{"cashflows"}, kStrictTape, extra}));
  }
  Outcome price(const Args& extra) const {
    return poolbid(join({{"price"}, kStrictTape, {"--curve", kCurve, "--target-yield", "6.5",
                                                  "--key-rates", "none"},
                         extra}));
  }
};

TEST_F(ModelCli, CashflowsWithTheModelNeedsACurve) {
  for (const Args& model : {Args{"--model"}, Args{"--scenario", "base"},
                            Args{"--model-file", kModelFile}, Args{"--explain", kLoanId}}) {
    const Outcome r = cashflows(model);
    EXPECT_EQ(r.exit_code, kUsage) << r;
    EXPECT_TRUE(contains(r.err, model[0] + ": the loan-level model needs a yield curve")) << r;
    EXPECT_TRUE(contains(r.err, "--curve")) << r;
    EXPECT_TRUE(r.out.empty()) << r;
  }
}

TEST_F(ModelCli, PoolWideCurveOptionsBesideTheModelAreRefusedNamingBoth) {
  const Outcome c = cashflows({"--curve", "4.5", "--model", "--prepay", "psa:150"});
  EXPECT_EQ(c.exit_code, kUsage) << c;
  EXPECT_TRUE(contains(c.err, "--prepay cannot be used with --model")) << c;
  const Outcome p = price({"--scenario", "boom", "--default", "sda:100", "--severity", "40"});
  EXPECT_EQ(p.exit_code, kUsage) << p;
  EXPECT_TRUE(contains(p.err, "--default and --severity cannot be used with --scenario")) << p;
  for (const Args& option : {Args{"--lag", "6"}, Args{"--delinquent-default"}}) {
    const Outcome r = price(join({{"--model"}, option}));
    EXPECT_EQ(r.exit_code, kUsage) << r;
    EXPECT_TRUE(contains(r.err, option[0] + " cannot be used with --model")) << r;
  }
  // --advancing is still read with the model.
  const Outcome advancing = price({"--model", "--advancing", "interest", "--json"});
  ASSERT_EQ(advancing.exit_code, kOk) << advancing;
  EXPECT_EQ(Ordered::parse(advancing.out).at("assumptions"),
            Ordered({{"advancing", "interest"}}));
}

TEST_F(ModelCli, AnExplanationBesideACsvTableIsRefused) {
  // The table replaces the report the explanation would go in: refused rather than dropped.
  const Outcome r = cashflows({"--curve", "4.5", "--explain", "BHL-000002", "--csv", "-"});
  EXPECT_EQ(r.exit_code, kUsage) << r;
  EXPECT_TRUE(contains(r.err, "--explain")) << r;
  EXPECT_TRUE(r.out.empty()) << r;
}

TEST_F(ModelCli, TheModelAdvancesInterestUnlessToldOtherwise) {
  // Severity then counts the interest lost while a defaulted loan awaits sale.
  const Outcome given = price({"--model", "--json"});
  ASSERT_EQ(given.exit_code, kOk) << given;
  EXPECT_TRUE(contains(given.out, R"("advancing": "interest")")) << given;
  const Outcome none = price({"--model", "--advancing", "none", "--json"});
  ASSERT_EQ(none.exit_code, kOk) << none;
  EXPECT_TRUE(contains(none.out, R"("advancing": "none")")) << none;
}

TEST_F(ModelCli, AnUnknownScenarioListsTheNamesThereAre) {
  for (const Outcome& r : {cashflows({"--curve", "4.5", "--scenario", "doom"}),
                           price({"--scenario", "doom"})}) {
    EXPECT_EQ(r.exit_code, kUnusableInput) << r;
    EXPECT_TRUE(contains(r.err, "--scenario 'doom'")) << r;
    for (const std::string name : {"boom", "base", "mild_downturn", "severe_downturn"})
      EXPECT_TRUE(contains(r.err, name)) << r;
    EXPECT_TRUE(r.out.empty()) << r;
  }
}

TEST_F(ModelCli, ALoanIdNotOnTheTapeIsNamed) {
  for (const Outcome& r : {cashflows({"--curve", "4.5", "--explain", "NO-SUCH-LOAN"}),
                           price({"--explain", "NO-SUCH-LOAN"})}) {
    EXPECT_EQ(r.exit_code, kUnusableInput) << r;
    EXPECT_TRUE(contains(r.err, "--explain 'NO-SUCH-LOAN'")) << r;
    EXPECT_TRUE(r.out.empty()) << r;
  }
}

TEST_F(ModelCli, CashflowsJsonSaysTheModelAndScenario) {
  const Outcome r = cashflows({"--curve", kCurve, "--model", "--json"});
  ASSERT_EQ(r.exit_code, kOk) << r;
  const Ordered doc = Ordered::parse(r.out);
  EXPECT_EQ(keys_of(doc), (Keys{"file", "cutoff_date", "payment_delay_days", "assumptions", "model",
                                "arm_curve", "summary", "months", "rejected", "caution"}));
  EXPECT_EQ(doc.at("model").at("tables"), "built-in");
  EXPECT_EQ(doc.at("model").at("scenarios"), "built-in");
  EXPECT_EQ(doc.at("model").at("scenario").at("name"), "base");  // the default scenario
  EXPECT_TRUE(doc.at("model").at("explanation").is_null());
  EXPECT_GT(doc.at("summary").at("default").get<double>(), 0);  // the model's defaults
  EXPECT_GT(doc.at("summary").at("prepayment").get<double>(), 0);
}

TEST_F(ModelCli, ModelFileScenarioFileAndExplanation) {
  const Outcome r = price({"--model-file", kModelFile, "--scenarios", kScenariosFile,
                           "--scenario", "severe_downturn", "--explain", kLoanId, "--json"});
  ASSERT_EQ(r.exit_code, kOk) << r;
  const Ordered doc = Ordered::parse(r.out);
  const Ordered& model = doc.at("model");
  EXPECT_EQ(model.at("tables"), kModelFile);
  EXPECT_EQ(model.at("scenarios"), kScenariosFile);
  EXPECT_EQ(model.at("scenario").at("name"), "severe_downturn");
  EXPECT_EQ(model.at("explanation").at("loan_id"), kLoanId);
  EXPECT_EQ(model.at("explanation").at("row"), 3);
  EXPECT_FALSE(model.at("explanation").at("factors").empty());
  EXPECT_TRUE(doc.at("credit").contains("cum_default_pct"));
}

TEST_F(ModelCli, TextReportsSayTheModelWasUsedAndEndWithTheCaution) {
  const Outcome c = cashflows({"--curve", "4.5", "--scenario", "mild_downturn", "--explain",
                               kLoanId});
  const Outcome p = price({"--model", "--explain", kLoanId});
  for (const Outcome& r : {c, p}) {
    ASSERT_EQ(r.exit_code, kOk) << r;
    EXPECT_TRUE(contains(r.out, "\nModel: loan-level (built-in tables), scenario ")) << r;
    EXPECT_TRUE(contains(r.out, "explanation of loan " + kLoanId + " (row 3)")) << r;
    EXPECT_TRUE(contains(r.out, "not investment advice")) << r;
    const std::string tail = r.out.substr(r.out.size() - 60);
    EXPECT_TRUE(contains(tail, "apply to you.\n")) << tail;  // the caution is last
  }
  EXPECT_TRUE(contains(c.out, "scenario mild_downturn: house prices")) << c;
}

TEST_F(ModelCli, ASevereDownturnLosesMoreThanTheBase) {
  auto loss_pct = [&](const std::string& scenario) {
    const Outcome r = price({"--scenario", scenario, "--json"});
    EXPECT_EQ(r.exit_code, kOk) << r;
    return Ordered::parse(r.out).at("credit").at("expected_loss_pct").get<double>();
  };
  EXPECT_GT(loss_pct("severe_downturn"), loss_pct("base"));
}

TEST_F(ModelCli, ModelOutputsDoNotDependOnThreads) {
  const Args run = {"--curve", kCurve, "--scenario", "mild_downturn", "--csv", "-"};
  const Outcome one = cashflows(join({run, {"--threads", "1"}}));
  const Outcome two = cashflows(join({run, {"--threads", "2"}}));
  ASSERT_EQ(one.exit_code, kOk) << one;
  EXPECT_EQ(one.out, two.out);
}

}  // namespace
